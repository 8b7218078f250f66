// The specialised fused passes (src/fit/irls-huber-pass.ts, irls-tukey-pass.ts via
// irls-fused-pass.ts) against a direct per-row computation written here from the textbook
// formulas — Huber 1964: ρ = u²/2 or k|u| − k²/2, ψ = clamp(u, ±k), ψ′ = [|u| ≤ k]; Tukey's
// biweight (Beaton & Tukey 1974): ρ = c²/6·(1 − (1 − (u/c)²)³), ψ = u(1 − (u/c)²)², ψ′ =
// (1 − (u/c)²)(1 − 5(u/c)²) inside |u| ≤ c, ρ = c²/6 and ψ = ψ′ = 0 outside — with the normal
// equations G = Σ g·z zᵀ (g = ψ′ for Newton, ψ/u for IRLS), b = Σ (ψ/u)·r·z on the centred,
// scaled columns of weighted-normal.ts. Data: the benchmark's seeded invented generator
// (bench/generate.ts), at a coefficient vector moved off the fit so both sides of ±k are populated.
import { describe, expect, it } from 'vitest';
import { designMatrix, generateDataset } from '../../bench/generate.ts';
import { HUBER_K, huberRho } from '../../src/fit/huber.ts';
import { createHuberBand } from '../../src/fit/huber-active-set.ts';
import { fusedEvaluate, fusedPass, type FusedSums } from '../../src/fit/irls-fused-pass.ts';
import { interceptColumn } from '../../src/fit/problem.ts';
import { TUKEY_C, tukeyRho } from '../../src/fit/tukey.ts';
import type { LinearProblem } from '../../src/fit/types.ts';
import { createNormalWorkspace, type NormalWorkspace } from '../../src/fit/weighted-normal.ts';
import { within } from '../helpers/within.ts';

/** Rounding of a sequential sum of n terms, relative to Σ|term| (n·ε with room). */
const SUM_TOL = 1e-12;
const SOURCE = 'direct per-row sums in this test';

type Estimator = 'huber' | 'tukey';

function problemOf(n: number, p: 2 | 3, seed: number): LinearProblem {
  const { x, y } = generateDataset({ n, p, seed });
  return { n, p, X: designMatrix(x, p), y };
}

/** Per-row ρ, ψ/u, ψ′ from the formulas above (written out, not the library's functions). */
function rowTerms(estimator: Estimator, t: number, u: number): { rho: number; v: number; d: number; psi: number } {
  const a = Math.abs(u);
  if (estimator === 'huber') {
    return a <= t ? { rho: u * u / 2, v: 1, d: 1, psi: u } : { rho: t * a - t * t / 2, v: t / a, d: 0, psi: Math.sign(u) * t };
  }
  if (a > t) return { rho: t * t / 6, v: 0, d: 0, psi: 0 };
  const q = (u / t) ** 2;
  return { rho: (t * t / 6) * (1 - (1 - q) ** 3), v: (1 - q) ** 2, d: (1 - q) * (1 - 5 * q), psi: u * (1 - q) ** 2 };
}

interface Direct {
  residuals: number[]; weights: number[]; objective: number; sumPsi2: number; sumD: number; sumD2: number; changed: boolean;
  gram: number[]; rhs: number[];
  /** Σ|term| per quantity, the scale of each tolerance. */
  absGram: number[]; absRhs: number[]; absObjective: number; absPsi2: number; absD: number;
}

function direct(problem: LinearProblem, estimator: Estimator, t: number, beta: Float64Array, s: number, ws: NormalWorkspace, newton: boolean,
  previousWeights: Float64Array): Direct {
  const { n, p, X, y } = problem;
  const out: Direct = {
    residuals: [], weights: [], objective: 0, sumPsi2: 0, sumD: 0, sumD2: 0, changed: false,
    gram: new Array<number>(p * p).fill(0), rhs: new Array<number>(p).fill(0),
    absGram: new Array<number>(p * p).fill(0), absRhs: new Array<number>(p).fill(0), absObjective: 0, absPsi2: 0, absD: 0,
  };
  for (let i = 0; i < n; i++) {
    let f = 0;
    for (let j = 0; j < p; j++) f += X[i * p + j] * beta[j];
    const r = y[i] - f;
    const { rho, v, d, psi } = rowTerms(estimator, t, r / s);
    out.residuals.push(r);
    out.weights.push(v);
    out.objective += rho;
    out.absObjective += Math.abs(rho);
    out.sumPsi2 += psi * psi;
    out.absPsi2 += psi * psi;
    out.sumD += d;
    out.sumD2 += d * d;
    out.absD += Math.abs(d) + d * d;
    if ((previousWeights[i] === 1) !== (d === 1)) out.changed = true;
    const z = Array.from({ length: p }, (_, j) => (X[i * p + j] - ws.shift[j]) * ws.scale[j]);
    const g = newton ? d : v;
    for (let a = 0; a < p; a++) {
      out.rhs[a] += v * r * z[a];
      out.absRhs[a] += Math.abs(v * r * z[a]);
      for (let b = a; b < p; b++) {
        out.gram[a * p + b] += g * z[a] * z[b];
        out.absGram[a * p + b] += Math.abs(g * z[a] * z[b]);
      }
    }
  }
  if (estimator === 'tukey') out.changed = true;
  return out;
}

function setup(p: 2 | 3, estimator: Estimator) {
  const problem = problemOf(3001, p, 7 + p);
  const t = estimator === 'huber' ? HUBER_K : TUKEY_C;
  const rho = estimator === 'huber' ? huberRho(t) : tukeyRho(t);
  // Off the fit: the intercept moved by about a scale, the slope by a little.
  const beta = Float64Array.from(p === 3 ? [110574 + 3, 1120 - 4, 1.2] : [110574 + 3, 1120 - 4]);
  // A power of two: r·(1/s) = r/s exactly, so the side tests below match the pass row for row.
  const s = 8;
  const ws = createNormalWorkspace(problem, interceptColumn(problem));
  return { problem, t, rho, beta, s, ws };
}

