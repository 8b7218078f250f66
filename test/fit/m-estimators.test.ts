// Huber and Tukey biweight against statsmodels RLM and MASS::rlm (test/fixtures/fit/huber.json,
// tukey.json, made by scripts/gen-fit-fixtures.sh) with the same tuning and the scale rule each
// reference used:
// - statsmodels: scale held fixed at (1/Φ⁻¹(3/4))·median|r − median r| of the L1 start's whitened
//   residuals (the start from scipy HiGHS) — our default rule, so the cold fit is compared as is;
// - MASS::rlm: its own rule (median|r|/0.6745 re-estimated each iteration); its coefficients are the
//   fixed-scale estimate at its final scale, so we fit with options.scale = that scale;
// - MASS::rlm(method = "MM"): bisquare with the scale fixed at the S-estimate, from the S start.
// Then Huber with huge k = least squares, warm starts counted in iterations, statuses.
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { fitHuber } from '../../src/fit/huber.ts';
import { fitLeastSquares } from '../../src/fit/least-squares.ts';
import { createProblem } from '../../src/fit/problem.ts';
import { fitTukey } from '../../src/fit/tukey.ts';
import type { FitOptions, FitResult, LinearProblem } from '../../src/fit/types.ts';
import { within } from '../helpers/within.ts';
import { FIXTURE_SOURCE, loadProblem, readJson, type FixtureFile, type MEstimatorCase } from './fixtures.ts';

type Fitter = (problem: LinearProblem, options?: FitOptions) => FitResult;
const ESTIMATORS: [string, Fitter][] = [['huber', fitHuber], ['tukey', fitTukey]];

/** 1e-8 relative to max(|βⱼ|, its standard error) — the agreement the task asks of the M-estimators. */
function expectClose(fit: FitResult, expected: number[], source: string, tol = 1e-8): void {
  const p = expected.length;
  expected.forEach((b, j) => {
    const se = fit.covariance ? Math.sqrt(fit.covariance[j * p + j]) : 0;
    const size = Math.max(Math.abs(b), se);
    within(fit.coefficients[j] / size, b / size, tol, '(relative)', `β${j}`, { source });
  });
}

for (const [name, fitter] of ESTIMATORS) {
  const fixture = readJson<FixtureFile<MEstimatorCase>>(`${name}.json`);
  const SM = `statsmodels ${fixture.tools.statsmodels} RLM (${FIXTURE_SOURCE})`;
  const MASS = `MASS ${fixture.tools.MASS} rlm (${FIXTURE_SOURCE})`;

  describe(`${name} against statsmodels (fixed MAD scale of the L1 start)`, () => {
    for (const c of fixture.cases) {
      it(`${c.dataset}: cold start (our L1 start and MAD scale)`, () => {
        const problem = loadProblem(c.dataset);
        const fit = fitter(problem);
        expect(fit.status).toBe('ok');
        expect(fit.converged).toBe(true);
        expect(fit.reason).toMatch(/least-absolute-deviations fit/);
        within(fit.scale, c.start.scale, 1e-9, '', 'MAD scale of the start', { relative: true, source: `numpy median of the HiGHS L1 residuals (${FIXTURE_SOURCE})` });
        expectClose(fit, c.statsmodels.coefficients, SM);
        within(fit.objective, c.statsmodels.objective, 1e-8, '', 'Σρ(u)', { relative: true, source: SM });
        const p = c.p;
        for (let k = 0; k < p * p; k++) {
          within(fit.covariance![k], c.statsmodels.covarianceH1[k], 1e-7, '', `H1 covariance[${k}]`, { relative: true, source: SM });
        }
        c.statsmodels.weights.forEach((w, i) => within(fit.robustWeights![i], w, 1e-8, '', `robust weight ${i}`, { source: SM }));
        // The covariance is computed when first read; a copy (as sent to a worker) carries it.
        expect(structuredClone(fit).covariance).toEqual(fit.covariance);
        expect(fit.covariance).toBe(fit.covariance);
      });
      it(`${c.dataset}: from the reference start (isolates IRLS from the L1 solver)`, () => {
        const fit = fitter(loadProblem(c.dataset), { warmStart: { coefficients: Float64Array.from(c.start.coefficients) } });
        // A residual of ~1 m/deg from readings of 1.1e5 keeps ~11 digits: ε·|y|/|r| ≈ 3e-11.
        within(fit.scale, c.start.scale, 1e-10, '', 'MAD scale', { relative: true, source: `numpy median of the reference start's residuals (${FIXTURE_SOURCE})` });
        expectClose(fit, c.statsmodels.coefficients, SM);
      });
    }
  });

  describe(`${name} against MASS::rlm at its final scale`, () => {
    for (const c of fixture.cases) {
      it(c.dataset, () => {
        const fit = fitter(loadProblem(c.dataset), { scale: c.mass.scale, warmStart: { coefficients: Float64Array.from(c.start.coefficients) } });
        expect(fit.scale).toBe(c.mass.scale);
        expectClose(fit, c.mass.coefficients, `${MASS}; converged = ${c.mass.converged}`);
      });
    }
    if (name === 'tukey') {
      for (const c of fixture.cases.filter((k) => k.massMM)) {
        it(`${c.dataset}: MM (scale fixed at the S-estimate, S start)`, () => {
          const mm = c.massMM!;
          const fit = fitter(loadProblem(c.dataset), { scale: mm.startScale, warmStart: { coefficients: Float64Array.from(mm.start) } });
          expectClose(fit, mm.coefficients, `${MASS} method = "MM"`);
        });
      }
    }
  });
}

