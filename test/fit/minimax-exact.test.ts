// Exact minimax (Chebyshev) fit: brute force, an independent optimality certificate on large n,
// equioscillation, properties, degenerate input. Outside references, computed here: the discrete
// Chebyshev theorem (the optimum is the largest levelled error over all (p+1)-row references,
// each levelled error being |Σλ_k b_k| / Σ|λ_k| with λ the null vector of the reference rows),
// and de la Vallée Poussin's bound (a reference with dual-feasible signs whose levelled error
// equals the largest residual over all rows proves optimality). fast-check seeds are in the names.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { InputError } from '../../src/errors.ts';
import { fitMinimax } from '../../src/fit/minimax.ts';
import type { LinearProblem } from '../../src/fit/types.ts';
import { within } from '../helpers/within.ts';
import { degreeRows, seeded, solve, sw } from './least-absolute-reference.ts';

/** Null vector λ of the reference rows (Σ λ_k a_k = 0), scaled to Σ|λ| = 1, or null when degenerate. */
function nullVector(pr: LinearProblem, ref: number[]): number[] | null {
  const { p, X } = pr;
  const a = ref.map((i) => Array.from({ length: p }, (_, j) => sw(pr, i) * X[i * p + j]));
  for (let fixed = p; fixed >= 0; fixed--) {
    const others = ref.map((_, k) => k).filter((k) => k !== fixed);
    // Σ_{k≠fixed} λ_k a_k = −a_fixed (λ_fixed = 1).
    const A = Array.from({ length: p }, (_, j) => others.map((k) => a[k][j]));
    const mu = solve(A, a[fixed].map((v) => -v));
    if (!mu) continue;
    const lambda = new Array<number>(p + 1).fill(0);
    lambda[fixed] = 1;
    others.forEach((k, t) => (lambda[k] = mu[t]));
    const s = lambda.reduce((t, v) => t + Math.abs(v), 0);
    return lambda.map((v) => v / s);
  }
  return null;
}

function levelled(pr: LinearProblem, ref: number[]): number {
  const lambda = nullVector(pr, ref);
  if (!lambda) return -Infinity;
  return Math.abs(lambda.reduce((t, l, k) => t + l * sw(pr, ref[k]) * pr.y[ref[k]], 0));
}

function bruteForceMinimax(pr: LinearProblem): number {
  const { n, p } = pr;
  let best = -Infinity;
  const pick = (start: number, chosen: number[]): void => {
    if (chosen.length === p + 1) {
      best = Math.max(best, levelled(pr, chosen));
      return;
    }
    for (let i = start; i < n; i++) pick(i + 1, [...chosen, i]);
  };
  pick(0, []);
  return best;
}

/** max_i √wᵢ|yᵢ − xᵢβ| computed here. */
function maxAbsResidual(pr: LinearProblem, beta: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < pr.n; i++) {
    let f = 0;
    for (let j = 0; j < pr.p; j++) f += pr.X[i * pr.p + j] * beta[j];
    m = Math.max(m, sw(pr, i) * Math.abs(pr.y[i] - f));
  }
  return m;
}

/**
 * de la Vallée Poussin certificate, computed here: the reference's null vector λ with the signs
 * σ of its residuals must be dual-feasible (λ_kσ_k all of one sign), and its levelled error
 * |Σλ_kσ_kρ_k| must equal the largest residual over all rows. Returns the relative gap.
 */
function certificateGap(pr: LinearProblem, beta: ArrayLike<number>, basis: ArrayLike<number>): number {
  const ref = Array.from(basis);
  const lambda = nullVector(pr, ref);
  if (!lambda) return Infinity;
  const rho = ref.map((i) => {
    let f = 0;
    for (let j = 0; j < pr.p; j++) f += pr.X[i * pr.p + j] * beta[j];
    return sw(pr, i) * (pr.y[i] - f);
  });
  const prod = lambda.map((l, k) => l * Math.sign(rho[k]));
  const sameSign = prod.every((v) => v >= -1e-12) || prod.every((v) => v <= 1e-12);
  if (!sameSign) return Infinity;
  const level = Math.abs(lambda.reduce((t, l, k) => t + l * sw(pr, ref[k]) * pr.y[ref[k]], 0));
  const top = maxAbsResidual(pr, beta);
  return (top - level) / top;
}

/**
 * Tolerance for two computations of the same level: relative 1e-12 plus the rounding of one
 * residual, 16(p+1)·ε·max√wᵢ|yᵢ| (readings ~1.1e5 m, residuals a few metres).
 */
function levelTolerance(pr: LinearProblem, expected: number): number {
  let yMax = 0;
  for (let i = 0; i < pr.n; i++) yMax = Math.max(yMax, sw(pr, i) * Math.abs(pr.y[i]));
  return 1e-12 * Math.abs(expected) + 16 * (pr.p + 1) * Number.EPSILON * yMax;
}

