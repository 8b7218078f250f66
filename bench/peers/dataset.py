"""Shared helpers for the Python peers: read the arcfield bench dataset, build the design matrix,
time a fit in-process by the harness's protocol, and print one JSON line.

File layout (see bench/harness/dataset-file.ts): 8-byte magic "ARCBNCH1", uint32 LE header length H,
4 zero bytes, H bytes of JSON header, then n float64 LE x values and n float64 LE y values.

Timing protocol (identical in bench/harness/timing.ts and bench/peers/dataset.R): one first call;
if it took more than LONG_RUN_SECONDS it is the only sample; otherwise warm-up calls until
WARMUP_SECONDS have been spent and MIN_WARMUP_CALLS made (the first included), or until
WARMUP_CAP_SECONDS, whichever comes first (at least one after the first; the reason is in timing.ts),
c = the fastest warm-up call, k = ceil(min_sample / c) calls per sample so a sample is long
enough for the clock, and clamp(floor(budget / (c * k)), MIN_REPEATS, max_repeats) samples; the
median is reported.
"""
import json
import math
import statistics
import struct
import sys
import time

import numpy as np

MAGIC = b"ARCBNCH1"
LONG_RUN_SECONDS = 10  # keep equal to bench/harness/timing.ts
MIN_REPEATS = 3
WARMUP_SECONDS = 1  # keep equal to bench/harness/timing.ts
MIN_WARMUP_CALLS = 20  # keep equal to bench/harness/timing.ts
WARMUP_CAP_SECONDS = 6  # keep equal to bench/harness/timing.ts


def read_dataset(path):
    with open(path, "rb") as f:
        prefix = f.read(16)
        if prefix[:8] != MAGIC:
            raise ValueError(f"{path}: magic {prefix[:8]!r}, expected {MAGIC!r}")
        (length,) = struct.unpack("<I", prefix[8:12])
        header = json.loads(f.read(length).decode("utf-8"))
        n = header["n"]
        data = np.fromfile(f, dtype="<f8", count=2 * n)
    if data.size != 2 * n:
        raise ValueError(f"{path}: truncated, {data.size} of {2 * n} values")
    return header, data[:n].copy(), data[n:].copy()


def design(x, p):
    cols = [np.ones_like(x), x]
    if p == 3:
        cols.append(x * x)
    return np.column_stack(cols)


def time_fit(fit, budget, max_repeats, min_sample):
    """Runs fit() by the shared protocol; returns (last result, sample seconds, calls per sample)."""
    t0 = time.perf_counter()
    result = fit()
    first = time.perf_counter() - t0
    if first > LONG_RUN_SECONDS:
        return result, [first], 1
    spent = first
    fastest = first
    calls = 1
    while True:
        t0 = time.perf_counter()
        result = fit()
        d = time.perf_counter() - t0
        spent += d
        fastest = min(fastest, d)
        calls += 1
        if (spent >= WARMUP_SECONDS and calls >= MIN_WARMUP_CALLS) or spent >= WARMUP_CAP_SECONDS:
            break
    calibration = max(fastest, 1e-9)
    k = max(1, math.ceil(min_sample / calibration))
    repeats = max(min(MIN_REPEATS, max_repeats), min(max_repeats, math.floor(budget / (calibration * k))))
    samples = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        for _ in range(k):
            result = fit()
        samples.append((time.perf_counter() - t0) / k)
    return result, samples, k


def parse_args(argv, names):
    """--key value pairs; every name in `names` is required."""
    args = {}
    it = iter(argv)
    for token in it:
        if not token.startswith("--"):
            raise SystemExit(f"unexpected argument {token!r}")
        args[token[2:]] = next(it, "")
    missing = [k for k in names if k not in args]
    if missing:
        raise SystemExit(f"missing --{', --'.join(missing)}")
    return args


def emit(record):
    """One JSON line on stdout; floats as repr (shortest round-trip) so no digit is lost."""
    def clean(v):
        if isinstance(v, (np.floating, float)):
            v = float(v)
            return v if math.isfinite(v) else None
        if isinstance(v, (np.integer,)):
            return int(v)
        if isinstance(v, np.ndarray):
            return [clean(e) for e in v.tolist()]
        if isinstance(v, (list, tuple)):
            return [clean(e) for e in v]
        if isinstance(v, dict):
            return {k: clean(e) for k, e in v.items()}
        return v

    sys.stdout.write(json.dumps(clean(record)) + "\n")
    sys.stdout.flush()


def versions():
    import platform
    out = {"python": platform.python_version(), "numpy": np.__version__}
    return out


def summary(samples):
    return {"seconds": samples, "medianSeconds": statistics.median(samples)}
