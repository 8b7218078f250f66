// How far a session's rows can move when β changes (src/fit/fit-session-bounds.ts), against brute
// force: the move of every row, max ᵢ √wᵢ|xᵢᵀ(β − β_ref)|, computed one row at a time. Both bounds
// (raw and framed) must be at or above it for every direction tried; the framed one must be close
// to it for the collinear design (1, x, x²), x = sin²φ, where the raw one is loose. Seeded invented rows.
import { describe, expect, it } from 'vitest';
import { buildReachFrame, emptyBounds, reachBetween, widenBounds } from '../../src/fit/fit-session-bounds.ts';
import type { LinearProblem } from '../../src/fit/types.ts';
import { seeded } from './least-absolute-reference.ts';

function design(seed: number, n: number, p: number, weighted: boolean): LinearProblem {
  const rand = seeded(seed);
  const X = new Float64Array(n * p);
  const y = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const s = Math.sin((rand() * 70 * Math.PI) / 180) ** 2;
    for (let j = 0; j < p; j++) X[i * p + j] = s ** j;
    y[i] = 110574 + 1120 * s + 5 * (rand() - 0.5);
    w[i] = 0.25 + 3 * rand();
  }
  return weighted ? { n, p, X, y, weights: w } : { n, p, X, y };
}

function bruteMove(problem: LinearProblem, d: ArrayLike<number>): number {
  const { n, p, X, weights } = problem;
  let worst = 0;
  for (let i = 0; i < n; i++) {
    let f = 0;
    for (let j = 0; j < p; j++) f += X[i * p + j] * d[j];
    worst = Math.max(worst, (weights ? Math.sqrt(weights[i]) : 1) * Math.abs(f));
  }
  return worst;
}

/** A direction that nearly cancels on the rows: the difference of two nearby fits' coefficients. */
function cancellingDirection(rand: () => number, p: number): Float64Array {
  // Along (1, −1/x₀, …): for p = 3, d = ε·(x₀x₁, −(x₀ + x₁), 1) vanishes at x = x₀ and x = x₁ of (1, x, x²).
  const x0 = 0.2 + 0.5 * rand();
  const x1 = x0 + 0.1 * rand();
  const e = 1e-2 * (rand() - 0.5);
  if (p === 2) return Float64Array.from([-x0 * e, e]);
  return Float64Array.from([x0 * x1 * e, -(x0 + x1) * e, e]);
}

describe('reachBetween against the brute-force move of every row', () => {
  for (const p of [2, 3]) {
    for (const weighted of [false, true]) {
      it(`p = ${p}${weighted ? ', weighted' : ''}: both bounds hold; the framed one is within 3× of the true move`, () => {
        const problem = design(20261203 + p, 3000, p, weighted);
        const bounds = emptyBounds(p);
        widenBounds(bounds, problem, 0);
        const frame = buildReachFrame(problem, problem.n);
        expect(frame).not.toBeNull();
        const rand = seeded(7 * p + (weighted ? 1 : 0));
        const betaRef = Float64Array.from([110574, 1120, 1.2].slice(0, p));
        let worstRatio = 0;
        let rawOverFramed = Infinity;
        for (let k = 0; k < 200; k++) {
          const d = k % 2 === 0 ? cancellingDirection(rand, p) : Float64Array.from({ length: p }, () => 1e-3 * (rand() - 0.5));
          const beta = betaRef.map((b, j) => b + d[j]);
          // The move of the computed difference (what the bounds are given).
          const dd = beta.map((b, j) => b - betaRef[j]);
          const truth = bruteMove(problem, dd);
          const framed = reachBetween(bounds, beta, betaRef, frame);
          const raw = reachBetween(bounds, beta, betaRef);
          expect(framed).toBeGreaterThanOrEqual(truth);
          expect(raw).toBeGreaterThanOrEqual(truth);
          expect(framed).toBeLessThanOrEqual(raw);
          worstRatio = Math.max(worstRatio, framed / truth);
          if (k % 2 === 0) rawOverFramed = Math.min(rawOverFramed, raw / framed);
        }
        // The frame's box is within √p-ish of the true move (common practice: whitened coordinates
        // of a bounded design are O(1)); the raw bound adds terms that cancel in every row.
        expect(worstRatio).toBeLessThan(3);
        if (p === 3) expect(rawOverFramed).toBeGreaterThan(2);
      });
    }
  }

  it('a numerically singular design has no frame; the raw bound still holds', () => {
    const n = 50;
    const X = new Float64Array(n * 2);
    for (let i = 0; i < n; i++) {
      X[2 * i] = 1;
      X[2 * i + 1] = 2;
    }
    const problem: LinearProblem = { n, p: 2, X, y: new Float64Array(n) };
    expect(buildReachFrame(problem, n)).toBeNull();
    const bounds = emptyBounds(2);
    widenBounds(bounds, problem, 0);
    const beta = Float64Array.from([1e-3, -2e-3]);
    expect(reachBetween(bounds, beta, new Float64Array(2), null)).toBeGreaterThanOrEqual(bruteMove(problem, beta));
  });
});