/** Integer-grid data with repeated abscissae and ties (non-Haar). */
function gridRows(n: number, p: number, seed: number): LinearProblem {
  const u = seeded(seed);
  const X = new Float64Array(n * p);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = Math.floor(u() * 5) / 4;
    for (let j = 0; j < p; j++) X[i * p + j] = x ** j;
    y[i] = Math.floor(u() * 7) - 3;
  }
  return { n, p, X, y };
}

const SEED = 20261203;

describe(`fitMinimax against brute force over all references (fast-check seed ${SEED})`, () => {
  it('degree-length rows, p = 2 and 3, weighted or not: objective to 1e-12', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), fc.integer({ min: 2, max: 3 }), fc.integer({ min: 4, max: 16 }), fc.boolean(), (seed, p, n, weighted) => {
      const pr = degreeRows(n, p, seed, weighted);
      const fit = fitMinimax(pr);
      expect(fit.converged).toBe(true);
      const bf = bruteForceMinimax(pr);
      within(fit.objective, bf, levelTolerance(pr, bf), 'm', `minimax objective (seed ${seed}, n ${n}, p ${p})`, { source: 'brute force over all (p+1)-row references' });
    }), { seed: SEED, numRuns: 60, verbose: true });
  });
  it('integer grid with repeated abscissae and ties (non-Haar): objective to 1e-12 absolute', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), fc.integer({ min: 2, max: 3 }), fc.integer({ min: 5, max: 14 }), (seed, p, n) => {
      const pr = gridRows(n, p, seed);
      const fit = fitMinimax(pr);
      if (fit.status === 'rank-deficient') {
        // Every row at fewer than p distinct abscissae: brute force finds no reference either.
        expect(bruteForceMinimax(pr)).toBe(-Infinity);
        return;
      }
      expect(fit.converged).toBe(true);
      const bf = bruteForceMinimax(pr);
      within(fit.objective, bf, levelTolerance(pr, bf), '', `minimax objective (seed ${seed}, n ${n}, p ${p})`, { source: 'brute force over all (p+1)-row references' });
    }), { seed: SEED + 1, numRuns: 80, verbose: true });
  });
});

describe('fitMinimax on large n, proven by a certificate computed here', () => {
  for (const [n, p, weighted] of [[100_000, 2, false], [200_000, 3, true], [1_000_000, 2, false], [300_000, 3, false]] as const) {
    it(`n = ${n}, p = ${p}${weighted ? ', weighted' : ''}: dual-feasible reference levels the error at the largest residual`, () => {
      const pr = degreeRows(n, p, 3000 + n + p, weighted);
      const fit = fitMinimax(pr);
      expect(fit.status).toBe('ok');
      const basis = Array.from(fit.basis ?? []);
      expect(new Set(basis).size).toBe(p + 1);
      expect(certificateGap(pr, fit.coefficients, basis)).toBeLessThanOrEqual(1e-10);
      const top = maxAbsResidual(pr, fit.coefficients);
      within(fit.objective, top, levelTolerance(pr, top), 'm', 'objective vs max|r| computed here');
    });
  }
});

describe('fitMinimax equioscillation', () => {
  for (const [n, p] of [[500, 2], [5_000, 3], [50_000, 2]] as const) {
    it(`n = ${n}, p = ${p}: p + 1 reference rows at the level, signs alternating along x (Chebyshev)`, () => {
      const pr = degreeRows(n, p, 70 + n);
      const fit = fitMinimax(pr);
      const ref = Array.from(fit.basis ?? []).sort((a, b) => pr.X[a * p + 1] - pr.X[b * p + 1]);
      expect(ref).toHaveLength(p + 1);
      const signs = ref.map((i) => Math.sign(fit.residuals[i]));
      for (const i of ref) within(Math.abs(fit.residuals[i]), fit.objective, 1e-9, 'm', `|r| at reference row ${i}`, { relative: true, source: 'the level' });
      for (let k = 1; k < signs.length; k++) expect(signs[k]).toBe(-signs[k - 1]);
    });
  }
});

