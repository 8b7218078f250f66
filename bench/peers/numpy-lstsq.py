"""Peer: least squares by numpy.linalg.lstsq (LAPACK gelsd, SVD-based), rcond=None.
Usage: python3 bench/peers/numpy-lstsq.py --data FILE --budget S --max-repeats K --min-sample S"""
import sys

import numpy as np

from dataset import design, emit, parse_args, read_dataset, time_fit, versions

args = parse_args(sys.argv[1:], ["data", "budget", "max-repeats", "min-sample"])
header, x, y = read_dataset(args["data"])
p = header["p"]
X = design(x, p)
beta, samples, k = time_fit(lambda: np.linalg.lstsq(X, y, rcond=None)[0],
                            float(args["budget"]), int(args["max-repeats"]), float(args["min-sample"]))
emit({"peer": "numpy lstsq", "estimator": "least-squares", "n": int(header["n"]), "p": p,
      "seconds": samples, "callsPerSample": k, "coefficients": beta, "status": "ok",
      "settings": "numpy.linalg.lstsq(X, y, rcond=None)", "versions": versions()})
