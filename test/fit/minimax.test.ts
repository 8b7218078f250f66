// Exact minimax: checked against brute force over every reference of p+1 rows (Chebyshev's
// theorem: the optimum is the largest levelled error over references), against scipy HiGHS LP
// objectives saved by scripts/gen-fit-fixtures.sh, and by its optimality properties.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { fitMinimax } from '../../src/fit/minimax.ts';
import type { LinearProblem } from '../../src/fit/types.ts';
import { within } from '../helpers/within.ts';
import { loadProblem, readJson } from './fixtures.ts';

/** Levelled error of one reference: |Σ λ_k b_k| / Σ|λ_k| with λ the null vector of A_Rᵀ (dual formula). */
function levelledError(pr: LinearProblem, ref: number[]): number {
  const { p, X, y } = pr;
  const sw = (i: number) => (pr.weights ? Math.sqrt(pr.weights[i]) : 1);
  // Cofactor expansion of the (p+1)×(p+1) matrix [a_k ; b_k] gives Σλ_k b_k; for p ≤ 3 this is small.
  const rows = ref.map((i) => Array.from({ length: p }, (_, j) => X[i * p + j] * sw(i)));
  const det = (M: number[][]): number => {
    if (M.length === 1) return M[0][0];
    let s = 0;
    for (let c = 0; c < M.length; c++) s += (c % 2 ? -1 : 1) * M[0][c] * det(M.slice(1).map((r) => r.filter((_, k) => k !== c)));
    return s;
  };
  // λ_k = (−1)^k det(A_R without row k), a p×p minor.
  const lambda = ref.map((_, k) => (k % 2 ? -1 : 1) * det(rows.filter((_, r) => r !== k)));
  const sumAbs = lambda.reduce((s, l) => s + Math.abs(l), 0);
  if (sumAbs === 0) return -Infinity;
  return Math.abs(lambda.reduce((s, l, k) => s + l * y[ref[k]] * sw(ref[k]), 0)) / sumAbs;
}

function bruteForce(pr: LinearProblem): number {
  const { n, p } = pr;
  let best = -Infinity;
  const pick = (start: number, chosen: number[]): void => {
    if (chosen.length === p + 1) { best = Math.max(best, levelledError(pr, chosen)); return; }
    for (let i = start; i < n; i++) pick(i + 1, [...chosen, i]);
  };
  pick(0, []);
  return best;
}

function seededProblem(seed: number, n: number, p: number, weighted: boolean): LinearProblem {
  let s = seed >>> 0 || 1;
  const rnd = () => { s = (Math.imul(s, 1664525) + 1013904223) >>> 0; return s / 2 ** 32; };
  const X = new Float64Array(n * p);
  const y = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = Math.sin((rnd() * 70 * Math.PI) / 180) ** 2;
    for (let j = 0; j < p; j++) X[i * p + j] = x ** j;
    y[i] = 110574 + 1120 * x + 1.2 * x * x + (rnd() - 0.5) * 20 + (rnd() < 0.1 ? (rnd() - 0.5) * 400 : 0);
    w[i] = 0.25 + rnd() * 4;
  }
  return weighted ? { n, p, X, y, weights: w } : { n, p, X, y };
}

describe('fitMinimax against brute force over all references (Chebyshev equioscillation theorem)', () => {
  it('matches the largest levelled error over every (p+1)-subset, p = 2 and 3, seeded', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 2 ** 31 }), fc.integer({ min: 2, max: 3 }), fc.integer({ min: 5, max: 18 }), fc.boolean(), (seed, p, n, weighted) => {
      const pr = seededProblem(seed, n, p, weighted);
      const fit = fitMinimax(pr);
      expect(fit.converged).toBe(true);
      within(fit.objective, bruteForce(pr), 1e-10, 'm', `minimax objective (seed ${seed})`, { relative: true, source: 'brute force over all references' });
    }), { seed: 20261202, numRuns: 60, verbose: true });
  });
});