describe('Huber limits and properties', () => {
  it('with k = 1e12 every weight is 1: Huber is least squares (numbers from fitLeastSquares only as a cross-check, the LS fit itself is tested against numpy)', () => {
    for (const id of ['degree-outliers-n40', 'degree2-weighted-n500']) {
      const problem = loadProblem(id);
      const ls = fitLeastSquares(problem);
      const hub = fitHuber(problem, { tuning: 1e12 });
      expect(Array.from(hub.robustWeights!).every((w) => w === 1)).toBe(true);
      ls.coefficients.forEach((b, j) => {
        const size = Math.max(Math.abs(b), Math.sqrt(ls.covariance![j * problem.p + j]));
        within(hub.coefficients[j] / size, b / size, 1e-10, '(relative)', `β${j}`, { source: 'least squares (numpy-checked, least-squares.test.ts)' });
      });
    }
  });

  it('reordering the readings gives the same fit', () => {
    const problem = loadProblem('degree-outliers-n40');
    const order = Array.from({ length: problem.n }, (_, i) => (i * 17) % problem.n);
    const p = problem.p;
    const shuffled: LinearProblem = {
      n: problem.n, p,
      X: Float64Array.from(order.flatMap((i) => Array.from(problem.X.subarray(i * p, i * p + p)))),
      y: Float64Array.from(order.map((i) => problem.y[i])),
    };
    for (const [name, fitter] of ESTIMATORS) {
      const a = fitter(problem);
      const b = fitter(shuffled);
      a.coefficients.forEach((v, j) => within(b.coefficients[j], v, 1e-10, '', `${name} β${j} after reordering`, { relative: true, source: 'the same data in another order' }));
    }
  });
});

