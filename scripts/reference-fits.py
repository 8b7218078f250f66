#!/usr/bin/python3
"""Reference fits for the arcfield fit layer, from tools outside the project.

Run through scripts/gen-fit-fixtures.sh (it calls this file twice, with R in between):

  /usr/bin/python3 scripts/reference-fits.py datasets OUT_DIR
      writes the seeded, invented datasets as CSV (OUT_DIR/datasets/<id>.csv) and an index
  /usr/bin/python3 scripts/reference-fits.py fits OUT_DIR R_RESULTS_CSV
      fits every dataset with numpy / scipy / statsmodels, merges the R results
      (quantreg, MASS, lm, pchisq) and writes one JSON fixture per estimator

Convention (the same as src/fit/types.ts): weights w = 1/sigma^2 and every tool is given the
whitened problem, row i of X and y_i multiplied by sqrt(w_i). Least squares then minimises
sum w r^2, L1 sum sqrt(w)|r|, minimax max sqrt(w)|r|, and the M-estimators apply rho to
sqrt(w) r / s. Residuals in the fixtures are raw (unwhitened) y - X b.

The data are invented: degree-length-like readings y = 110574 + 1120 x (+ 9.3 x^2) + noise with
x = sin^2(phi), phi drawn from invented campaign latitude bands, plus a few gross outliers.
"""
import csv
import json
import math
import os
import sys

import numpy as np
import scipy
import scipy.optimize
import scipy.stats
import statsmodels
import statsmodels.api as sm

COMMAND = 'bash scripts/gen-fit-fixtures.sh'
# 1/Phi^-1(3/4): the MAD consistency factor at the normal (check-values.md: 1.4826).
MAD_FACTOR = 1.0 / scipy.stats.norm.ppf(0.75)
HUBER_K = 1.345
TUKEY_C = 4.685


def degree_data(rng, n, lat_lo, lat_hi, quad, sigma, outliers, weighted):
    """Invented degree-length readings; returns (X rows, y, w, outlier rows)."""
    phi = np.sort(rng.uniform(lat_lo, lat_hi, n))
    x = np.sin(np.radians(phi)) ** 2
    truth = 110574.0 + 1120.0 * x + 9.3 * x * x
    if weighted:
        sig = np.round(rng.uniform(sigma[0], sigma[1], n), 1)
    else:
        sig = np.full(n, float(sigma))
    y = truth + rng.normal(0.0, 1.0, n) * sig
    bad = sorted(rng.choice(n, size=outliers, replace=False).tolist()) if outliers else []
    for i in bad:
        y[i] += rng.choice([-1.0, 1.0]) * rng.uniform(60.0, 200.0)
    y = np.round(y, 3)
    cols = [np.ones(n), x] + ([x * x] if quad else [])
    X = np.column_stack(cols)
    w = 1.0 / sig ** 2 if weighted else np.ones(n)
    return X, y, w, bad


def make_datasets():
    """Every dataset: id, description, seed and the generated arrays."""
    specs = [
        # id, seed, n, lat band, quadratic column, sigma, outliers, weighted, description
        ('degree-clean-n12', 101, 12, (5, 65), False, 3.0, 0, False, 'p=2, no outliers'),
        ('degree-outliers-n40', 102, 40, (0, 70), False, 4.0, 4, False, 'p=2, 4 gross outliers'),
        ('degree-weighted-n30', 103, 30, (10, 60), False, (1.0, 15.0), 3, True, 'p=2, sigma 1-15, 3 outliers'),
        ('degree2-outliers-n60', 104, 60, (0, 80), True, 2.0, 5, False, 'p=3 (1, x, x^2), 5 outliers'),
        ('degree2-weighted-n500', 105, 500, (0, 85), True, (0.5, 8.0), 15, True, 'p=3 weighted, 15 outliers'),
        ('degree-large-n2000', 106, 2000, (0, 90), False, 5.0, 40, False, 'p=2, 2% outliers'),
        ('degree-small-n5', 107, 5, (20, 50), False, 3.0, 1, False, 'p=2, n=5, one outlier'),
        ('degree-clustered-n50', 108, 50, (39.0, 39.2), False, 0.5, 2, False, 'p=2, latitudes within 0.2 deg (ill-conditioned)'),
    ]
    out = []
    for (did, seed, n, band, quad, sigma, nbad, weighted, desc) in specs:
        rng = np.random.default_rng(seed)
        X, y, w, bad = degree_data(rng, n, band[0], band[1], quad, sigma, nbad, weighted)
        out.append(dict(id=did, seed=seed, description=desc, X=X, y=y, w=w, outliers=bad, edge=False))
    # Edge cases: statuses, not numbers (robust references are skipped for them).
    x2 = np.sin(np.radians(np.array([12.5, 47.25]))) ** 2
    out.append(dict(id='edge-exact-n2', seed=0, description='n = p = 2: an exact fit, no redundancy',
                    X=np.column_stack([np.ones(2), x2]), y=np.array([110587.125, 110880.5]),
                    w=np.ones(2), outliers=[], edge=True))
    x6 = np.full(6, math.sin(math.radians(33.0)) ** 2)
    out.append(dict(id='edge-one-latitude-n6', seed=0, description='every reading at one latitude: rank deficient',
                    X=np.column_stack([np.ones(6), x6]),
                    y=np.array([110909.5, 110911.25, 110907.75, 110910.0, 110912.5, 110908.25]),
                    w=np.ones(6), outliers=[], edge=True))
    out.append(dict(id='edge-too-few-n1', seed=0, description='n = 1 < p = 2',
                    X=np.array([[1.0, 0.25]]), y=np.array([110854.0]), w=np.ones(1), outliers=[], edge=True))
    return out


