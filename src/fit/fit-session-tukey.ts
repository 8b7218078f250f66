// Tukey's biweight M-estimate kept by a fit session: a refit after one more reading by Newton's
// method on kept polynomial moments, without a pass over the data.
//
// Why it works: inside |u| ≤ c (uᵢ = √wᵢrᵢ/s) the biweight's ρ, ψ and ψ′ are polynomials in u
// (Beaton & Tukey 1974):  ρ = u²/2 − u⁴/(2c²) + u⁶/(6c⁴),  ψ = u − 2u³/c² + u⁵/c⁴,
// ψ′ = 1 − 6u²/c² + 5u⁴/c⁴; outside, ρ = c²/6 and ψ = ψ′ = 0. With rᵢ = r⁰ᵢ − xᵢᵀδ about a base
// β⁰ (β = β⁰ + δ), every sum the Newton step needs — Σ√wψ(u)x, Σwψ′(u)xxᵀ and Σρ over the inside
// readings — is a polynomial in δ whose coefficients are the moments
//   B(q, e, μ) = Σ_inside w^q·(r⁰)^e·x^μ,   e + |μ| = 2q,  q = 1, 2, 3
// (binomial expansion of (r⁰ − xᵀδ)^m, multinomial expansion of (xᵀδ)^l). The session keeps those
// moments (84 + 35 + 10 per row for p = 3); the scale s only enters as the polynomials'
// coefficients, so a new MAD scale is free. Newton runs on the moments to convergence; what must
// be proved is that the inside set is the same — as for Huber (fit-session-huber.ts): readings
// near |u| = c at the base and every reading added since are tested one by one (one that crossed
// moves in or out of the moments), and a bound over the columns' ranges covers every other one.
// Tukey's ρ is not convex: the Newton limit must have a positive definite Hessian (a local
// minimum), and it is the one next to the previous answer, which is what the plain warm refit
// (irls.ts, Newton from the previous answer) also converges to. Any failure: the plain fitter.
import { defineCachedField } from './cached-field.ts';
import { choleskyUpper } from './linear-solve.ts';
import { mEstimateCovariance } from './m-covariance.ts';
import { residualsOf } from './problem.ts';
import { smallCopy } from './small-array.ts';
import type { RhoFunction } from './rho-function.ts';
import type { FitResult, LinearProblem } from './types.ts';

/** Rows added since the base beyond which it is rebuilt. */
export const TUKEY_KEPT_MAX_ADDED = 512;
/** Newton steps on the moments before giving up (quadratic convergence needs 2–4 from a warm start). */
const MAX_NEWTON = 30;
/** Inside-set corrections before giving up. */
const MAX_RESOLVES = 20;
/** Relative step at which Newton on the moments has converged (below the IRLS tolerance of 1e-12). */
const STEP_TOL = 1e-14;
/** The bound must stay below this share of the margin (room for rounding of r⁰ and s). */
const BOUND_SHARE = 0.5;

/** Exponent vectors of the monomials of degree d in p variables, and their index by key. */
interface Monomials {
  list: Int8Array[];
  index: Map<string, number>;
}

const monomialCache = new Map<string, Monomials>();

function monomials(p: number, d: number): Monomials {
  const key = `${p}:${d}`;
  let m = monomialCache.get(key);
  if (!m) {
    const list: Int8Array[] = [];
    const rec = (j: number, left: number, cur: number[]): void => {
      if (j === p - 1) {
        list.push(Int8Array.from([...cur, left]));
        return;
      }
      for (let a = left; a >= 0; a--) rec(j + 1, left - a, [...cur, a]);
    };
    rec(0, d, []);
    m = { list, index: new Map(list.map((e, i) => [e.join(','), i])) };
    monomialCache.set(key, m);
  }
  return m;
}

/**
 * All moments B(q, e, μ) in one flat array: block (q, e) starts at offsets[q − 1][e] and holds the
 * monomials μ of degree 2q − e in the order of monomials(p, 2q − e).
 */
