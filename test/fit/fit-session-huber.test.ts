// The fit session's kept Huber partition (src/fit/fit-session-huber.ts) against an independent
// solver: a dense Newton iteration on Huber's estimating equations Σ√wᵢψ(uᵢ)xᵢ = 0 at the same
// fixed scale, solved with ml-matrix (an outside linear-algebra library) until no reading changes
// side — the exact Huber estimate for that scale (Huber, "Robust Statistics", 1981, §7.8) — and
// Σρ, Σψ′ and the weights by brute force per row. The scale itself is checked against the cold
// plain fitter on the same rows (its MAD of the exact L1 fit). Data: the benchmark's seeded
// invented degree-length generator (bench/generate.ts), with invented weights.
import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { designMatrix, generateDataset } from '../../bench/generate.ts';
import { createFitSession, type SessionRow } from '../../src/fit/fit-session.ts';
import { HUBER_KEPT_MAX_ADDED } from '../../src/fit/fit-session-huber.ts';
import { fitHuber, HUBER_K } from '../../src/fit/huber.ts';
import type { FitResult, LinearProblem } from '../../src/fit/types.ts';
import { seeded } from './least-absolute-reference.ts';

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

/** Dense Newton on Huber's ψ at fixed scale s (ml-matrix solve), until no reading changes side. */
function referenceHuber(pr: LinearProblem, s: number, start: ArrayLike<number>): { beta: number[]; objective: number; inside: number } {
  const { n, p, X, y, weights } = pr;
  const beta = Array.from(start);
  let sides: Int8Array | null = null;
  for (let it = 0; it < 100; it++) {
    const G = Matrix.zeros(p, p);
    const b = Matrix.zeros(p, 1);
    const now = new Int8Array(n);
    let objective = 0;
    let inside = 0;
    for (let i = 0; i < n; i++) {
      const sw = weights ? Math.sqrt(weights[i]) : 1;
      let f = 0;
      for (let j = 0; j < p; j++) f += X[i * p + j] * beta[j];
      const u = (sw * (y[i] - f)) / s;
      const a = Math.abs(u);
      now[i] = a <= HUBER_K ? 0 : u > 0 ? 1 : -1;
      objective += a <= HUBER_K ? 0.5 * u * u : HUBER_K * a - 0.5 * HUBER_K * HUBER_K;
      const psi = a <= HUBER_K ? u : Math.sign(u) * HUBER_K;
      if (now[i] === 0) inside++;
      for (let c = 0; c < p; c++) {
        // Newton on Σ√w ψ(u) x = 0: G = Σ_inside w x xᵀ / s, b = Σ √w ψ x.
        b.set(c, 0, b.get(c, 0) + sw * psi * X[i * p + c]);
        if (now[i] === 0) for (let d = 0; d < p; d++) G.set(c, d, G.get(c, d) + (sw * sw * X[i * p + c] * X[i * p + d]) / s);
      }
    }
    if (sides && sides.every((v, i) => v === now[i])) return { beta, objective, inside };
    sides = now;
    const d = solve(G, b);
    for (let j = 0; j < p; j++) beta[j] += d.get(j, 0);
  }
  throw new Error('reference Newton did not settle');
}

function expectExact(pr: LinearProblem, got: FitResult, what: string): void {
  expect(got.status, what).toBe('ok');
  const ref = referenceHuber(pr, got.scale, got.coefficients);
  ref.beta.forEach((b, j) => expect(Math.abs(got.coefficients[j] - b), `${what}: β${j} vs dense Newton (ml-matrix)`).toBeLessThanOrEqual(1e-10 * Math.max(Math.abs(b), 1)));
  expect(Math.abs(got.objective - ref.objective), `${what}: Σρ vs brute force`).toBeLessThanOrEqual(1e-9 * ref.objective);
  // The cold plain fitter on the same rows: the same scale (MAD of the exact L1 fit; two routes to
  // the same vertex round residuals of ~1.1e5 m readings differently, ~1e-11 relative) and estimate.
  const cold = fitHuber(pr);
  expect(Math.abs(got.scale - cold.scale), `${what}: scale vs cold`).toBeLessThanOrEqual(1e-10 * cold.scale);
  cold.coefficients.forEach((c, j) => expect(Math.abs(got.coefficients[j] - c), `${what}: β${j} vs cold`).toBeLessThanOrEqual(1e-9 * Math.max(Math.abs(c), 1)));
  const gotCov = got.covariance;
  const coldCov = cold.covariance;
  expect(gotCov && coldCov, `${what}: covariance defined`).toBeTruthy();
  if (gotCov && coldCov) coldCov.forEach((c, j) => expect(Math.abs(gotCov[j] - c), `${what}: covariance[${j}] vs cold`).toBeLessThanOrEqual(1e-8 * Math.abs(coldCov[0])));
  // Lazily computed weights: ψ(u)/u per row, by brute force on a sample of rows.
  const w = got.robustWeights;
  expect(w?.length).toBe(pr.n);
  for (let i = 0; i < pr.n; i += 37) {
    const sw = pr.weights ? Math.sqrt(pr.weights[i]) : 1;
    let f = 0;
    for (let j = 0; j < pr.p; j++) f += pr.X[i * pr.p + j] * got.coefficients[j];
    const a = Math.abs((sw * (pr.y[i] - f)) / got.scale);
    expect(w?.[i], `${what}: weight of row ${i}`).toBeCloseTo(a <= HUBER_K ? 1 : HUBER_K / a, 12);
  }
}