def chi_square_points():
    """(statistic, dof) pairs for the chi-square test: quantiles from the centre to far tails."""
    pts = []
    for dof in (1, 2, 3, 5, 10, 37, 100, 498, 1998, 10000):
        xs = [float(scipy.stats.chi2.ppf(q, dof)) for q in (1e-6, 0.001, 0.05, 0.5, 0.95, 0.999)]
        xs += [float(scipy.stats.chi2.isf(q, dof)) for q in (1e-12, 1e-30)]
        xs += [0.5 * dof, 2.0 * dof + 1.0]
        pts += [(x, dof) for x in xs]
    return pts


def fmt(v):
    return repr(float(v))


def write_datasets(out_dir):
    ddir = os.path.join(out_dir, 'datasets')
    os.makedirs(ddir, exist_ok=True)
    index = []
    for d in make_datasets():
        n, p = d['X'].shape
        path = os.path.join(ddir, d['id'] + '.csv')
        with open(path, 'w', newline='') as f:
            wr = csv.writer(f, lineterminator='\n')
            wr.writerow([f'x{j}' for j in range(p)] + ['y', 'w'])
            for i in range(n):
                wr.writerow([fmt(v) for v in d['X'][i]] + [fmt(d['y'][i]), fmt(d['w'][i])])
        index.append(dict(id=d['id'], n=n, p=p, seed=d['seed'], description=d['description'],
                          weighted=bool(np.any(d['w'] != 1.0)), edge=d['edge'],
                          outlierRows=d['outliers'], csv=f'datasets/{d["id"]}.csv'))
    with open(os.path.join(ddir, 'chi-square-points.csv'), 'w', newline='') as f:
        wr = csv.writer(f, lineterminator='\n')
        wr.writerow(['statistic', 'dof'])
        for x, dof in chi_square_points():
            wr.writerow([fmt(x), dof])
    doc = dict(generatedBy=COMMAND, note='Invented data (seeded numpy default_rng); columns x0..x{p-1}, y, w = 1/sigma^2.',
               datasets=index)
    with open(os.path.join(out_dir, 'datasets.json'), 'w') as f:
        json.dump(doc, f, indent=1)
        f.write('\n')


def read_dataset(out_dir, entry):
    with open(os.path.join(out_dir, entry['csv'])) as f:
        rows = list(csv.reader(f))
    data = np.array([[float(v) for v in r] for r in rows[1:]])
    p = entry['p']
    return data[:, :p], data[:, p], data[:, p + 1]


def lst(a):
    return [float(v) for v in np.asarray(a).ravel()]


def l1_highs(Xw, yw):
    """min sum |yw - Xw b| as an LP: Xw b + u - v = yw, u, v >= 0 (dual simplex, a vertex)."""
    n, p = Xw.shape
    c = np.concatenate([np.zeros(p), np.ones(2 * n)])
    A = np.hstack([Xw, np.eye(n), -np.eye(n)])
    bounds = [(None, None)] * p + [(0, None)] * (2 * n)
    res = scipy.optimize.linprog(c, A_eq=A, b_eq=yw, bounds=bounds, method='highs-ds',
                                 options=dict(primal_feasibility_tolerance=1e-10, dual_feasibility_tolerance=1e-10))
    b = res.x[:p]
    r = yw - Xw @ b
    tol = 1e-9 * max(1.0, float(np.max(np.abs(yw))))
    return dict(status=res.message, coefficients=lst(b), objective=float(np.sum(np.abs(r))),
                lpObjective=float(res.fun), interpolatedRows=[int(i) for i in np.nonzero(np.abs(r) <= tol)[0]])