type Moments = Float64Array;

interface Layout {
  offsets: number[][];
  /** The monomials of each block, lists[q − 1][e] = monomials(p, 2q − e).list (looked up once, not per row). */
  lists: Int8Array[][][];
  size: number;
}

const layoutCache = new Map<number, Layout>();

function layoutOf(p: number): Layout {
  let l = layoutCache.get(p);
  if (!l) {
    const offsets: number[][] = [];
    const lists: Int8Array[][][] = [];
    let size = 0;
    for (let q = 1; q <= 3; q++) {
      const row: number[] = [];
      const blocks: Int8Array[][] = [];
      for (let e = 0; e <= 2 * q; e++) {
        row.push(size);
        const { list } = monomials(p, 2 * q - e);
        blocks.push(list);
        size += list.length;
      }
      offsets.push(row);
      lists.push(blocks);
    }
    l = { offsets, lists, size };
    layoutCache.set(p, l);
  }
  return l;
}

function emptyMoments(p: number): Moments {
  return new Float64Array(layoutOf(p).size);
}

/** applyRow's powers, reused (an off-heap allocation per row would cost more than the row: see EvalWork). */
let rowPowers = new Float64Array(3 * 7);

/** Adds (sign = +1) or removes (−1) one inside row's moments. */
function applyRow(m: Moments, x: ArrayLike<number>, p: number, r0: number, w: number, sign: number): void {
  const { offsets, lists } = layoutOf(p);
  // powers[j·7 + k] = x_j^k, k ≤ 6
  if (rowPowers.length < p * 7) rowPowers = new Float64Array(p * 7);
  const powers = rowPowers;
  for (let j = 0; j < p; j++) {
    powers[j * 7] = 1;
    for (let k = 1; k <= 6; k++) powers[j * 7 + k] = powers[j * 7 + k - 1] * x[j];
  }
  let wq = sign;
  for (let q = 1; q <= 3; q++) {
    wq *= w;
    let re = wq;
    for (let e = 0; e <= 2 * q; e++) {
      const list = lists[q - 1][e];
      const off = offsets[q - 1][e];
      for (let t = 0; t < list.length; t++) {
        const mu = list[t];
        let v = re;
        for (let j = 0; j < p; j++) v *= powers[j * 7 + mu[j]];
        m[off + t] += v;
      }
      re *= r0;
    }
  }
}

function factorial(k: number): number {
  let f = 1;
  for (let i = 2; i <= k; i++) f *= i;
  return f;
}

function binomial(m: number, l: number): number {
  return factorial(m) / (factorial(l) * factorial(m - l));
}

/**
 * The sums one Newton step needs, compiled once per p into flat arrays (the step runs a few times
 * per refit: string-keyed plan lookups and per-term objects were half of a refit's time).
 * S(q, m, γ) = Σ_inside w^q x^γ (r⁰ − xᵀδ)^m from the moments:
 * Σ_l C(m, l)(−1)^l Σ_{|α| = l} (l!/α!) δ^α B(q, m − l, γ + α), with m + |γ| = 2q. Sum k's terms are
 * [start[k], start[k + 1]): moment index, coefficient, and which δ^α (alphas, every |α| ≤ 6, each
 * evaluated once per step: the terms then cost two multiplications each, ~16 → ~3 ns a term).
 * Sums in order: for each j, F's (q, m) = (1, 1), (2, 3), (3, 5) at γ = eⱼ; for each k ≥ j, M's
 * (1, 0), (2, 2), (3, 4) at γ = eⱼ + e_k; then Σρ's (1, 2), (2, 4), (3, 6) at γ = 0.
 */
interface Program {
  start: Int32Array;
  index: Int32Array;
  coef: Float64Array;
  alpha: Int32Array;
  /** Exponents of the δ monomials, p per monomial. */
  alphas: Int32Array;
}

