// The warm-started exact L1 refit after a few more readings (a fit session's slow path) at
// n ≈ 10⁴, where the fit screens: previous coefficients and basis in, the rows added since
// possibly gross outliers. Every answer is checked from outside the code under test: the LP
// optimality condition (kktDual, its own elimination in least-absolute-reference.ts) at the
// returned vertex proves its objective is the LP optimum, the objective is recomputed there
// (objectiveAt), and the cold fit of the same rows must reach the same optimum.
import { describe, expect, it } from 'vitest';
import { fitLeastAbsolute, fitLeastAbsoluteWithSides } from '../../src/fit/least-absolute.ts';
import type { LinearProblem } from '../../src/fit/types.ts';
import { within } from '../helpers/within.ts';
import { degreeRows, kktDual, objectiveAt, seeded, solve, sw } from './least-absolute-reference.ts';

/** Relative agreement promised for objectives by different exact routes (the 1e-9 of the brief, far above rounding). */
const OBJECTIVE_REL = 1e-9;
/** The dual certificate allows a relative gap of GAP_TOL = 1e-10; the reference solve rounds at ~1e-12. */
const DUAL_SLACK = 1e-9;

/** The first m rows of a problem (views, as the fit session passes them). */
function head(pr: LinearProblem, m: number): LinearProblem {
  const { p } = pr;
  const out: LinearProblem = { n: m, p, X: pr.X.subarray(0, m * p), y: pr.y.subarray(0, m) };
  if (pr.weights) out.weights = pr.weights.subarray(0, m);
  return out;
}

/** Overwrites the last k rows' readings with invented gross outliers (±200…1200 m) on every other row. */
function withOutlierTail(pr: LinearProblem, k: number, seed: number): LinearProblem {
  const u = seeded(seed);
  const y = Float64Array.from(pr.y);
  for (let t = 0; t < k; t += 2) y[pr.n - 1 - t] += (u() < 0.5 ? -1 : 1) * (200 + 1000 * u());
  return { ...pr, y };
}

describe('warm L1 refit after 1, 2, 5 more readings at n ≈ 10⁴ (screened route)', () => {
  const cases: { p: number; weighted: boolean; seed: number }[] = [
    { p: 2, weighted: false, seed: 41 },
    { p: 3, weighted: false, seed: 42 },
    { p: 2, weighted: true, seed: 43 },
    { p: 3, weighted: true, seed: 44 },
  ];
  for (const { p, weighted, seed } of cases) {
    for (const added of [1, 2, 5]) {
      it(`p = ${p}${weighted ? ', weighted' : ''}, ${added} row(s) added, seed ${seed}`, () => {
        const n = 10_000 + added;
        const all = withOutlierTail(degreeRows(n, p, seed, weighted), added, seed + 1000);
        const before = fitLeastAbsolute(head(all, n - added));
        expect(before.converged).toBe(true);
        const warm = fitLeastAbsolute(all, { warmStart: { coefficients: before.coefficients, basis: before.basis } });
        const cold = fitLeastAbsolute(all);

        expect(warm.converged, warm.reason).toBe(true);
        expect(warm.status).toBe('ok');
        expect(warm.reason).toMatch(/^exact: .*warm start/);
        expect(warm.basis?.length).toBe(p);
        const dual = kktDual(all, warm.coefficients, warm.basis ?? []);
        expect(dual, 'max|u| of the LP optimality condition (kktDual)').toBeLessThanOrEqual(1 + DUAL_SLACK);

        const reference = objectiveAt(all, warm.coefficients);
        within(warm.objective, reference, OBJECTIVE_REL, 'm', 'warm objective', { source: 'Σ√w|r| recomputed (objectiveAt) at a vertex kktDual proves optimal', relative: true });
        within(warm.objective, cold.objective, OBJECTIVE_REL, 'm', 'warm vs cold objective', { source: 'the cold fit of the same rows', relative: true });

        // The residuals are computed when first read, from these rows.
        expect(warm.residuals.length).toBe(n);
        for (const i of [0, n - 1, ...(warm.basis ?? [])]) {
          let f = 0;
          for (let j = 0; j < p; j++) f += all.X[i * p + j] * warm.coefficients[j];
          within(warm.residuals[i], all.y[i] - f, 1e-9, 'm', `residual of row ${i}`, { source: 'yᵢ − xᵢβ here' });
        }
        expect(Number.isFinite(warm.scale) && warm.scale > 0).toBe(true);
      });
    }
  }
});

describe('the side sum g of a warm refit\'s vertex, handed out without a pass (fitLeastAbsoluteWithSides)', () => {
  for (const { p, weighted, seed } of [{ p: 2, weighted: false, seed: 51 }, { p: 3, weighted: true, seed: 52 }]) {
    it(`p = ${p}${weighted ? ', weighted' : ''}, 2 rows added, seed ${seed}: g equals Σ_{i∉B} sign(rᵢ)√wᵢxᵢ summed here`, () => {
      const n = 10_002;
      const all = withOutlierTail(degreeRows(n, p, seed, weighted), 2, seed + 1000);
      const before = fitLeastAbsolute(head(all, n - 2));
      const { result, sides } = fitLeastAbsoluteWithSides(all, { warmStart: { coefficients: before.coefficients, basis: before.basis } });
      expect(result.converged, result.reason).toBe(true);
      expect(sides, 'the band proof held, so g comes with the result').not.toBeNull();
      if (!sides) return;
      const basis = new Set(Array.from(result.basis ?? []));
      // The reference: signs of yᵢ − xᵢβ at the returned β, plain sums with their own bound n·ε·Σ|aᵢⱼ|.
      const g = new Array<number>(p).fill(0);
      const abs = new Array<number>(p).fill(0);
      for (let i = 0; i < n; i++) {
        if (basis.has(i)) continue;
        let f = 0;
        for (let j = 0; j < p; j++) f += all.X[i * p + j] * result.coefficients[j];
        const s = all.y[i] - f > 0 ? 1 : -1;
        for (let j = 0; j < p; j++) {
          g[j] += s * sw(all, i) * all.X[i * p + j];
          abs[j] += Math.abs(sw(all, i) * all.X[i * p + j]);
        }
      }
      for (let j = 0; j < p; j++) {
        within(sides.g[j], g[j], sides.gErr[j] + n * Number.EPSILON * abs[j], '√w·x', `g[${j}]`, { source: 'Σ_{i∉B} sign(rᵢ)√wᵢxᵢ summed in this test' });
        expect(sides.gErr[j]).toBeLessThan(1e-9 * abs[j]);
      }
      // And it proves the vertex: max|u| with A_Bᵀu = −g, solved here (reference elimination).
      const B = Array.from(result.basis ?? []);
      const u = solve(Array.from({ length: p }, (_, j) => B.map((i) => sw(all, i) * all.X[i * p + j])), Array.from(sides.g, (v) => -v));
      expect(u).not.toBeNull();
      expect(Math.max(...(u ?? [Infinity]).map(Math.abs))).toBeLessThanOrEqual(1 + DUAL_SLACK);
    });
  }
});
