// Input handling shared by the simplex-type exact estimators (least absolute deviations and
// minimax): shape assertions, the result for "no solution", vetting of a warm start, and the
// seeded stratified subsample both use.
//
// Values are checked where the passes touch them (a non-finite residual or a weight ≤ 0 throws
// InputError naming the element, simplex-frame.ts `nonFiniteRow`) instead of in a separate scan:
// at n = 10⁶ a scan costs as much as a whole pass of the fit.
import { InputError } from '../errors.ts';
import type { Estimator, FitOptions, FitResult, FitStatus, LinearProblem } from './types.ts';

/** Throws InputError when sizes or array types are wrong (programmer errors). O(1). */
export function assertProblemShape(problem: LinearProblem): void {
  const { n, p, X, y, weights } = problem;
  if (!Number.isInteger(n) || n < 1) throw new InputError('n', n, 'must be a whole number >= 1');
  if (!Number.isInteger(p) || p < 1) throw new InputError('p', p, 'must be a whole number >= 1');
  if (!(X instanceof Float64Array) || X.length !== n * p) throw new InputError('X', X?.length, `must be a Float64Array of n·p = ${n * p} values`);
  if (!(y instanceof Float64Array) || y.length !== n) throw new InputError('y', y?.length, `must be a Float64Array of n = ${n} values`);
  if (weights !== undefined && (!(weights instanceof Float64Array) || weights.length !== n)) {
    throw new InputError('weights', weights?.length, `must be a Float64Array of n = ${n} values`);
  }
}

/**
 * A result without a solution (too few rows, rank deficiency): coefficients, residuals, objective
 * and scale are NaN so nothing downstream can mistake them for a fit; `status` and `reason` say why.
 */
export function unsolved(estimator: Estimator, problem: LinearProblem, status: Exclude<FitStatus, 'ok'>, reason: string, iterations = 0): FitResult {
  return {
    estimator,
    status,
    coefficients: new Float64Array(problem.p).fill(NaN),
    residuals: new Float64Array(problem.n).fill(NaN),
    objective: NaN,
    scale: NaN,
    iterations,
    converged: false,
    reason,
  };
}

export interface VettedWarmStart {
  coefficients: Float64Array | null;
  /** Row indices, distinct and in range, of the requested length; null otherwise. */
  basis: Int32Array | null;
  scale: number | null;
  /** What was refused and why ("" when everything was usable). */
  note: string;
}

/** Keeps only the usable parts of a warm start ("a start, never trusted blindly"). */
export function vetWarmStart(problem: LinearProblem, warm: FitOptions['warmStart'], basisLength: number): VettedWarmStart {
  const out: VettedWarmStart = { coefficients: null, basis: null, scale: null, note: '' };
  if (!warm) return out;
  const notes: string[] = [];
  const c = warm.coefficients;
  if (c && c.length === problem.p && Array.prototype.every.call(c, (v: number) => Number.isFinite(v))) out.coefficients = Float64Array.from(c);
  else notes.push('warm coefficients ignored (wrong length or not finite)');
  const b = warm.basis;
  if (b) {
    let ok = b.length === basisLength;
    const seen = new Set<number>();
    for (let k = 0; ok && k < b.length; k++) {
      const r = b[k];
      ok = Number.isInteger(r) && r >= 0 && r < problem.n && !seen.has(r);
      seen.add(r);
    }
    if (ok) out.basis = Int32Array.from(b);
    else notes.push('warm basis ignored (wrong length, repeated or out-of-range rows)');
  }
  if (warm.scale !== undefined) {
    if (Number.isFinite(warm.scale) && warm.scale > 0) out.scale = warm.scale;
    else notes.push('warm scale ignored (not finite and > 0)');
  }
  out.note = notes.join('; ');
  return out;
}

/** Seed of the subsample generator: any fixed value makes every fit reproducible. */
export const SUBSAMPLE_SEED = 0x2545f491;

/**
 * m distinct row indices in increasing order, one drawn uniformly from each of m equal strata of
 * [0, n) (all rows when m ≥ n). Stratified rather than simple random: rows stored in latitude or
 * time order are then covered evenly, and the sorted indices make the gathers sequential.
 * Generator: mulberry32 (T. Ettinger, 2017; a 32-bit multiply–xorshift mix), seeded per call.
 */
export function stratifiedSample(n: number, m: number, seed = SUBSAMPLE_SEED): Int32Array {
  if (m >= n) {
    const all = new Int32Array(n);
    for (let i = 0; i < n; i++) all[i] = i;
    return all;
  }
  let state = seed >>> 0;
  const next = (): number => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const out = new Int32Array(m);
  for (let k = 0; k < m; k++) {
    const lo = Math.floor((k * n) / m);
    const hi = Math.floor(((k + 1) * n) / m);
    out[k] = lo + Math.min(hi - lo - 1, Math.floor(next() * (hi - lo)));
  }
  return out;
}

/** Consecutive rows per run of `systematicSample`. */
export const SAMPLE_RUN = 16;

/**
 * m distinct row indices in increasing order: runs of SAMPLE_RUN consecutive rows at a constant
 * stride, from a seeded offset (all rows when m ≥ n). Used where a sample is gathered from a
 * large problem: single rows at a stride of ~50 rows cross a memory page every few rows, so
 * each costs a cache and TLB miss (≈0.2–0.7 µs a row measured at n = 10⁶ on a loaded machine);
 * a run reads consecutive memory. Runs only make the sample less representative when the row
 * order correlates with the residuals, which costs time (a wider screening round), never
 * exactness.
 */
export function systematicSample(n: number, m: number, seed = SUBSAMPLE_SEED): Int32Array {
  if (m >= n) return stratifiedSample(n, m, seed);
  const runs = Math.max(1, Math.ceil(m / SAMPLE_RUN));
  const step = n / runs;
  const offset = ((seed >>> 0) % 1009) / 1009;
  const out = new Int32Array(m);
  let k = 0;
  for (let r = 0; r < runs && k < m; r++) {
    const start = Math.min(n - SAMPLE_RUN, Math.floor((r + offset) * step));
    for (let t = 0; t < SAMPLE_RUN && k < m; t++) out[k++] = Math.max(0, start) + t;
  }
  // Runs never overlap (step ≥ SAMPLE_RUN since m < n), so the indices are distinct and increasing.
  return out;
}