def linf_highs(Xw, yw):
    """min t subject to -t <= yw - Xw b <= t (dual simplex, a vertex)."""
    n, p = Xw.shape
    c = np.concatenate([np.zeros(p), [1.0]])
    A = np.vstack([np.hstack([-Xw, -np.ones((n, 1))]), np.hstack([Xw, -np.ones((n, 1))])])
    rhs = np.concatenate([-yw, yw])
    bounds = [(None, None)] * p + [(0, None)]
    res = scipy.optimize.linprog(c, A_ub=A, b_ub=rhs, bounds=bounds, method='highs-ds',
                                 options=dict(primal_feasibility_tolerance=1e-10, dual_feasibility_tolerance=1e-10))
    b = res.x[:p]
    r = yw - Xw @ b
    t = float(np.max(np.abs(r)))
    return dict(status=res.message, coefficients=lst(b), objective=t, lpObjective=float(res.fun),
                extremalRows=[int(i) for i in np.nonzero(np.abs(r) >= t * (1 - 1e-9))[0]])


def mad_scale(r):
    """Our documented rule: 1/Phi^-1(3/4) * median |r - median r| (numpy, not project code)."""
    return float(MAD_FACTOR * np.median(np.abs(r - np.median(r))))


def rlm_fixed_scale(Xw, yw, norm, start, scale):
    """statsmodels RLM with the scale held fixed (init skips its own estimate; update_scale=False)."""
    model = sm.RLM(yw, Xw, M=norm)
    model.scale = scale
    tol = 1e-13 * float(np.max(np.abs(start)))
    res = model.fit(maxiter=5000, tol=tol, init='fixed-scale', update_scale=False, conv='coefs',
                    start_params=np.asarray(start), cov='H1')
    resid = yw - Xw @ res.params
    u = resid / scale
    # statsmodels 0.13's TukeyBiweight.rho is the textbook rho minus c^2/6 (rho(0) = -c^2/6):
    # subtracting rho(0) gives the textbook objective (rho(0) = 0) for either convention.
    rho0 = float(norm.rho(np.zeros(1))[0])
    return dict(coefficients=lst(res.params), scale=float(res.scale), iterations=int(res.fit_history['iteration']),
                covarianceH1=lst(res.bcov_scaled), objective=float(np.sum(norm.rho(u) - rho0)),
                weights=lst(norm.weights(u)))


def read_r_results(path):
    """Long-format CSV from reference-fits.R: dataset,method,field,index,value (NA = not defined)."""
    out = {}
    with open(path) as f:
        for row in csv.DictReader(f):
            d = out.setdefault(row['dataset'], {}).setdefault(row['method'], {})
            v = row['value']
            if v in ('NA', 'NaN'):
                val = None
            else:
                try:
                    val = v if row['dataset'] == '_session' else float(v)
                except ValueError:
                    val = v
            d.setdefault(row['field'], []).append((int(row['index']), val))
    for meth in out.values():
        for fields in meth.values():
            for k, pairs in list(fields.items()):
                pairs.sort()
                vals = [v for _, v in pairs]
                fields[k] = vals[0] if pairs[0][0] == 0 and len(vals) == 1 else vals
    return out


def write_json(out_dir, name, doc):
    with open(os.path.join(out_dir, name), 'w') as f:
        json.dump(doc, f, indent=1, allow_nan=False)
        f.write('\n')