function expectSums(what: string, sums: FusedSums, d: Direct, withSecondMoment: boolean): void {
  within(sums.objective, d.objective, SUM_TOL * d.absObjective, '', `${what} Σρ`, { source: SOURCE });
  within(sums.sumPsi2, d.sumPsi2, SUM_TOL * d.absPsi2, '', `${what} Σψ²`, { source: SOURCE });
  within(sums.sumD, d.sumD, SUM_TOL * d.absD, '', `${what} Σψ′`, { source: SOURCE });
  if (withSecondMoment) within(sums.sumD2, d.sumD2, SUM_TOL * d.absD, '', `${what} Σψ′²`, { source: SOURCE });
  expect(sums.changed, `${what} side-change flag`).toBe(d.changed);
}

function expectRows(what: string, residuals: Float64Array, weights: Float64Array, d: Direct): void {
  for (let i = 0; i < residuals.length; i++) {
    // Same formula and order of operations as the pass: bit for bit.
    if (residuals[i] !== d.residuals[i]) expect.fail(`${what} residual ${i}: ${residuals[i]} against ${d.residuals[i]}`);
    within(weights[i], d.weights[i], 4 * Number.EPSILON, '', `${what} weight ${i}`, { source: SOURCE });
  }
}

describe('fused passes against direct per-row sums', () => {
  for (const estimator of ['huber', 'tukey'] as const) {
    for (const p of [2, 3] as const) {
      for (const newton of [true, false]) {
        it(`${estimator}, p = ${p}, ${newton ? 'Newton' : 'IRLS'} plan: rows, sums and normal equations`, () => {
          const { problem, t, rho, beta, s, ws } = setup(p, estimator);
          const { n } = problem;
          // Previous weights from another β, so some rows change side (Huber's flag).
          const previous = new Float64Array(n);
          const before = Float64Array.from(beta);
          before[0] -= 2;
          fusedPass(problem, rho, before, s, new Float64Array(n), previous, false, ws, newton, { objective: 0, changed: false, sumPsi2: 0, sumD: 0, sumD2: 0 });
          const d = direct(problem, estimator, t, beta, s, ws, newton, previous);
          expect(d.changed).toBe(true);
          const residuals = new Float64Array(n);
          const weights = Float64Array.from(previous);
          const sums: FusedSums = { objective: 0, changed: false, sumPsi2: 0, sumD: 0, sumD2: 0 };
          fusedPass(problem, rho, beta, s, residuals, weights, false, ws, newton, sums);
          expectRows('pass', residuals, weights, d);
          expectSums('pass', sums, d, true);
          for (let a = 0; a < p; a++) {
            within(ws.rhs[a], d.rhs[a], SUM_TOL * d.absRhs[a], '', `b[${a}]`, { source: SOURCE });
            for (let b = a; b < p; b++) within(ws.gram[a * p + b], d.gram[a * p + b], SUM_TOL * d.absGram[a * p + b], '', `G[${a}][${b}]`, { source: SOURCE });
          }
          // Residuals handed in (the L1 start's): the same sums, the array left as it was.
          const ready = Float64Array.from(d.residuals);
          const again = Float64Array.from(previous);
          fusedPass(problem, rho, beta, s, ready, again, true, ws, newton, sums);
          expectRows('pass from given residuals', ready, again, d);
          expectSums('pass from given residuals', sums, d, true);
          // The evaluation pass: the same rows and sums.
          const evalResiduals = new Float64Array(n);
          const evalWeights = Float64Array.from(previous);
          fusedEvaluate(problem, rho, beta, s, evalResiduals, evalWeights, ws, sums);
          expectRows('evaluation', evalResiduals, evalWeights, d);
          expectSums('evaluation', sums, d, true);
        });
      }
    }
  }

  for (const p of [2, 3] as const) {
    it(`huber, p = ${p}: the band lists exactly the rows with ||u| − k| < margin, and the column ranges`, () => {
      const { problem, t, rho, beta, s, ws } = setup(p, 'huber');
      const { n, X } = problem;
      const band = createHuberBand(problem);
      const residuals = new Float64Array(n);
      fusedPass(problem, rho, beta, s, residuals, new Float64Array(n), false, ws, true, { objective: 0, changed: false, sumPsi2: 0, sumD: 0, sumD2: 0 }, band);
      const d = direct(problem, 'huber', t, beta, s, ws, true, new Float64Array(n));
      const expected = d.residuals.map((r, i) => ({ r, i })).filter(({ r }) => Math.abs(Math.abs(r / s) - t) < band.margin);
      expect(expected.length).toBeGreaterThan(10);
      expect(band.overflowed).toBe(false);
      expect(band.count).toBe(expected.length);
      expected.forEach(({ r, i }, row) => {
        expect(band.r[row], `listed residual ${row}`).toBe(r);
        for (let j = 0; j < p; j++) expect(band.x[row * p + j], `listed x[${row}][${j}]`).toBe(X[i * p + j]);
      });
      for (let j = 0; j < p; j++) {
        let lo = Infinity, hi = -Infinity;
        for (let i = 0; i < n; i++) {
          lo = Math.min(lo, X[i * p + j]);
          hi = Math.max(hi, X[i * p + j]);
        }
        expect(band.colMin[j], `column ${j} min`).toBe(lo);
        expect(band.colMax[j], `column ${j} max`).toBe(hi);
      }
    });
  }
});