const programCache = new Map<number, Program>();

function programOf(p: number): Program {
  let prog = programCache.get(p);
  if (prog) return prog;
  const { offsets } = layoutOf(p);
  const start: number[] = [0];
  const index: number[] = [];
  const coef: number[] = [];
  const alpha: number[] = [];
  const alphas: number[] = [];
  const alphaAt = new Map<string, number>();
  const addSum = (q: number, m: number, gamma: number[]): void => {
    for (let l = 0; l <= m; l++) {
      const e = m - l;
      const target = monomials(p, 2 * q - e);
      const cl = binomial(m, l) * (l % 2 === 0 ? 1 : -1) * factorial(l);
      for (const a of monomials(p, l).list) {
        let c = cl;
        const mu: number[] = [];
        for (let j = 0; j < p; j++) {
          c /= factorial(a[j]);
          mu.push(gamma[j] + a[j]);
        }
        const key = a.join(',');
        if (!alphaAt.has(key)) {
          alphaAt.set(key, alphaAt.size);
          alphas.push(...a);
        }
        alpha.push(alphaAt.get(key) as number);
        index.push(offsets[q - 1][e] + (target.index.get(mu.join(',')) as number));
        coef.push(c);
      }
    }
    start.push(index.length);
  };
  const unit = (...js: number[]): number[] => {
    const g = new Array<number>(p).fill(0);
    for (const j of js) g[j] += 1;
    return g;
  };
  for (let j = 0; j < p; j++) {
    for (const [q, m] of [[1, 1], [2, 3], [3, 5]]) addSum(q, m, unit(j));
    for (let k = j; k < p; k++) for (const [q, m] of [[1, 0], [2, 2], [3, 4]]) addSum(q, m, unit(j, k));
  }
  for (const [q, m] of [[1, 2], [2, 4], [3, 6]]) addSum(q, m, unit());
  prog = { start: Int32Array.from(start), index: Int32Array.from(index), coef: Float64Array.from(coef), alpha: Int32Array.from(alpha), alphas: Int32Array.from(alphas) };
  programCache.set(p, prog);
  return prog;
}

/** The program's sums (a small kernel of its own, optimised whole: see least-absolute-descent.ts on on-stack replacement). */
function programSums(start: Int32Array, index: Int32Array, coef: Float64Array, alpha: Int32Array, mom: Moments, da: Float64Array, sums: Float64Array): void {
  for (let k = 0; k < sums.length; k++) {
    let total = 0;
    for (let t = start[k]; t < start[k + 1]; t++) total += coef[t] * mom[index[t]] * da[alpha[t]];
    sums[k] = total;
  }
}

/**
 * Work arrays of one Newton evaluation, one set per p, reused by every step: a typed array over 64
 * bytes lives outside V8's heap and costs ~1–2 µs to allocate (scratch.ts), as much as a step's
 * arithmetic. Only `newton` reads them, and nothing it returns is one of them.
 */
interface EvalWork {
  dp: Float64Array;
  da: Float64Array;
  sums: Float64Array;
  F: Float64Array;
  M: Float64Array;
  /** M's Cholesky factor R (M = RᵀR). */
  R: Float64Array;
  step: Float64Array;
}

const workCache = new Map<number, EvalWork>();

function workOf(p: number): EvalWork {
  let w = workCache.get(p);
  if (!w) {
    const { start, alphas } = programOf(p);
    w = {
      dp: new Float64Array(p * 7), da: new Float64Array(alphas.length / p), sums: new Float64Array(start.length - 1),
      F: new Float64Array(p), M: new Float64Array(p * p), R: new Float64Array(p * p), step: new Float64Array(p),
    };
    workCache.set(p, w);
  }
  return w;
}

