// The fit session's kept Tukey moments (src/fit/fit-session-tukey.ts) against an independent
// solver: IRLS then Newton on the biweight's estimating equations Σ√wᵢψ(uᵢ)xᵢ = 0 at the same
// fixed scale, each step solved with ml-matrix (an outside linear-algebra library), started from
// the session's answer and run until the step is at rounding level — the stationary point
// next to it — and Σρ, the weights by brute force per row. The cold plain fitter on the same rows
// gives the scale (MAD of its exact L1 fit) and its own estimate to compare. ρ, ψ, ψ′ of the
// biweight: Beaton & Tukey, Technometrics 16 (1974). Data: the benchmark's seeded invented
// degree-length generator (bench/generate.ts), with invented weights.
import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { designMatrix, generateDataset } from '../../bench/generate.ts';
import { createFitSession, type SessionRow } from '../../src/fit/fit-session.ts';
import { TUKEY_KEPT_MAX_ADDED } from '../../src/fit/fit-session-tukey.ts';
import { fitTukey, TUKEY_C } from '../../src/fit/tukey.ts';
import type { FitResult, LinearProblem } from '../../src/fit/types.ts';
import { seeded } from './least-absolute-reference.ts';

const C = TUKEY_C;

function problemOf(n: number, p: 2 | 3, seed: number, weighted: boolean): LinearProblem {
  const { x, y } = generateDataset({ n, p, seed });
  const pr: LinearProblem = { n, p, X: designMatrix(x, p), y };
  if (weighted) {
    const u = seeded(seed + 1);
    pr.weights = Float64Array.from({ length: n }, () => 0.25 + 1.5 * u());
  }
  return pr;
}

function head(pr: LinearProblem, n: number): LinearProblem {
  const out: LinearProblem = { n, p: pr.p, X: pr.X.subarray(0, n * pr.p), y: pr.y.subarray(0, n) };
  if (pr.weights) out.weights = pr.weights.subarray(0, n);
  return out;
}

function rowOf(pr: LinearProblem, i: number): SessionRow {
  const row: SessionRow = { x: Array.from(pr.X.subarray(i * pr.p, (i + 1) * pr.p)), y: pr.y[i] };
  if (pr.weights) row.weight = pr.weights[i];
  return row;
}

/** Newton on Σ√wψ(u)x = 0 at scale s from β (ml-matrix solve), to the rounding level of its direct sums. */
function referenceTukey(pr: LinearProblem, s: number, start: ArrayLike<number>): { beta: number[]; objective: number } {
  const { n, p, X, y, weights } = pr;
  const beta = Array.from(start);
  for (let it = 0; it < 60; it++) {
    const M = Matrix.zeros(p, p);
    const F = Matrix.zeros(p, 1);
    let objective = 0;
    for (let i = 0; i < n; i++) {
      const sw = weights ? Math.sqrt(weights[i]) : 1;
      let f = 0;
      for (let j = 0; j < p; j++) f += X[i * p + j] * beta[j];
      const u = (sw * (y[i] - f)) / s;
      if (Math.abs(u) > C) {
        objective += (C * C) / 6;
        continue;
      }
      const q = (u * u) / (C * C);
      objective += ((C * C) / 6) * (1 - (1 - q) ** 3);
      const psi = u * (1 - q) ** 2;
      const dpsi = (1 - q) * (1 - 5 * q);
      for (let a = 0; a < p; a++) {
        F.set(a, 0, F.get(a, 0) + sw * psi * X[i * p + a]);
        for (let b = 0; b < p; b++) M.set(a, b, M.get(a, b) + sw * sw * dpsi * X[i * p + a] * X[i * p + b]);
      }
    }
    const d = solve(M, F);
    let change = 0;
    for (let j = 0; j < p; j++) {
      const step = s * d.get(j, 0);
      beta[j] += step;
      change = Math.max(change, Math.abs(step) / Math.max(Math.abs(beta[j]), s));
    }
    // Quadratic convergence from the session's answer: the first step is at rounding already;
    // direct sums of the cubic design stall at ~5e-13 relative, so 1e-11 after two steps.
    if (it >= 1 && change < 1e-11) return { beta, objective };
  }
  throw new Error('reference Newton did not converge');
}

