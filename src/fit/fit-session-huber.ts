// Huber's M-estimate kept by a fit session: a refit after one more reading without a pass over
// the data.
//
// Why it can be exact: at a fixed scale s, Huber's ρ is quadratic for |u| ≤ k and linear outside
// (uᵢ = √wᵢrᵢ/s), so once every reading's side is known — inside Q, above +k, below −k — the
// estimate solves one p×p system (Huber, "Robust Statistics", 1981, §7.8):
//   Σ_Q wᵢxᵢxᵢᵀ·δ = Σ_Q wᵢxᵢr⁰ᵢ + k·s·h,  h = Σ_outside sign(uᵢ)√wᵢxᵢ,  β = β⁰ + δ,
// with r⁰ the residuals at a base β⁰ (correction form: the sums hold metres, not the 1e5 m
// readings). The session keeps those sums over all rows. A new reading adds its terms; a new
// scale only enters through k·s·h. What must be proved is that no reading changed side:
// - readings near ±k at the base (||u⁰| − k| < margin, the same margin as huber-active-set.ts),
//   and every reading added since the base, are listed and tested one by one at the new β and s;
//   one that crossed moves between the sums (O(p²)) and the system is solved again;
// - every other reading is at least margin·s⁰ away from its threshold k·s⁰/√wᵢ in residual
//   units, and moved by at most |xᵢᵀδ| ≤ Σⱼ max|xⱼ|·|δⱼ| while its threshold moved by k|s − s⁰|/√wᵢ:
//   √w_max·Σⱼ max|xⱼ||δⱼ| + k|s − s⁰| < margin·s⁰ keeps all of them on their side.
// Either proof failing sends the caller to the plain fitter (irls.ts), whose answer becomes the
// next base. The objective and the covariance's sums follow from the same sums, so the result
// carries every field of the plain fit; residuals and robust weights are computed when first read.
import { defineCachedField } from './cached-field.ts';
import { factorLu, solveLu } from './linear-solve.ts';
import { mEstimateCovariance } from './m-covariance.ts';
import { residualsOf } from './problem.ts';
import type { RhoFunction } from './rho-function.ts';
import type { FitResult, LinearProblem } from './types.ts';

/**
 * Half-width of the listed band around |u| = k, in scale units. A refit after one more reading
 * moves β by O(1/n) of the noise, far less than the cold active set's step from the L1 start
 * (huber-active-set.ts uses 12√(p/n)); 2√(p/n), at least 0.005, lists ~1.6 % of the rows at
 * n = 10⁴ (normal density 0.16 at ±1.345, four half-bands) and leaves room for hundreds of
 * appended readings before the bound fails and the base is rebuilt.
 */
export function keptMargin(n: number, p: number): number {
  return Math.max(0.005, 2 * Math.sqrt(p / n));
}

/** Rows added since the base beyond which it is rebuilt (each is tested one by one on every refit). */
export const HUBER_KEPT_MAX_ADDED = 512;
/** Side re-solves before the kept sums give up (the plain fitter then decides). */
export const HUBER_KEPT_MAX_RESOLVES = 20;
/** The bound must stay below this share of the margin: room for the rounding of r⁰ and s. */
const BOUND_SHARE = 0.5;

/** The sums over the current partition (a fresh copy per fit: checkpoints share the old ones). */
interface PartitionSums {
  /** Σ_Q w x xᵀ, row-major p×p. */
  G: Float64Array;
  /** Σ_Q w x r⁰. */
  b: Float64Array;
  /** Σ_Q w r⁰². */
  S: number;
  /** Σ_out sign·√w·x. */
  h: Float64Array;
  /** Σ_out sign·√w·r⁰. */
  a: number;
  inside: number;
}

