"""Peer: statsmodels QuantReg (q = 0.5; iteratively reweighted least squares, max_iter = 1000,
p_tol = 1e-6 defaults, so not an exact LP optimum) and RLM with HuberT(t = 1.345) or
TukeyBiweight(c = 4.685), least squares start, scale re-estimated each iteration by MAD about 0
(statsmodels' scale_est='mad' default), conv='dev', tol = 1e-8, maxiter = 50 (defaults).
Usage: python3 bench/peers/statsmodels-fits.py --data FILE --model quantreg|rlm-huber|rlm-bisquare
       --budget S --max-repeats K --min-sample S"""
import sys
import warnings

import statsmodels
import statsmodels.api as sm

from dataset import design, emit, parse_args, read_dataset, time_fit, versions

args = parse_args(sys.argv[1:], ["data", "model", "budget", "max-repeats", "min-sample"])
header, x, y = read_dataset(args["data"])
p = header["p"]
X = design(x, p)
model = args["model"]
warnings.simplefilter("ignore")  # IterationLimitWarning is reported through "converged" below

if model == "quantreg":
    fit = lambda: sm.QuantReg(y, X).fit(q=0.5)
    estimator, settings = "least-absolute", "QuantReg(y, X).fit(q=0.5), max_iter=1000, p_tol=1e-6 (defaults)"
elif model == "rlm-huber":
    fit = lambda: sm.RLM(y, X, M=sm.robust.norms.HuberT(t=1.345)).fit()
    estimator, settings = "huber", "RLM(M=HuberT(t=1.345)).fit(), scale_est='mad', maxiter=50, tol=1e-8 (defaults)"
elif model == "rlm-bisquare":
    fit = lambda: sm.RLM(y, X, M=sm.robust.norms.TukeyBiweight(c=4.685)).fit()
    estimator, settings = "tukey", "RLM(M=TukeyBiweight(c=4.685)).fit(), scale_est='mad', maxiter=50, tol=1e-8 (defaults)"
else:
    raise SystemExit(f"--model {model}: expected quantreg, rlm-huber or rlm-bisquare")

res, samples, k = time_fit(fit, float(args["budget"]), int(args["max-repeats"]), float(args["min-sample"]))
v = versions()
v["statsmodels"] = statsmodels.__version__
iterations = None
converged = None
if model == "quantreg":
    iterations = int(res.iterations) if hasattr(res, "iterations") else None
    converged = iterations is not None and iterations < 1000
else:
    iterations = int(res.fit_history["iteration"]) if "iteration" in res.fit_history else None
    converged = iterations is not None and iterations < 50
emit({"peer": f"statsmodels {'QuantReg' if model == 'quantreg' else 'RLM ' + model[4:]}", "estimator": estimator,
      "n": int(header["n"]), "p": p, "seconds": samples, "callsPerSample": k,
      "coefficients": res.params, "scale": float(res.scale) if model != "quantreg" else None,
      "iterations": iterations, "converged": converged, "status": "ok",
      "settings": settings, "versions": v})
