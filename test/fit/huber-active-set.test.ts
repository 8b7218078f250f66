// Huber's active-set finish (src/fit/huber-active-set.ts, used from 20 000 rows on the fused
// path) against an independent solver: a dense Newton iteration on the same estimating
// equations Σψ(rᵢ/s)xᵢ = 0 at the same fixed scale, written here with ml-matrix's solve (an
// outside linear-algebra library), iterated until the partition |u| ≤ k stops changing — the
// exact Huber estimate for that scale (Huber, "Robust Statistics", 1981, §7.8). Data: the
// benchmark's seeded invented degree-length generator (bench/generate.ts).
import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { designMatrix, generateDataset } from '../../bench/generate.ts';
import { fitHuber, HUBER_K } from '../../src/fit/huber.ts';
import type { LinearProblem } from '../../src/fit/types.ts';

function problemOf(n: number, p: 2 | 3, seed: number): LinearProblem {
  const { x, y } = generateDataset({ n, p, seed });
  return { n, p, X: designMatrix(x, p), y };
}

/** Dense Newton on Huber's ψ at fixed scale s from β, until no reading changes side. */
function referenceHuber(problem: LinearProblem, s: number, start: Float64Array): number[] {
  const { n, p, X, y } = problem;
  const beta = Array.from(start);
  let sides: Int8Array | null = null;
  for (let it = 0; it < 100; it++) {
    const G = Matrix.zeros(p, p);
    const b = Matrix.zeros(p, 1);
    const now = new Int8Array(n);
    for (let i = 0; i < n; i++) {
      let f = 0;
      for (let j = 0; j < p; j++) f += X[i * p + j] * beta[j];
      const r = y[i] - f;
      const u = r / s;
      // ψ(u)·s: r inside, ±k·s outside; ψ′ = 1 inside, 0 outside.
      const psiS = Math.abs(u) <= HUBER_K ? r : Math.sign(u) * HUBER_K * s;
      now[i] = Math.abs(u) <= HUBER_K ? 0 : u > 0 ? 1 : -1;
      for (let a = 0; a < p; a++) {
        b.set(a, 0, b.get(a, 0) + psiS * X[i * p + a]);
        if (now[i] === 0) for (let c = 0; c < p; c++) G.set(a, c, G.get(a, c) + X[i * p + a] * X[i * p + c]);
      }
    }
    if (sides && sides.every((v, i) => v === now[i])) return beta;
    sides = now;
    const d = solve(G, b);
    for (let j = 0; j < p; j++) beta[j] += d.get(j, 0);
  }
  throw new Error('reference Newton did not settle');
}

describe('Huber active-set finish against a dense Newton reference (ml-matrix solve)', () => {
  for (const [n, p, seed] of [[40_000, 2, 11], [40_000, 3, 12], [200_000, 3, 13], [25_000, 3, 14]] as const) {
    it(`n = ${n}, p = ${p}, seed ${seed}: same estimate to 1e-10, proven by the band`, () => {
      const problem = problemOf(n, p, seed);
      const fit = fitHuber(problem);
      expect(fit.status).toBe('ok');
      expect(fit.reason).toContain('provably kept its side');
      const ref = referenceHuber(problem, fit.scale, fit.coefficients);
      ref.forEach((b, j) => expect(Math.abs(fit.coefficients[j] - b)).toBeLessThanOrEqual(1e-10 * Math.max(Math.abs(b), 1)));
      // The returned residuals, weights and Σρ belong to the returned β.
      let objective = 0;
      for (let i = 0; i < n; i += 997) {
        let f = 0;
        for (let j = 0; j < p; j++) f += problem.X[i * p + j] * fit.coefficients[j];
        expect(fit.residuals[i]).toBeCloseTo(problem.y[i] - f, 9);
        const u = Math.abs(fit.residuals[i] / fit.scale);
        expect(fit.robustWeights?.[i]).toBeCloseTo(u <= HUBER_K ? 1 : HUBER_K / u, 12);
      }
      for (let i = 0; i < n; i++) {
        const u = Math.abs(fit.residuals[i] / fit.scale);
        objective += u <= HUBER_K ? 0.5 * u * u : HUBER_K * u - 0.5 * HUBER_K * HUBER_K;
      }
      expect(Math.abs(fit.objective - objective)).toBeLessThanOrEqual(1e-9 * objective);
    });
  }

  it('agrees with the general weighted pass (unit weights take the path without the band)', () => {
    const problem = problemOf(60_000, 3, 21);
    const fast = fitHuber(problem);
    const weighted = fitHuber({ ...problem, weights: new Float64Array(problem.n).fill(1) });
    expect(weighted.reason).not.toContain('provably kept its side');
    expect(weighted.scale).toBe(fast.scale);
    fast.coefficients.forEach((b, j) => expect(Math.abs(weighted.coefficients[j] - b)).toBeLessThanOrEqual(1e-10 * Math.max(Math.abs(b), 1)));
  });
});
