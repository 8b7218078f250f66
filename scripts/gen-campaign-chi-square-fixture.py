#!/usr/bin/python3
"""Reference values of the chi-square upper tail for src/campaign/chi-square.ts, from scipy.

Run: /usr/bin/python3 scripts/gen-campaign-chi-square-fixture.py
Writes test/fixtures/campaign/chi-square-scipy.json (scipy.stats.chi2.sf, scipy.special.gammaln).
"""
import json
import pathlib

import scipy
from scipy import special, stats

cases = []
for dof in (1, 2, 3, 5, 9, 10, 17, 40, 120):
    for x in (0.01, 0.5, 1.0, 2.5, 7.3, 9.0, 16.9, 30.0, 55.5, 150.0):
        cases.append({"x": x, "dof": dof, "sf": float(stats.chi2.sf(x, dof))})
gammaln = [{"x": x, "lgamma": float(special.gammaln(x))} for x in (0.3, 0.5, 1.0, 1.5, 4.5, 10.0, 60.0)]
out = {"source": f"scipy {scipy.__version__}: scipy.stats.chi2.sf and scipy.special.gammaln",
       "chiSquareSf": cases, "logGamma": gammaln}
path = pathlib.Path(__file__).resolve().parent.parent / "test" / "fixtures" / "campaign" / "chi-square-scipy.json"
path.write_text(json.dumps(out, indent=1) + "\n")
print(f"wrote {path} ({len(cases)} cases)")