/** Into work.F = Σ√wψ(u)x (p) and work.M = Σwψ′(u)xxᵀ (p×p) at δ, scale s, tuning c; returns the inside Σρ. */
function evaluate(mom: Moments, p: number, delta: Float64Array, s: number, c: number, work: EvalWork): number {
  const { start, index, coef, alpha, alphas } = programOf(p);
  const { dp, da, sums, F, M } = work;
  const c2 = c * c;
  // δⱼ^k for k ≤ 6, shared by every polynomial.
  for (let j = 0; j < p; j++) {
    dp[j * 7] = 1;
    for (let k = 1; k <= 6; k++) dp[j * 7 + k] = dp[j * 7 + k - 1] * delta[j];
  }
  const count = alphas.length / p;
  for (let a = 0; a < count; a++) {
    let v = 1;
    for (let j = 0; j < p; j++) v *= dp[j * 7 + alphas[a * p + j]];
    da[a] = v;
  }
  programSums(start, index, coef, alpha, mom, da, sums);
  let at = 0;
  for (let j = 0; j < p; j++) {
    F[j] = sums[at] / s - (2 * sums[at + 1]) / (c2 * s ** 3) + sums[at + 2] / (c2 * c2 * s ** 5);
    at += 3;
    for (let k = j; k < p; k++) {
      const v = sums[at] - (6 * sums[at + 1]) / (c2 * s * s) + (5 * sums[at + 2]) / (c2 * c2 * s ** 4);
      at += 3;
      M[j * p + k] = v;
      M[k * p + j] = v;
    }
  }
  return sums[at] / (2 * s * s) - sums[at + 1] / (2 * c2 * s ** 4) + sums[at + 2] / (6 * c2 * c2 * s ** 6);
}

/**
 * Solves M·x = F into `out` by Cholesky (linear-solve.ts `choleskyUpper`),
 * false when M is not positive definite: the test that the limit is a local minimum of Σρ (whose
 * Hessian is M/s²) and the step's solve in one factorisation.
 */
function solvePositiveDefinite(M: Float64Array, F: Float64Array, p: number, R: Float64Array, out: Float64Array): boolean {
  if (!choleskyUpper(M, p, R)) return false;
  // Rᵀy = F, then R·x = y.
  for (let j = 0; j < p; j++) {
    let v = F[j];
    for (let t = 0; t < j; t++) v -= R[t * p + j] * out[t];
    out[j] = v / R[j * p + j];
  }
  for (let j = p - 1; j >= 0; j--) {
    let v = out[j];
    for (let t = j + 1; t < p; t++) v -= R[j * p + t] * out[t];
    out[j] = v / R[j * p + j];
  }
  return true;
}

export interface TukeyKept {
  readonly c: number;
  readonly base: Float64Array;
  readonly s0: number;
  readonly margin: number;
  readonly colAbsMax: Float64Array;
  readonly sqrtWMax: number;
  readonly listed: Int32Array;
  /** 1 inside (in the moments), 0 outside. */
  readonly inside: Uint8Array;
  readonly moments: Moments;
  readonly insideCount: number;
  /** δ of the last answer (the next Newton start). */
  readonly delta: Float64Array;
  readonly rows: number;
  readonly baseRows: number;
}

/** Half-width of the listed band around |u| = c, in scale units (as keptMargin in fit-session-huber.ts). */
export function tukeyKeptMargin(n: number, p: number): number {
  return Math.max(0.005, 2 * Math.sqrt(p / n));
}

function sqrtWeight(problem: LinearProblem, i: number): number {
  return problem.weights ? Math.sqrt(problem.weights[i]) : 1;
}

function residualAt(problem: LinearProblem, i: number, beta: ArrayLike<number>): number {
  const { p, X, y } = problem;
  let f = 0;
  for (let j = 0; j < p; j++) f += X[i * p + j] * beta[j];
  return y[i] - f;
}