describe('fitMinimax against scipy HiGHS (test/fixtures/fit/minimax.json from scripts/gen-fit-fixtures.sh)', () => {
  const file = readJson<{ cases: { dataset: string; n: number; p: number; highs: { objective: number } | null }[] }>('minimax.json');
  for (const c of file.cases) {
    it(`${c.dataset}: objective equals the LP optimum to 1e-9 relative`, () => {
      const fit = fitMinimax(loadProblem(c.dataset));
      if (!c.highs || !Number.isFinite(c.highs.objective)) {
        expect(fit.status).not.toBe('ok');
        return;
      }
      expect(fit.converged).toBe(true);
      // HiGHS simplex at default tolerances can miss the L∞ optimum slightly from above; ours must
      // not be worse, and must agree to 1e-9 relative.
      expect(fit.objective).toBeLessThanOrEqual(c.highs.objective * (1 + 1e-9));
      within(fit.objective, c.highs.objective, 1e-9, 'm', 'minimax objective', { relative: true, source: 'scipy linprog highs-ds' });
    });
  }
});

describe('fitMinimax properties', () => {
  it('equioscillates: at least p+1 rows attain the maximum, the reference among them', () => {
    const pr = seededProblem(7, 400, 3, false);
    const fit = fitMinimax(pr);
    const ref = Array.from(fit.basis ?? []);
    expect(ref).toHaveLength(4);
    for (const i of ref) within(Math.abs(fit.residuals[i]), fit.objective, 1e-9, 'm', `|r| at reference row ${i}`, { relative: true });
  });
  it('is invariant to row order and scales with y', () => {
    const pr = seededProblem(11, 300, 2, true);
    const fit = fitMinimax(pr);
    const order = Array.from({ length: pr.n }, (_, i) => (i * 7919) % pr.n);
    const X = new Float64Array(pr.n * 2), y = new Float64Array(pr.n), w = new Float64Array(pr.n);
    order.forEach((src, i) => { X[2 * i] = pr.X[2 * src]; X[2 * i + 1] = pr.X[2 * src + 1]; y[i] = pr.y[src] * -3; w[i] = pr.weights![src]; });
    const fit2 = fitMinimax({ n: pr.n, p: 2, X, y, weights: w });
    within(fit2.objective, 3 * fit.objective, 1e-12, 'm', 'objective of the permuted, scaled problem', { relative: true });
  });
  it('a warm start from the previous basis converges in fewer exchanges after one more row', () => {
    const pr = seededProblem(5, 10_000, 2, false);
    const cold = fitMinimax(pr);
    const more = seededProblem(5, 10_001, 2, false);
    const warm = fitMinimax(more, { warmStart: { coefficients: cold.coefficients, basis: cold.basis } });
    const coldMore = fitMinimax(more);
    within(warm.objective, coldMore.objective, 1e-12, 'm', 'warm vs cold objective', { relative: true });
    expect(warm.iterations).toBeLessThan(Math.max(1, coldMore.iterations));
  });
});

describe('fitMinimax degenerate input is a status', () => {
  it('n < p + 1', () => {
    expect(fitMinimax({ n: 2, p: 2, X: Float64Array.from([1, 0, 1, 1]), y: Float64Array.from([1, 2]) }).status).toBe('too-few-rows');
  });
  it('every row at one latitude', () => {
    const X = Float64Array.from([1, 0.3, 1, 0.3, 1, 0.3, 1, 0.3]);
    expect(fitMinimax({ n: 4, p: 2, X, y: Float64Array.from([1, 2, 3, 4]) }).status).toBe('rank-deficient');
  });
  it('an exact fit has objective 0 (to rounding)', () => {
    const X = Float64Array.from([1, 0, 1, 0.25, 1, 0.5, 1, 1]);
    const y = Float64Array.from([3, 3.5, 4, 5]);
    const fit = fitMinimax({ n: 4, p: 2, X, y });
    expect(fit.objective).toBeLessThan(1e-14);
    within(fit.coefficients[1], 2, 1e-12, '', 'slope');
  });
});