def fits(out_dir, r_path):
    with open(os.path.join(out_dir, 'datasets.json')) as f:
        index = json.load(f)['datasets']
    rres = read_r_results(r_path)
    rinfo = rres.pop('_session', {}).get('versions', {})
    tools = dict(python=sys.version.split()[0], numpy=np.__version__, scipy=scipy.__version__,
                 statsmodels=statsmodels.__version__, R=rinfo.get('R'), quantreg=rinfo.get('quantreg'),
                 MASS=rinfo.get('MASS'))
    head = dict(generatedBy=COMMAND, scripts=['scripts/gen-fit-fixtures.sh', 'scripts/reference-fits.py', 'scripts/reference-fits.R'],
                tools=tools, datasets='test/fixtures/fit/datasets.json',
                convention='weights w = 1/sigma^2; every tool fitted the whitened problem sqrt(w) X, sqrt(w) y; '
                           'coefficients in the units of the raw problem; objectives on the whitened problem')
    ls_cases, l1_cases, linf_cases, hub_cases, tuk_cases = [], [], [], [], []
    for e in index:
        X, y, w = read_dataset(out_dir, e)
        sw = np.sqrt(w)
        Xw, yw = X * sw[:, None], y * sw
        n, p = X.shape
        R = rres.get(e['id'], {})
        b, _, rank, sv = np.linalg.lstsq(Xw, yw, rcond=None)
        ls = dict(dataset=e['id'], n=n, p=p, numpy=dict(rank=int(rank), singularValues=lst(sv)))
        if rank == p and n >= p:
            r = yw - Xw @ b
            obj = float(r @ r)
            ls['numpy'].update(coefficients=lst(b), objective=obj)
            if n > p:
                s2 = obj / (n - p)
                ls['numpy'].update(sigma0=math.sqrt(s2), covariance=lst(s2 * np.linalg.inv(Xw.T @ Xw)))
        ls['r'] = R.get('lm')
        ls_cases.append(ls)
        if e['edge']:
            continue
        l1 = l1_highs(Xw, yw)
        l1_cases.append(dict(dataset=e['id'], n=n, p=p, highs=l1, quantreg=R.get('rq')))
        linf_cases.append(dict(dataset=e['id'], n=n, p=p, highs=linf_highs(Xw, yw)))
        start = np.array(l1['coefficients'])
        s = mad_scale(yw - Xw @ start)
        hub_cases.append(dict(dataset=e['id'], n=n, p=p, start=dict(coefficients=l1['coefficients'], scale=s),
                              statsmodels=rlm_fixed_scale(Xw, yw, sm.robust.norms.HuberT(t=HUBER_K), start, s),
                              mass=R.get('rlm-huber')))
        tuk_cases.append(dict(dataset=e['id'], n=n, p=p, start=dict(coefficients=l1['coefficients'], scale=s),
                              statsmodels=rlm_fixed_scale(Xw, yw, sm.robust.norms.TukeyBiweight(c=TUKEY_C), start, s),
                              mass=R.get('rlm-bisquare'), massMM=R.get('rlm-mm')))
    write_json(out_dir, 'least-squares.json', dict(head, estimator='least-squares',
               fields='numpy: np.linalg.lstsq; r: lm(yw ~ Xw - 1), hatvalues, rstandard', cases=ls_cases))
    write_json(out_dir, 'least-absolute.json', dict(head, estimator='least-absolute',
               fields='highs: scipy linprog(method="highs-ds") on the L1 LP; quantreg: rq(yw ~ Xw - 1, tau = 0.5, method = "br"); '
                      'objective = sum |yw - Xw b|; interpolatedRows: rows with |whitened residual| <= 1e-9 max(1, max|yw|) (0-based)',
               cases=l1_cases))
    write_json(out_dir, 'minimax.json', dict(head, estimator='minimax',
               fields='highs: scipy linprog(method="highs-ds") on min t, -t <= yw - Xw b <= t; objective = max |yw - Xw b|; '
                      'extremalRows: rows with |whitened residual| >= (1 - 1e-9) objective (0-based)',
               cases=linf_cases))
    mnote = ('statsmodels: RLM(yw, Xw, M).fit(start_params = L1 start (HiGHS), scale held fixed at start.scale = '
             '1/Phi^-1(3/4) median|r - median r| of the start\'s whitened residuals, update_scale=False, conv="coefs", '
             'tol = 1e-13 max|start|, cov="H1"); objective = sum rho(r/s) with rho(0) = 0; weights = psi(u)/u at the end. mass: MASS::rlm(Xw, yw, init = quantreg L1, '
             'maxit = 1000, acc = 1e-12) with its own default scale rule (re-estimated every iteration as median|r|/0.6745); '
             'its result is the fixed-scale M-estimate at its final scale "scale"')
    write_json(out_dir, 'huber.json', dict(head, estimator='huber', tuning=HUBER_K, fields=mnote, cases=hub_cases))
    write_json(out_dir, 'tukey.json', dict(head, estimator='tukey', tuning=TUKEY_C,
               fields=mnote + '; massMM: MASS::rlm(method = "MM") (scale fixed at the S-estimate, start = the S-estimate '
                              '"start" from lqs with the same seed)', cases=tuk_cases))
    grid = []
    for x, dof in chi_square_points():
        grid.append(dict(statistic=x, dof=dof, upper=float(scipy.stats.chi2.sf(x, dof)),
                         lower=float(scipy.stats.chi2.cdf(x, dof))))
    rchi = rres.get('chisq', {}).get('pchisq', {})
    write_json(out_dir, 'chi-square.json', dict(head, what='scipy.stats.chi2.sf / .cdf; R pchisq(lower.tail = FALSE) for the same points',
               madFactor=float(MAD_FACTOR), points=grid,
               rUpper=rchi.get('upper'), rStatistic=rchi.get('statistic'), rDof=rchi.get('dof')))


def main():
    if len(sys.argv) >= 3 and sys.argv[1] == 'datasets':
        write_datasets(sys.argv[2])
    elif len(sys.argv) >= 4 and sys.argv[1] == 'fits':
        fits(sys.argv[2], sys.argv[3])
    else:
        sys.exit('usage: reference-fits.py datasets OUT_DIR | fits OUT_DIR R_RESULTS_CSV')


if __name__ == '__main__':
    main()
