// Properties of the exact least-absolute-deviations fit (style.md §11), seeded: fast-check prints
// the seed and the shrunk counterexample on failure; the seed is in each test's name. Every
// optimum is checked against brute force over LP vertices or the LP optimality condition,
// computed in test/fit/least-absolute-reference.ts (not by the code under test).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { fitLeastAbsolute } from '../../src/fit/least-absolute.ts';
import type { LinearProblem } from '../../src/fit/types.ts';
import { within } from '../helpers/within.ts';
import { bruteForceL1, degreeRows, kktDual, objectiveTolerance } from './least-absolute-reference.ts';

const SEED = 20261202;
const problems = fc.record({
  seed: fc.integer({ min: 1, max: 2 ** 31 - 1 }),
  n: fc.integer({ min: 3, max: 40 }),
  p: fc.integer({ min: 2, max: 3 }),
  weighted: fc.boolean(),
});
const make = (c: { seed: number; n: number; p: number; weighted: boolean }): LinearProblem => degreeRows(Math.max(c.n, c.p), c.p, c.seed, c.weighted);

function permuted(pr: LinearProblem, seed: number, yScale = 1): LinearProblem {
  const { n, p } = pr;
  const order = Array.from({ length: n }, (_, i) => i);
  let s = seed;
  for (let i = n - 1; i > 0; i--) {
    s = (Math.imul(s, 1103515245) + 12345) >>> 0;
    const j = s % (i + 1);
    [order[i], order[j]] = [order[j], order[i]];
  }
  const X = new Float64Array(n * p);
  const y = new Float64Array(n);
  const w = new Float64Array(n);
  order.forEach((src, i) => {
    for (let j = 0; j < p; j++) X[i * p + j] = pr.X[src * p + j];
    y[i] = yScale * pr.y[src];
    w[i] = pr.weights ? pr.weights[src] : 1;
  });
  return pr.weights ? { n, p, X, y, weights: w } : { n, p, X, y };
}

describe(`fitLeastAbsolute properties (fast-check seed ${SEED})`, () => {
  it('interpolates p rows and satisfies the LP optimality condition; equals brute force', () => {
    fc.assert(fc.property(problems, (c) => {
      const pr = make(c);
      const fit = fitLeastAbsolute(pr);
      expect(fit.converged).toBe(true);
      const basis = Array.from(fit.basis ?? []);
      expect(new Set(basis).size).toBe(pr.p);
      for (const i of basis) expect(Math.abs(fit.residuals[i])).toBeLessThanOrEqual(1e-9 * Math.abs(pr.y[i]));
      expect(kktDual(pr, fit.coefficients, basis)).toBeLessThanOrEqual(1 + 1e-9);
      const bf = bruteForceL1(pr);
      within(fit.objective, bf, objectiveTolerance(pr, bf), 'm', `objective (${JSON.stringify(c)})`, { source: 'brute force over all p-row interpolants' });
    }), { seed: SEED, numRuns: 80, verbose: true });
  });

  it('is invariant to row order, and scaling y by s scales the objective by |s|', () => {
    fc.assert(fc.property(problems, fc.constantFrom(-3, 0.5, 1000), (c, s) => {
      const pr = make(c);
      const fit = fitLeastAbsolute(pr);
      const other = fitLeastAbsolute(permuted(pr, c.seed, s));
      const scaled = permuted(pr, c.seed, s);
      within(other.objective, Math.abs(s) * fit.objective, objectiveTolerance(scaled, Math.abs(s) * fit.objective), 'm', `objective, permuted and scaled by ${s}`, { source: 'the unpermuted fit' });
    }), { seed: SEED + 1, numRuns: 60, verbose: true });
  });

  it('a row exactly on the fit leaves the objective unchanged', () => {
    fc.assert(fc.property(problems, fc.double({ min: 0, max: 0.88, noNaN: true }), (c, x) => {
      const pr = make(c);
      const fit = fitLeastAbsolute(pr);
      const { n, p } = pr;
      const X = new Float64Array((n + 1) * p);
      X.set(pr.X);
      const y = new Float64Array(n + 1);
      y.set(pr.y);
      let f = 0;
      for (let j = 0; j < p; j++) {
        X[n * p + j] = x ** j;
        f += x ** j * fit.coefficients[j];
      }
      y[n] = f;
      const w = pr.weights ? Float64Array.from([...pr.weights, 1]) : undefined;
      const more = fitLeastAbsolute(w ? { n: n + 1, p, X, y, weights: w } : { n: n + 1, p, X, y });
      within(more.objective, fit.objective, objectiveTolerance(pr, fit.objective), 'm', 'objective with the extra row on the fit', { source: 'the fit without it' });
    }), { seed: SEED + 2, numRuns: 60, verbose: true });
  });

  it('weight 4 on a row equals two copies of it (√4 = 2)', () => {
    fc.assert(fc.property(problems, fc.nat(), (c, pick) => {
      const pr = make({ ...c, weighted: false });
      const { n, p } = pr;
      const k = pick % n;
      const weights = new Float64Array(n).fill(1);
      weights[k] = 4;
      const weighted = fitLeastAbsolute({ ...pr, weights });
      const X = new Float64Array((n + 1) * p);
      X.set(pr.X);
      for (let j = 0; j < p; j++) X[n * p + j] = pr.X[k * p + j];
      const y = Float64Array.from([...pr.y, pr.y[k]]);
      const copies = fitLeastAbsolute({ n: n + 1, p, X, y });
      within(weighted.objective, copies.objective, objectiveTolerance(pr, copies.objective) * 2, 'm', `objective, weight 4 on row ${k} vs a copy`, { source: 'the duplicated problem' });
    }), { seed: SEED + 3, numRuns: 60, verbose: true });
  });
});

describe('fitLeastAbsolute warm start (iterations counted, never timed)', () => {
  for (const [n, p] of [[40, 2], [2_000, 3], [10_000, 2], [10_000, 3], [200_000, 2]] as const) {
    it(`n = ${n} → ${n + 1}, p = ${p}: same optimum as a cold fit, fewer iterations`, () => {
      const before = degreeRows(n, p, 500 + n);
      const after = degreeRows(n + 1, p, 500 + n);
      // Same generator and seed: the first n rows coincide, one row is added.
      for (let i = 0; i < n * p; i++) expect(after.X[i]).toBe(before.X[i]);
      const prev = fitLeastAbsolute(before);
      const cold = fitLeastAbsolute(after);
      const warm = fitLeastAbsolute(after, { warmStart: prev });
      expect(warm.converged).toBe(true);
      within(warm.objective, cold.objective, objectiveTolerance(after, cold.objective), 'm', 'warm vs cold objective', { source: 'the cold fit' });
      expect(kktDual(after, warm.coefficients, warm.basis ?? [])).toBeLessThanOrEqual(1 + 1e-9);
      expect(warm.iterations).toBeLessThan(Math.max(1, cold.iterations));
    });
  }
  it('a warm start that is wrong (bad basis, far coefficients) is only a start', () => {
    const pr = degreeRows(30_000, 2, 9);
    const cold = fitLeastAbsolute(pr);
    const warm = fitLeastAbsolute(pr, { warmStart: { coefficients: Float64Array.from([100000, 5000]), basis: Int32Array.from([3, 3]), scale: 0.001 } });
    expect(warm.converged).toBe(true);
    within(warm.objective, cold.objective, objectiveTolerance(pr, cold.objective), 'm', 'objective', { source: 'the cold fit' });
    expect(warm.reason).toMatch(/warm basis ignored/);
  });
});