describe(`fitMinimax properties (fast-check seed ${SEED + 2})`, () => {
  it('row order, scaling y, duplicated rows and a row inside the level leave the optimum as it was', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), fc.integer({ min: 2, max: 3 }), fc.integer({ min: 8, max: 60 }), (seed, p, n) => {
      const pr = degreeRows(n, p, seed);
      const fit = fitMinimax(pr);
      const order = Array.from({ length: n }, (_, i) => (i * 7 + 3) % n);
      const coprime = new Set(order).size === n;
      const X = new Float64Array((n + 2) * p);
      const y = new Float64Array(n + 2);
      (coprime ? order : order.map((_, i) => i)).forEach((src, i) => {
        for (let j = 0; j < p; j++) X[i * p + j] = pr.X[src * p + j];
        y[i] = -2 * pr.y[src];
      });
      // A copy of row 0, and a row on the fit (residual 0 < level).
      for (let j = 0; j < p; j++) {
        X[n * p + j] = pr.X[j];
        X[(n + 1) * p + j] = 0.3 ** j;
      }
      y[n] = -2 * pr.y[0];
      let f = 0;
      for (let j = 0; j < p; j++) f += 0.3 ** j * fit.coefficients[j];
      y[n + 1] = -2 * f;
      const other = fitMinimax({ n: n + 2, p, X, y });
      within(other.objective, 2 * fit.objective, 2 * levelTolerance(pr, 2 * fit.objective), 'm', 'objective of the permuted, doubled, extended problem', { source: 'the original fit' });
    }), { seed: SEED + 2, numRuns: 60, verbose: true });
  });
  for (const [n, p] of [[10_000, 2], [10_000, 3], [300_000, 2]] as const) {
    it(`warm start after one more row, n = ${n}, p = ${p}: same optimum, fewer exchanges (counted, not timed)`, () => {
      const before = degreeRows(n, p, 900 + n);
      const after = degreeRows(n + 1, p, 900 + n);
      const prev = fitMinimax(before);
      const cold = fitMinimax(after);
      const warm = fitMinimax(after, { warmStart: prev });
      expect(warm.converged).toBe(true);
      within(warm.objective, cold.objective, levelTolerance(after, cold.objective), 'm', 'warm vs cold objective', { source: 'the cold fit' });
      expect(warm.iterations).toBeLessThan(Math.max(1, cold.iterations));
    });
  }
});

describe('fitMinimax degenerate input', () => {
  it('n < p + 1: too-few-rows', () => {
    expect(fitMinimax({ n: 2, p: 2, X: Float64Array.from([1, 0, 1, 1]), y: Float64Array.from([1, 2]) }).status).toBe('too-few-rows');
  });
  it('every row at one latitude, small and large n: rank-deficient', () => {
    expect(fitMinimax({ n: 4, p: 2, X: Float64Array.from([1, 0.3, 1, 0.3, 1, 0.3, 1, 0.3]), y: Float64Array.from([1, 2, 3, 4]) }).status).toBe('rank-deficient');
    const n = 50_000;
    const X = new Float64Array(2 * n);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      X[2 * i] = 1;
      X[2 * i + 1] = 0.6;
      y[i] = i % 17;
    }
    expect(fitMinimax({ n, p: 2, X, y }).status).toBe('rank-deficient');
  });
  it('n = p + 1: the levelled error of the only reference', () => {
    const pr = degreeRows(3, 2, 5);
    const fit = fitMinimax(pr);
    const lv = levelled(pr, [0, 1, 2]);
    within(fit.objective, lv, levelTolerance(pr, lv), 'm', 'objective', { source: 'levelled error of the one reference' });
  });
  it('identical rows: the duplicates change nothing', () => {
    const pr = degreeRows(20, 3, 6);
    const fit = fitMinimax(pr);
    const X = new Float64Array(40 * 3);
    X.set(pr.X);
    X.set(pr.X, 60);
    const y = Float64Array.from([...pr.y, ...pr.y]);
    const twice = fitMinimax({ n: 40, p: 3, X, y });
    expect(twice.converged).toBe(true);
    within(twice.objective, fit.objective, levelTolerance(pr, fit.objective), 'm', 'objective', { source: 'the single set' });
  });
  it('an exact fit: objective 0 to rounding', () => {
    const n = 5_000;
    const X = new Float64Array(3 * n);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const x = (i % 97) / 100;
      X[3 * i] = 1;
      X[3 * i + 1] = x;
      X[3 * i + 2] = x * x;
      y[i] = 110574 + 1120 * x + 1.2 * x * x;
    }
    const fit = fitMinimax({ n, p: 3, X, y });
    expect(fit.objective).toBeLessThan(1e-9);
  });
  it('a non-finite value or a weight ≤ 0 throws InputError naming it', () => {
    const pr = degreeRows(40_000, 2, 8, true);
    pr.y[31_234] = Number.POSITIVE_INFINITY;
    expect(() => fitMinimax(pr)).toThrowError(InputError);
    try {
      fitMinimax(pr);
    } catch (e) {
      expect((e as InputError).field).toBe('y[31234]');
    }
    const pw = degreeRows(40_000, 2, 9, true);
    pw.weights![77] = -1;
    try {
      fitMinimax(pw);
      expect.fail('no error');
    } catch (e) {
      expect((e as InputError).field).toBe('weights[77]');
    }
  });
});
