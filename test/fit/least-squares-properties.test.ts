// Seeded properties of least squares (style.md §11): residuals orthogonal to the weighted design
// (the normal equations, Gauss), permutation invariance, and the normal-equation route agreeing with
// Householder QR. Replay with ARCFIELD_SEED; widen with ARCFIELD_RUNS.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { fitLeastSquares } from '../../src/fit/least-squares.ts';
import { createProblem } from '../../src/fit/problem.ts';
import { within } from '../helpers/within.ts';

const seed = Number(process.env.ARCFIELD_SEED ?? 20260603);
/**
 * Agreement between orderings / routes, in standard errors: rounding the readings (1.1e5 m/deg)
 * at ε is ε·|y|/σ ≈ 5e-11 of a standard error for σ down to 0.5 m/deg, times the design's
 * condition (≲ 20 with the anchors below); 1e-9 covers it.
 */
const ROUNDING_TOL = 1e-9;
const numRuns = Number(process.env.ARCFIELD_RUNS ?? 100);

/**
 * Invented degree-length readings: latitudes in 0–85°, sigmas 0.5–20 m/deg, y ≈ 110574 + 1120 sin²φ.
 * Three anchor readings (10°, 45°, 80°, with noise) keep the design well conditioned and the noise
 * non-zero: on a near-singular design any solver's coefficients move by cond·ε·|y| between
 * orderings, which is rounding of the data, not a property of the solver.
 */
type Row = { latDeg: number; noise: number; sigma: number };
const ANCHORS: Row[] = [{ latDeg: 10, noise: 2, sigma: 2 }, { latDeg: 45, noise: -3, sigma: 2 }, { latDeg: 80, noise: 1.5, sigma: 2 }];
const arcSet = fc.record({
  p: fc.constantFrom(2, 3),
  rows: fc.array(fc.record({
    latDeg: fc.double({ min: 0, max: 85, noNaN: true }),
    noise: fc.double({ min: -30, max: 30, noNaN: true }),
    sigma: fc.double({ min: 0.5, max: 20, noNaN: true }),
  }), { minLength: 3, maxLength: 60 }),
}).map(({ p, rows }) => ({ p, rows: [...rows, ...ANCHORS] }));

function build(p: number, rows: Row[]) {
  const X = rows.map((r) => {
    const x = Math.sin((r.latDeg * Math.PI) / 180) ** 2;
    return p === 2 ? [1, x] : [1, x, x * x];
  });
  const y = rows.map((r, i) => 110574 + 1120 * X[i][1] + r.noise);
  return createProblem(X, y, rows.map((r) => 1 / (r.sigma * r.sigma)));
}

describe(`least-squares properties (seed ${seed})`, () => {
  it('Σ wᵢ rᵢ xᵢⱼ = 0 for every column, relative to Σ wᵢ |yᵢ xᵢⱼ| (normal equations)', () => {
    console.log(`least-squares properties: seed ${seed} (replay with ARCFIELD_SEED=${seed})`);
    fc.assert(fc.property(arcSet, ({ p, rows }) => {
      const problem = build(p, rows);
      const fit = fitLeastSquares(problem);
      expect(fit.status).toBe('ok');
      for (let j = 0; j < p; j++) {
        let s = 0;
        let a = 0;
        for (let i = 0; i < problem.n; i++) {
          const wx = problem.weights![i] * problem.X[i * p + j];
          s += wx * fit.residuals[i];
          a += Math.abs(wx * problem.y[i]);
        }
        within(s / a, 0, 1e-14, '', `orthogonality of column ${j}`, { source: 'normal equations XᵀW(y − Xβ) = 0' });
      }
    }), { seed, numRuns });
  });

  it('reordering the readings changes nothing beyond rounding', () => {
    fc.assert(fc.property(arcSet, fc.infiniteStream(fc.nat()), ({ p, rows }, keys) => {
      const it = keys[Symbol.iterator]();
      const order = rows.map((r, i) => ({ r, i, k: it.next().value as number })).sort((a, b) => a.k - b.k);
      const a = fitLeastSquares(build(p, rows));
      const b = fitLeastSquares(build(p, order.map((o) => o.r)));
      for (let j = 0; j < p; j++) {
        const size = Math.max(Math.abs(a.coefficients[j]), Math.sqrt(a.covariance![j * p + j]));
        within(b.coefficients[j] / size, a.coefficients[j] / size, ROUNDING_TOL, '', `β${j} after permutation`, { source: 'the same data in another order' });
      }
      order.forEach((o, m) => within(b.residuals[m], a.residuals[o.i], 1e-7, 'm/deg', `residual of reading ${o.i}`, { source: 'the same reading before reordering' }));
    }), { seed: seed + 1, numRuns });
  });

  it('the normal-equation route matches Householder QR', () => {
    fc.assert(fc.property(arcSet, ({ p, rows }) => {
      const problem = build(p, rows);
      const qr = fitLeastSquares(problem, { method: 'qr' });
      const ne = fitLeastSquares(problem, { method: 'normal' });
      for (let j = 0; j < p; j++) {
        const size = Math.max(Math.abs(qr.coefficients[j]), Math.sqrt(qr.covariance![j * p + j]));
        within(ne.coefficients[j] / size, qr.coefficients[j] / size, ROUNDING_TOL, '', `β${j}`, { source: 'Householder QR (ml-matrix) on the same data' });
      }
    }), { seed: seed + 2, numRuns });
  });
});
