"""Peer: exact L1 (least absolute deviations) and L-infinity (minimax) fits as linear programmes
solved by scipy.optimize.linprog with HiGHS, method "highs-ds" (dual simplex) or "highs-ipm"
(interior point with crossover), default tolerances.

Formulations (the textbook primal forms a practitioner writes down):
  L1    min  sum(u+ + u-)   s.t.  X b + u+ - u- = y,   u+, u- >= 0,  b free
  Linf  min  t              s.t.  X b - t <= y,  -X b - t <= -y,  t >= 0, b free
and, with --form dual, the L1 dual  max y'd  s.t.  X'd = 0, -1 <= d <= 1, whose equality
multipliers are the coefficients (n bounded columns and only p rows).
Building the sparse constraint matrix is part of each timed call: it is part of solving by LP.

Usage: python3 bench/peers/scipy-linprog.py --data FILE --problem l1|linf --method highs-ds|highs-ipm
       [--form primal|dual] --budget S --max-repeats K --min-sample S"""
import sys

import numpy as np
import scipy
from scipy import sparse
from scipy.optimize import linprog

from dataset import design, emit, parse_args, read_dataset, time_fit, versions

args = parse_args(sys.argv[1:], ["data", "problem", "method", "budget", "max-repeats", "min-sample"])
header, x, y = read_dataset(args["data"])
p = header["p"]
n = int(header["n"])
X = design(x, p)
problem = args["problem"]
method = args["method"]
form = args.get("form", "primal")
if method not in ("highs-ds", "highs-ipm"):
    raise SystemExit(f"--method {method}: expected highs-ds or highs-ipm")


def l1_primal():
    eye = sparse.identity(n, format="csc")
    A = sparse.hstack([sparse.csc_matrix(X), eye, -eye], format="csc")
    c = np.concatenate([np.zeros(p), np.ones(2 * n)])
    bounds = [(None, None)] * p + [(0, None)] * (2 * n)
    res = linprog(c, A_eq=A, b_eq=y, bounds=bounds, method=method)
    return res, (res.x[:p] if res.x is not None else None)


def l1_dual():
    # max y'd  <=>  min -y'd;  X'd = 0;  -1 <= d <= 1.  The multiplier of X'd = 0 is -b.
    res = linprog(-y, A_eq=sparse.csr_matrix(X.T), b_eq=np.zeros(p), bounds=(-1, 1), method=method)
    beta = None if res.status != 0 else -np.asarray(res.eqlin.marginals)
    return res, beta


def linf_primal():
    col = sparse.csc_matrix(-np.ones((n, 1)))
    Xs = sparse.csc_matrix(X)
    A = sparse.vstack([sparse.hstack([Xs, col]), sparse.hstack([-Xs, col])], format="csc")
    b = np.concatenate([y, -y])
    c = np.zeros(p + 1)
    c[p] = 1.0
    bounds = [(None, None)] * p + [(0, None)]
    res = linprog(c, A_ub=A, b_ub=b, bounds=bounds, method=method)
    return res, (res.x[:p] if res.x is not None else None)


if problem == "l1":
    solve = l1_dual if form == "dual" else l1_primal
    estimator = "least-absolute"
elif problem == "linf":
    if form != "primal":
        raise SystemExit("--form dual is only offered for l1 here (yalps covers the L-infinity dual)")
    solve = linf_primal
    estimator = "minimax"
else:
    raise SystemExit(f"--problem {problem}: expected l1 or linf")

(res, beta), samples, k = time_fit(solve, float(args["budget"]), int(args["max-repeats"]), float(args["min-sample"]))
v = versions()
v["scipy"] = scipy.__version__
emit({"peer": f"scipy linprog {method}{' dual' if form == 'dual' else ''}", "estimator": estimator, "n": n, "p": p,
      "seconds": samples, "callsPerSample": k,
      "coefficients": beta if beta is not None else [],
      "objective": float(res.fun) if res.status == 0 and form == "primal" else (float(-res.fun) if res.status == 0 else None),
      "status": "ok" if res.status == 0 else f"linprog status {res.status}: {res.message}",
      "iterations": int(getattr(res, "nit", 0) or 0),
      "settings": f"linprog(method='{method}'), {form} form, default tolerances", "versions": v})