/** The base: one pass at the plain fitter's answer β⁰ and its scale s⁰ (the degree models, p ≤ 3). */
export function buildTukeyKept(problem: LinearProblem, beta: Float64Array, s0: number, c: number): TukeyKept | null {
  const { n, p, X } = problem;
  if (p > 3) return null;
  const moments = emptyMoments(p);
  const margin = tukeyKeptMargin(n, p);
  const colAbsMax = new Float64Array(p);
  let sqrtWMax = 0;
  const listed: number[] = [];
  const flags: number[] = [];
  let insideCount = 0;
  for (let i = 0; i < n; i++) {
    const sw = sqrtWeight(problem, i);
    sqrtWMax = Math.max(sqrtWMax, sw);
    const x = X.subarray(i * p, i * p + p);
    for (let j = 0; j < p; j++) colAbsMax[j] = Math.max(colAbsMax[j], Math.abs(x[j]));
    const r0 = residualAt(problem, i, beta);
    const a = Math.abs((sw * r0) / s0);
    const inside = a <= c;
    if (inside) {
      applyRow(moments, x, p, r0, sw * sw, 1);
      insideCount++;
    }
    if (Math.abs(a - c) < margin) {
      listed.push(i);
      flags.push(inside ? 1 : 0);
    }
  }
  return {
    c, base: Float64Array.from(beta), s0, margin, colAbsMax, sqrtWMax, listed: Int32Array.from(listed), inside: Uint8Array.from(flags),
    moments, insideCount, delta: new Float64Array(p), rows: n, baseRows: n,
  };
}

/** Newton on the moments from δ; null when it does not converge to a local minimum. */
function newton(mom: Moments, p: number, start: Float64Array, base: Float64Array, s: number, c: number): { delta: Float64Array; steps: number; rho: number } | null {
  const delta = Float64Array.from(start);
  const work = workOf(p);
  const { F, M, R, step } = work;
  for (let it = 1; it <= MAX_NEWTON; it++) {
    const rho = evaluate(mom, p, delta, s, c, work);
    // F(β) = Σ√wψx = 0; ∂F/∂β = −M/s, so the Newton step is δ += s·M⁻¹F.
    if (!solvePositiveDefinite(M, F, p, R, step)) return null;
    let change = 0;
    for (let j = 0; j < p; j++) {
      delta[j] += s * step[j];
      change = Math.max(change, Math.abs(s * step[j]) / Math.max(Math.abs(base[j] + delta[j]), s));
    }
    if (change <= STEP_TOL) return { delta, steps: it, rho };
  }
  return null;
}