/** What one kept Huber fit leaves for the next. Fields are never written after it is made. */
export interface HuberKept {
  readonly k: number;
  readonly base: Float64Array;
  readonly s0: number;
  readonly margin: number;
  /** max |xᵢⱼ| per column and max √wᵢ, over every row summed. */
  readonly colAbsMax: Float64Array;
  readonly sqrtWMax: number;
  /** Rows tested one by one: near ±k at the base, then every row added since. */
  readonly listed: Int32Array;
  /** Their sides in the sums: −1, 0 (inside), +1. */
  readonly sides: Int8Array;
  readonly sums: PartitionSums;
  readonly rows: number;
  /** Rows when the base was made (rows since are all listed). */
  readonly baseRows: number;
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

/** Adds (sign = +1) or removes (−1) row i's terms for side `side` to the sums. */
function applyRow(sums: PartitionSums, problem: LinearProblem, i: number, r0: number, side: number, sign: number): void {
  const { p, X } = problem;
  const sw = sqrtWeight(problem, i);
  if (side === 0) {
    const w = sw * sw;
    for (let j = 0; j < p; j++) {
      const xj = X[i * p + j];
      sums.b[j] += sign * w * xj * r0;
      for (let l = 0; l < p; l++) sums.G[j * p + l] += sign * w * xj * X[i * p + l];
    }
    sums.S += sign * w * r0 * r0;
    sums.inside += sign;
  } else {
    for (let j = 0; j < p; j++) sums.h[j] += sign * side * sw * X[i * p + j];
    sums.a += sign * side * sw * r0;
  }
}

/** Side of a reading with whitened residual ρ at scale s: inside when |ρ/s| ≤ k, as the IRLS passes decide it. */
function sideOf(rho: number, s: number, k: number): number {
  const u = rho / s;
  return Math.abs(u) <= k ? 0 : u > 0 ? 1 : -1;
}

/** The base: one pass over all rows at the plain fitter's exact answer β⁰ and its scale s⁰. */
export function buildHuberKept(problem: LinearProblem, beta: Float64Array, s0: number, k: number): HuberKept {
  const { n, p, X } = problem;
  const sums: PartitionSums = { G: new Float64Array(p * p), b: new Float64Array(p), S: 0, h: new Float64Array(p), a: 0, inside: 0 };
  const margin = keptMargin(n, p);
  const colAbsMax = new Float64Array(p);
  let sqrtWMax = 0;
  const listed: number[] = [];
  const sides: number[] = [];
  for (let i = 0; i < n; i++) {
    const sw = sqrtWeight(problem, i);
    sqrtWMax = Math.max(sqrtWMax, sw);
    for (let j = 0; j < p; j++) colAbsMax[j] = Math.max(colAbsMax[j], Math.abs(X[i * p + j]));
    const r0 = residualAt(problem, i, beta);
    const side = sideOf(sw * r0, s0, k);
    applyRow(sums, problem, i, r0, side, 1);
    if (Math.abs(Math.abs((sw * r0) / s0) - k) < margin) {
      listed.push(i);
      sides.push(side);
    }
  }
  return {
    k, base: Float64Array.from(beta), s0, margin, colAbsMax, sqrtWMax,
    listed: Int32Array.from(listed), sides: Int8Array.from(sides), sums, rows: n, baseRows: n,
  };
}

function copySums(s: PartitionSums): PartitionSums {
  return { G: Float64Array.from(s.G), b: Float64Array.from(s.b), S: s.S, h: Float64Array.from(s.h), a: s.a, inside: s.inside };
}

/** δ = G⁻¹(b + k·s·h); null when G is singular or nearly so (fewer than p informative rows inside). */
function solveDelta(sums: PartitionSums, p: number, k: number, s: number): Float64Array | null {
  const f = factorLu(sums.G, p);
  if (f.singular) return null;
  let gMax = 0;
  for (let j = 0; j < p; j++) gMax = Math.max(gMax, Math.abs(sums.G[j * p + j]));
  for (let j = 0; j < p; j++) if (!(Math.abs(f.lu[j * p + j]) > 1e-12 * gMax)) return null;
  const rhs = new Float64Array(p);
  for (let j = 0; j < p; j++) rhs[j] = sums.b[j] + k * s * sums.h[j];
  return solveLu(f, rhs);
}

/**
 * The exact Huber estimate at scale s on all rows from the kept sums, with the next kept state;
 * null when the sides cannot be proved (the caller then runs the plain fitter and rebuilds).
 */
export function refitHuberKept(problem: LinearProblem, kept: HuberKept, s: number, rho: RhoFunction, basis: Int32Array | undefined): { result: FitResult; kept: HuberKept } | null {
  const { n, p } = problem;
  const { k, base, s0, margin } = kept;
  if (rho.tuning !== k || n < kept.rows || n - kept.baseRows > HUBER_KEPT_MAX_ADDED) return null;
  const sums = copySums(kept.sums);
  const colAbsMax = Float64Array.from(kept.colAbsMax);
  let sqrtWMax = kept.sqrtWMax;
  const listed = new Int32Array(kept.listed.length + n - kept.rows);
  listed.set(kept.listed);
  const sides = new Int8Array(listed.length);
  sides.set(kept.sides);
  // New rows join the sums on the side the base β⁰ gives them at the new scale; the side loop
  // below moves any that is wrong.
  for (let i = kept.rows, at = kept.listed.length; i < n; i++, at++) {
    const sw = sqrtWeight(problem, i);
    sqrtWMax = Math.max(sqrtWMax, sw);
    for (let j = 0; j < p; j++) colAbsMax[j] = Math.max(colAbsMax[j], Math.abs(problem.X[i * p + j]));
    const r0 = residualAt(problem, i, base);
    const side = sideOf(sw * r0, s, k);
    applyRow(sums, problem, i, r0, side, 1);
    listed[at] = i;
    sides[at] = side;
  }
  let delta: Float64Array | null = null;
  let beta = new Float64Array(p);
  let resolves = 0;
  let moved = 0;
  for (;;) {
    delta = solveDelta(sums, p, k, s);
    if (!delta) return null;
    for (let j = 0; j < p; j++) beta[j] = base[j] + delta[j];
    let changed = false;
    for (let t = 0; t < listed.length; t++) {
      const i = listed[t];
      const side = sideOf(sqrtWeight(problem, i) * residualAt(problem, i, beta), s, k);
      if (side !== sides[t]) {
        const r0 = residualAt(problem, i, base);
        applyRow(sums, problem, i, r0, sides[t], -1);
        applyRow(sums, problem, i, r0, side, 1);
        sides[t] = side;
        changed = true;
        moved++;
      }
    }
    if (!changed) break;
    if (++resolves > HUBER_KEPT_MAX_RESOLVES) return null;
  }
  // Every unlisted reading: moved by ≤ √w_max·Σ max|xⱼ||δⱼ|, threshold by ≤ k|s − s⁰|.
  let bound = k * Math.abs(s - s0);
  let reach = 0;
  for (let j = 0; j < p; j++) reach += colAbsMax[j] * Math.abs(delta[j]);
  bound += sqrtWMax * reach;
  if (!(bound < BOUND_SHARE * margin * s0)) return null;
  beta = Float64Array.from(beta);
  const result = keptResult(problem, rho, beta, delta, s, sums, { listed: listed.length, resolves, moved, bound: bound / s0, margin }, basis);
  return { result, kept: { k, base, s0, margin, colAbsMax, sqrtWMax, listed, sides, sums, rows: n, baseRows: kept.baseRows } };
}

interface Proof {
  listed: number;
  resolves: number;
  moved: number;
  bound: number;
  margin: number;
}

/** The plain fit's fields from the sums: Σρ, Σψ², the inside count (Σψ′) and the covariance's factor. */
function keptResult(problem: LinearProblem, rho: RhoFunction, beta: Float64Array, delta: Float64Array, s: number, sums: PartitionSums,
  proof: Proof, basis: Int32Array | undefined): FitResult {
  const { n, p } = problem;
  const k = rho.tuning;
  // Σ_Q w(r⁰ − xᵀδ)² = S − 2δᵀb + δᵀGδ;  Σ_out |√w r| = Σ sign·√w(r⁰ − xᵀδ) = a − hᵀδ.
  let quad = sums.S;
  let lin = sums.a;
  for (let j = 0; j < p; j++) {
    quad -= 2 * delta[j] * sums.b[j];
    lin -= sums.h[j] * delta[j];
    for (let l = 0; l < p; l++) quad += delta[j] * sums.G[j * p + l] * delta[l];
  }
  const outside = n - sums.inside;
  const insideU2 = Math.max(0, quad) / (s * s);
  const objective = 0.5 * insideU2 + (k * lin) / s - 0.5 * k * k * outside;
  const sumPsi2 = insideU2 + k * k * outside;
  const result: FitResult = {
    estimator: 'huber',
    status: 'ok',
    coefficients: beta,
    residuals: new Float64Array(0),
    objective,
    scale: s,
    iterations: 0,
    converged: true,
    reason: `huber (tuning ${k}) at the fixed scale ${s.toPrecision(6)}: exact — the fit session's partition sums solved ${proof.resolves + 1} ` +
      `time${proof.resolves ? 's' : ''}; the sides of the ${proof.listed} readings near ±${k} or added since were tested one by one ` +
      `(${proof.moved} moved), every other reading provably kept its side (|Δu| ≤ ${proof.bound.toExponential(1)} < ${proof.margin.toPrecision(2)})`,
    robustWeights: new Float64Array(0),
  };
  if (basis) result.basis = basis;
  defineCachedField(result, 'residuals', () => residualsOf(problem, beta));
  defineCachedField(result, 'robustWeights', () => {
    const r = result.residuals;
    const out = new Float64Array(n);
    for (let i = 0; i < n; i++) out[i] = rho.weight((sqrtWeight(problem, i) * r[i]) / s);
    return out;
  });
  const covariance = mEstimateCovariance(problem, s, sums.inside, sums.inside, sumPsi2);
  if (covariance) defineCachedField(result, 'covariance', covariance);
  return result;
}