function expectExact(pr: LinearProblem, got: FitResult, what: string): void {
  expect(got.status, what).toBe('ok');
  const ref = referenceTukey(pr, got.scale, got.coefficients);
  ref.beta.forEach((b, j) => expect(Math.abs(got.coefficients[j] - b), `${what}: β${j} vs Newton (ml-matrix)`).toBeLessThanOrEqual(1e-10 * Math.max(Math.abs(b), 1)));
  expect(Math.abs(got.objective - ref.objective), `${what}: Σρ vs brute force`).toBeLessThanOrEqual(1e-9 * ref.objective);
  // The cold plain fitter: the same scale (two routes to the same L1 vertex round the ~1.1e5 m
  // readings' residuals differently, ~1e-11 relative) and the same estimate.
  const cold = fitTukey(pr);
  expect(Math.abs(got.scale - cold.scale), `${what}: scale vs cold`).toBeLessThanOrEqual(1e-10 * cold.scale);
  cold.coefficients.forEach((c, j) => expect(Math.abs(got.coefficients[j] - c), `${what}: β${j} vs cold`).toBeLessThanOrEqual(1e-9 * Math.max(Math.abs(c), 1)));
  const gotCov = got.covariance;
  const coldCov = cold.covariance;
  expect(gotCov && coldCov, `${what}: covariance defined`).toBeTruthy();
  if (gotCov && coldCov) coldCov.forEach((c, j) => expect(Math.abs(gotCov[j] - c), `${what}: covariance[${j}] vs cold`).toBeLessThanOrEqual(1e-8 * Math.abs(coldCov[0])));
  const w = got.robustWeights;
  expect(w?.length).toBe(pr.n);
  for (let i = 0; i < pr.n; i += 37) {
    const sw = pr.weights ? Math.sqrt(pr.weights[i]) : 1;
    let f = 0;
    for (let j = 0; j < pr.p; j++) f += pr.X[i * pr.p + j] * got.coefficients[j];
    const u = (sw * (pr.y[i] - f)) / got.scale;
    expect(w?.[i], `${what}: weight of row ${i}`).toBeCloseTo(Math.abs(u) <= C ? (1 - (u / C) ** 2) ** 2 : 0, 12);
  }
}

describe('fit session: Tukey refits from the kept moments', () => {
  for (const [p, weighted, seed] of [[2, false, 51], [3, false, 52], [2, true, 53], [3, true, 54]] as const) {
    it(`p = ${p}${weighted ? ', weighted rows' : ''}, seed ${seed}: one reading at a time, the stationary point at every step`, () => {
      const full = problemOf(3030, p, seed, weighted);
      const session = createFitSession(head(full, 3000));
      expectExact(head(full, 3000), session.fit('tukey'), 'first fit');
      let keptCount = 0;
      for (let n = 3001; n <= 3030; n++) {
        session.append([rowOf(full, n - 1)]);
        const got = session.fit('tukey');
        if (got.reason.includes('moments kept')) keptCount++;
        if (n % 6 === 0 || n === 3030) expectExact(head(full, n), got, `after row ${n}`);
      }
      expect(keptCount).toBeGreaterThanOrEqual(20);
    });
  }

  it('a gross outlier and a reading right at ±c appended: still the stationary point', () => {
    const full = problemOf(2000, 2, 55, false);
    const session = createFitSession(full);
    const first = session.fit('tukey');
    const b = first.coefficients;
    session.append([{ x: [1, 0.37], y: b[0] + b[1] * 0.37 + 250 }, { x: [1, 0.5], y: b[0] + b[1] * 0.5 + C * first.scale * (1 - 1e-13) }]);
    expectExact(session.problem, session.fit('tukey'), 'outlier + threshold row');
  });

  it(`more than ${TUKEY_KEPT_MAX_ADDED} readings since the base: the plain fitter rebuilds it`, () => {
    const full = problemOf(2000 + TUKEY_KEPT_MAX_ADDED + 10, 3, 56, false);
    const session = createFitSession(head(full, 2000));
    session.fit('tukey');
    const rows: SessionRow[] = [];
    for (let i = 2000; i < full.n; i++) rows.push(rowOf(full, i));
    session.append(rows);
    const got = session.fit('tukey');
    expect(got.reason).toContain('by IRLS');
    expectExact(full, got, 'rebuilt');
    session.append([{ x: [1, 0.2, 0.04], y: 110574 + 1120 * 0.2 + 3 }]);
    expect(session.fit('tukey').reason).toContain('moments kept');
  });
});