/** The exact biweight estimate at scale s from the kept moments, with the next state; null: the plain fitter decides. */
export function refitTukeyKept(problem: LinearProblem, kept: TukeyKept, s: number, rho: RhoFunction, basis: Int32Array | undefined): { result: FitResult; kept: TukeyKept } | null {
  const { n, p, X } = problem;
  const { c, base, s0, margin } = kept;
  if (rho.tuning !== c || n < kept.rows || n - kept.baseRows > TUKEY_KEPT_MAX_ADDED) return null;
  const moments = smallCopy(kept.moments, kept.moments.length);
  const colAbsMax = Float64Array.from(kept.colAbsMax);
  let sqrtWMax = kept.sqrtWMax;
  const listed = new Int32Array(kept.listed.length + n - kept.rows);
  listed.set(kept.listed);
  const inside = new Uint8Array(listed.length);
  inside.set(kept.inside);
  let insideCount = kept.insideCount;
  const prevBeta = new Float64Array(p);
  for (let j = 0; j < p; j++) prevBeta[j] = base[j] + kept.delta[j];
  for (let i = kept.rows, at = kept.listed.length; i < n; i++, at++) {
    const sw = sqrtWeight(problem, i);
    sqrtWMax = Math.max(sqrtWMax, sw);
    const x = X.subarray(i * p, i * p + p);
    for (let j = 0; j < p; j++) colAbsMax[j] = Math.max(colAbsMax[j], Math.abs(x[j]));
    listed[at] = i;
    if (Math.abs((sw * residualAt(problem, i, prevBeta)) / s) <= c) {
      applyRow(moments, x, p, residualAt(problem, i, base), sw * sw, 1);
      inside[at] = 1;
      insideCount++;
    }
  }
  let solved: ReturnType<typeof newton> = null;
  let start = kept.delta;
  let resolves = 0;
  let moved = 0;
  const beta = new Float64Array(p);
  for (;;) {
    solved = newton(moments, p, start, base, s, c);
    if (!solved) return null;
    for (let j = 0; j < p; j++) beta[j] = base[j] + solved.delta[j];
    let changed = false;
    for (let t = 0; t < listed.length; t++) {
      const i = listed[t];
      const sw = sqrtWeight(problem, i);
      const now = Math.abs((sw * residualAt(problem, i, beta)) / s) <= c ? 1 : 0;
      if (now !== inside[t]) {
        applyRow(moments, X.subarray(i * p, i * p + p), p, residualAt(problem, i, base), sw * sw, now ? 1 : -1);
        insideCount += now ? 1 : -1;
        inside[t] = now;
        changed = true;
        moved++;
      }
    }
    if (!changed) break;
    if (++resolves > MAX_RESOLVES) return null;
    start = solved.delta;
  }
  let reach = 0;
  for (let j = 0; j < p; j++) reach += colAbsMax[j] * Math.abs(solved.delta[j]);
  const bound = sqrtWMax * reach + c * Math.abs(s - s0);
  if (!(bound < BOUND_SHARE * margin * s0)) return null;
  const coefficients = Float64Array.from(beta);
  const objective = solved.rho + ((c * c) / 6) * (n - insideCount);
  const result: FitResult = {
    estimator: 'tukey',
    status: 'ok',
    coefficients,
    residuals: new Float64Array(0),
    objective,
    scale: s,
    iterations: solved.steps,
    converged: true,
    reason: `tukey (tuning ${c}) at the fixed scale ${s.toPrecision(6)}: Newton on the fit session's kept moments, ${solved.steps} steps to a ` +
      `relative step ≤ ${STEP_TOL.toExponential(0)} at a local minimum (positive definite Hessian); the ${listed.length} readings near ±${c} or added since ` +
      `were tested one by one (${moved} moved in or out), every other reading provably kept its side (|Δu| ≤ ${(bound / s0).toExponential(1)} < ${margin.toPrecision(2)})`,
    robustWeights: new Float64Array(0),
  };
  if (basis) result.basis = basis;
  defineCachedField(result, 'residuals', () => residualsOf(problem, coefficients));
  defineCachedField(result, 'robustWeights', () => {
    const r = result.residuals;
    const out = new Float64Array(n);
    for (let i = 0; i < n; i++) out[i] = rho.weight((sqrtWeight(problem, i) * r[i]) / s);
    return out;
  });
  // The covariance's sums (Σψ′, Σψ′², Σψ²) need polynomials of degree 8 and 10: one pass when first read.
  defineCachedField(result, 'covariance', () => {
    const r = result.residuals;
    let sumD = 0;
    let sumD2 = 0;
    let sumPsi2 = 0;
    for (let i = 0; i < n; i++) {
      const u = (sqrtWeight(problem, i) * r[i]) / s;
      if (Math.abs(u) > c) continue;
      const qq = (u * u) / (c * c);
      const t = 1 - qq;
      const h = t * (1 - 5 * qq);
      const ps = u * t * t;
      sumD += h;
      sumD2 += h * h;
      sumPsi2 += ps * ps;
    }
    const cov = mEstimateCovariance(problem, s, sumD, sumD2, sumPsi2);
    return cov ? cov() : undefined;
  });
  return {
    result,
    kept: { c, base, s0, margin, colAbsMax, sqrtWMax, listed, inside, moments, insideCount, delta: Float64Array.from(solved.delta), rows: n, baseRows: kept.baseRows },
  };
}