describe('warm start: a refit after one more reading', () => {
  // Counted in iterations, never timed. The previous result is the start (its coefficients, and
  // the vertex of its L1 start, from which the L1 fit of the new data is re-derived): the warm
  // refit must return the cold refit's answer — same scale rule, same estimate.
  const ids = ['degree-clean-n12', 'degree-outliers-n40', 'degree-weighted-n30', 'degree2-outliers-n60', 'degree2-weighted-n500', 'degree-large-n2000'];
  for (const [name, fitter] of ESTIMATORS) {
    it(`${name}: fewer iterations than a cold refit, and the cold refit's answer`, () => {
      let warmTotal = 0;
      let coldTotal = 0;
      for (const id of ids) {
        const full = loadProblem(id);
        const n = full.n - 1;
        const p = full.p;
        const before: LinearProblem = { n, p, X: full.X.slice(0, n * p), y: full.y.slice(0, n) };
        if (full.weights) before.weights = full.weights.slice(0, n);
        const previous = fitter(before);
        const warm = fitter(full, { warmStart: previous });
        const cold = fitter(full);
        expect(warm.reason).toMatch(/from the warm start, scale from the least-absolute-deviations refit/);
        expect(previous.basis?.length).toBe(p);
        // The same exact L1 vertex of the same data, hence the same MAD up to the rounding of its
        // coefficients (the warm vertex is refined from its rows, the cold one from its own path).
        expect(Math.abs(warm.scale - cold.scale)).toBeLessThanOrEqual(1e-10 * cold.scale);
        // On a few dozen readings one more can move the L1 fit and so the scale: the previous
        // estimate is then a start near, not at, the new partition (Tukey n = 30: 7 steps vs 5).
        expect(warm.iterations).toBeLessThanOrEqual(cold.iterations + 2);
        warmTotal += warm.iterations;
        coldTotal += cold.iterations;
        expectClose(warm, Array.from(cold.coefficients), 'the cold refit', 1e-9);
        // Without the vertex the previous scale is held: the M-estimate at that scale.
        const held = fitter(full, { warmStart: { coefficients: previous.coefficients, scale: previous.scale } });
        expect(held.scale).toBe(previous.scale);
        expectClose(held, Array.from(fitter(full, { scale: previous.scale }).coefficients), 'the cold refit at the previous scale', 1e-9);
      }
      console.log(`${name} warm start: ${warmTotal} iterations in total, cold refits ${coldTotal} (plus their L1 starts)`);
      expect(warmTotal).toBeLessThan(coldTotal);
    });
  }

  it('a warm start of the wrong length is ignored, and said so', () => {
    const fit = fitHuber(loadProblem('degree-clean-n12'), { warmStart: { coefficients: new Float64Array([110574]) } });
    expect(fit.status).toBe('ok');
    expect(fit.reason).toMatch(/warm start ignored/);
  });
});

describe('M-estimator statuses and refusals', () => {
  for (const [name, fitter] of ESTIMATORS) {
    it(`${name}: n < p, one latitude, zero scale`, () => {
      expect(fitter(loadProblem('edge-too-few-n1')).status).toBe('too-few-rows');
      expect(fitter(loadProblem('edge-one-latitude-n6')).status).toBe('rank-deficient');
      // Identical repeats: the start fits every reading exactly, the scale is 0, the start is the estimate.
      const same = fitter(createProblem([[1], [1], [1], [1]], [110574.5, 110574.5, 110574.5, 110574.5]));
      expect(same.status).toBe('ok');
      expect(same.scale).toBe(0);
      expect(same.coefficients[0]).toBe(110574.5);
    });
    it(`${name}: a bad tuning or scale is refused with the field named`, () => {
      const problem = loadProblem('degree-clean-n12');
      expect(() => fitter(problem, { tuning: 0 })).toThrow(InputError);
      expect(() => fitter(problem, { scale: -1 })).toThrow(/options.scale/);
      expect(() => fitter(problem, { maxIterations: 0 })).toThrow(/options.maxIterations/);
    });
    it(`${name}: stopping at the cap is 'not-converged' with the numbers kept`, () => {
      const fit = fitter(loadProblem('degree2-outliers-n60'), { maxIterations: 1 });
      expect(fit.status).toBe('not-converged');
      expect(fit.converged).toBe(false);
      expect(fit.reason).toMatch(/did not converge in 1 iterations/);
      expect(Array.from(fit.coefficients).every(Number.isFinite)).toBe(true);
    });
  }

  it('Tukey gives zero weight to the planted gross outliers of degree-large-n2000', () => {
    const entry = readJson<{ datasets: { id: string; outlierRows: number[] }[] }>('datasets.json').datasets.find((d) => d.id === 'degree-large-n2000')!;
    const fit = fitTukey(loadProblem(entry.id));
    for (const i of entry.outlierRows) expect(fit.robustWeights![i]).toBe(0);
  });
});