describe('fit session: Huber refits from the kept partition sums', () => {
  for (const [p, weighted, seed] of [[2, false, 41], [3, false, 42], [2, true, 43], [3, true, 44]] as const) {
    it(`p = ${p}${weighted ? ', weighted rows' : ''}, seed ${seed}: one reading at a time, exact at every step`, () => {
      const full = problemOf(3030, p, seed, weighted);
      const session = createFitSession(head(full, 3000));
      expectExact(head(full, 3000), session.fit('huber'), 'first fit');
      let keptCount = 0;
      for (let n = 3001; n <= 3030; n++) {
        session.append([rowOf(full, n - 1)]);
        const got = session.fit('huber');
        if (got.reason.includes('partition kept')) keptCount++;
        if (n % 6 === 0 || n === 3030) expectExact(head(full, n), got, `after row ${n}`);
      }
      // The point of the kept sums: most refits after one reading need no pass over the data.
      expect(keptCount).toBeGreaterThanOrEqual(20);
    });
  }

  it('a gross outlier and a reading right at the threshold appended: still the exact estimate', () => {
    const full = problemOf(2000, 2, 45, false);
    const session = createFitSession(full);
    const first = session.fit('huber');
    const b = first.coefficients;
    const x = 0.37;
    const atK = b[0] + b[1] * x + HUBER_K * first.scale * (1 - 1e-13);
    session.append([{ x: [1, x], y: b[0] + b[1] * x + 250 }, { x: [1, 0.5], y: atK }]);
    const got = session.fit('huber');
    const pr = session.problem;
    expectExact(pr, got, 'outlier + threshold row');
  });

  it('rollback, then a different reading: the answer for the new rows, not a mix', () => {
    const full = problemOf(2500, 3, 46, false);
    const session = createFitSession(head(full, 2400));
    session.fit('huber');
    session.checkpoint();
    for (const i of [2400, 2450, 2499]) {
      session.rollback();
      session.append([rowOf(full, i)]);
      const got = session.fit('huber');
      const rows: LinearProblem = { n: 2401, p: 3, X: new Float64Array(2401 * 3), y: new Float64Array(2401) };
      rows.X.set(full.X.subarray(0, 2400 * 3));
      rows.X.set(full.X.subarray(i * 3, i * 3 + 3), 2400 * 3);
      rows.y.set(full.y.subarray(0, 2400));
      rows.y[2400] = full.y[i];
      expectExact(rows, got, `rollback then row ${i}`);
    }
  });

  it(`more than ${HUBER_KEPT_MAX_ADDED} readings since the base: the plain fitter rebuilds it, still exact`, () => {
    const full = problemOf(2000 + HUBER_KEPT_MAX_ADDED + 10, 2, 47, false);
    const session = createFitSession(head(full, 2000));
    session.fit('huber');
    const rows: SessionRow[] = [];
    for (let i = 2000; i < full.n; i++) rows.push(rowOf(full, i));
    session.append(rows);
    const got = session.fit('huber');
    expect(got.reason).toContain('by IRLS');
    expectExact(full, got, 'rebuilt');
    session.append([{ x: [1, 0.2], y: 110574 + 1120 * 0.2 + 3 }]);
    expect(session.fit('huber').reason).toContain('partition kept');
  });
});
