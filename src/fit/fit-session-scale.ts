// The exact L1 fit's MAD scale for a fit session's refit, from a sorted reference instead of a
// selection over all rows.
//
// Why: Huber and Tukey hold the scale s = 1.4826·median|ρᵢ − median ρ| of the exact L1 fit's
// whitened residuals ρ fixed (irls.ts; Hampel 1974, check-values.md). A refit after one more
// reading needs s on all n rows; selecting two medians costs a few passes over the data
// (robust-scale.ts), more than the rest of a warm Huber refit. The session keeps a reference: the
// residuals of the first m rows at some β_ref, sorted, with each one's row. At the fit's β every
// old residual moved by at most `reach` (≥ √wᵢ|xᵢᵀ(β − β_ref)|, from the reference's whitening frame
// or the columns' ranges, fit-session-bounds.ts; 0 while the vertex holds), so every order statistic of the old rows moved by at most reach, and the
// a = n − m rows added since shift ranks by at most a. The wanted order statistic k lies in the
// window [old(k − a) − reach, old(k) + reach]; old rows sorted more than reach outside it are
// below or above it for certain (counted by binary search), the few near its edges and the added
// rows are recomputed one by one, and the value is selected among those inside. The deviations
// |ρ − m| moved by at most reach + |m − m_ref|, and the old rows with a given range of deviations
// are two runs of the sorted array (left and right of m_ref): the same steps give the deviation
// median. O(log n + rows near the windows + a) per refit; exact, as values are only compared.
import { buildReachFrame, type ReachFrame } from './fit-session-bounds.ts';
import { residualsRange } from './problem.ts';
import { MAD_CONSISTENCY } from './robust-scale.ts';
import type { LinearProblem } from './types.ts';

/** Rows added since the reference beyond which it is rebuilt (each is recomputed on every refit). */
export const SCALE_REFERENCE_MAX_ADDED = 512;
/** From this many rows no reference is built (an index sort of 10⁶ rows costs more than it saves). */
export const SCALE_REFERENCE_MAX_ROWS = 200_000;

/**
 * Whitened residuals at β_ref of rows [0, rows), ascending, with each one's row, and running sums
 * in that order for the L1 refit (fit-session-l1-refit.ts). Never written after it is made
 * (checkpoints share it).
 */
export interface SortedResiduals {
  readonly beta: Float64Array;
  readonly values: Float64Array;
  readonly order: Int32Array;
  readonly rows: number;
  /**
   * (rows + 1)×(p + 1), row t: Σ over the first t sorted rows of (ρ̃ᵢ, √wᵢxᵢ₁ … √wᵢxᵢₚ), summed by
   * TwoSum (Knuth) into `prefix` + `prefixLo`, so a difference of two rows is as accurate as a
   * compensated sum of the run between them.
   */
  readonly prefix: Float64Array;
  readonly prefixLo: Float64Array;
  /** Σ|·| of each of the p + 1 columns over all rows: the scale of the running sums' rounding bound. */
  readonly absTotal: Float64Array;
  /** Its rows in a whitening frame, for a tight reach (fit-session-bounds.ts); null when too collinear. */
  readonly frame: ReachFrame | null;
}

/** √wᵢ(yᵢ − xᵢᵀβ) of one row, the arithmetic of residualsRange for p = 2, 3 and of its general loop otherwise. */
function residualOf(problem: LinearProblem, beta: Float64Array, i: number): number {
  const { p, X, y, weights } = problem;
  const sw = weights ? Math.sqrt(weights[i]) : 1;
  let r: number;
  if (p === 2) r = y[i] - (X[2 * i] * beta[0] + X[2 * i + 1] * beta[1]);
  else if (p === 3) r = y[i] - (X[3 * i] * beta[0] + X[3 * i + 1] * beta[1] + X[3 * i + 2] * beta[2]);
  else r = residualsRange(problem, beta, i, 1, new Float64Array(1))[0];
  return sw * r;
}

/** Every row's whitened residual at β, sorted with its row, and the rows' frame: O(n log n), paid when a reference is (re)built. */
export function sortResiduals(problem: LinearProblem, beta: Float64Array): SortedResiduals {
  const { n, weights } = problem;
  const rho = residualsRange(problem, beta, 0, n, new Float64Array(n));
  if (weights) for (let i = 0; i < n; i++) rho[i] *= Math.sqrt(weights[i]);
  const order = new Int32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  order.sort((a, b) => rho[a] - rho[b]);
  const values = new Float64Array(n);
  for (let t = 0; t < n; t++) values[t] = rho[order[t]];
  const { prefix, prefixLo, absTotal } = runningSums(problem, values, order);
  return { beta: Float64Array.from(beta), values, order, rows: n, prefix, prefixLo, absTotal, frame: buildReachFrame(problem, n) };
}

/** The running sums of SortedResiduals: O(n·p), paid with the sort. */
function runningSums(problem: LinearProblem, values: Float64Array, order: Int32Array): { prefix: Float64Array; prefixLo: Float64Array; absTotal: Float64Array } {
  const { n, p, X, weights } = problem;
  const q = p + 1;
  const prefix = new Float64Array((n + 1) * q);
  const prefixLo = new Float64Array((n + 1) * q);
  const absTotal = new Float64Array(q);
  const hi = new Float64Array(q);
  const lo = new Float64Array(q);
  for (let t = 0; t < n; t++) {
    const i = order[t];
    const sw = weights ? Math.sqrt(weights[i]) : 1;
    for (let j = 0; j < q; j++) {
      const a = j === 0 ? values[t] : sw * X[i * p + j - 1];
      absTotal[j] += Math.abs(a);
      // TwoSum: hi + a = u + e exactly.
      const u = hi[j] + a;
      const w = u - hi[j];
      lo[j] += hi[j] - (u - w) + (a - w);
      hi[j] = u;
      prefix[(t + 1) * q + j] = u;
      prefixLo[(t + 1) * q + j] = lo[j];
    }
  }
  return { prefix, prefixLo, absTotal };
}

/** Index of the first value ≥ v (strict = false) or > v (strict = true) in a[from..to). */
export function bound(a: Float64Array, v: number, strict: boolean, from = 0, to = a.length): number {
  let lo = from;
  let hi = to;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (a[mid] < v || (strict && a[mid] === v)) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** The middle of sorted data given its k-th value (mean of the two middles for even n, as robust-scale.ts). */
function sortedMiddle(kth: (k: number) => number, n: number): number {
  const hi = kth(n >> 1);
  if (n % 2 === 1) return hi;
  const lo = kth((n >> 1) - 1);
  const mid = (lo + hi) / 2;
  return Number.isFinite(mid) ? mid : lo / 2 + hi / 2;
}

/** The median m of sorted v and the k-th smallest |vᵢ − m| (0-based), O(log n) each. */
function sortedDeviations(v: Float64Array): { m: number; split: number; kth: (k: number) => number } {
  const n = v.length;
  const m = sortedMiddle((k) => v[k], n);
  // Deviations: A[j] = m − v[a−1−j] (left of m, ascending), B[j] = v[a+j] − m (right, ascending).
  const a = bound(v, m, true);
  const nb = n - a;
  const A = (j: number): number => m - v[a - 1 - j];
  const B = (j: number): number => v[a + j] - m;
  // k-th smallest of A ∪ B: t values from A and k + 1 − t from B, the smallest t with A[t] ≥ B[k − t].
  const kth = (k: number): number => {
    let lo = Math.max(0, k + 1 - nb);
    let hi = Math.min(k + 1, a);
    while (lo < hi) {
      const t = (lo + hi) >> 1;
      if (B(k - t) > A(t)) lo = t + 1;
      else hi = t;
    }
    const fromA = lo > 0 ? A(lo - 1) : -Infinity;
    const fromB = k - lo >= 0 && k - lo < nb ? B(k - lo) : -Infinity;
    return Math.max(fromA, fromB);
  };
  return { m, split: a, kth };
}

/** 1.4826·median|vᵢ − median v| of sorted v, the MAD scale robust-scale.ts computes by selection. */
export function madOfSorted(v: Float64Array): number {
  if (v.length === 0) return NaN;
  return MAD_CONSISTENCY * sortedMiddle(sortedDeviations(v).kth, v.length);
}

/** Counts below a window and the values inside it, for the middle ranks of n values. */
class Window {
  below = 0;
  inside: number[] = [];
  constructor(readonly lo: number, readonly hi: number) {}
  add(v: number): void {
    if (v < this.lo) this.below++;
    else if (v <= this.hi) this.inside.push(v);
  }
  /** The middle of all n values, or null when the counts contradict the window (rounding at its edges). */
  middle(n: number): number | null {
    const k2 = n >> 1;
    const k1 = n % 2 === 1 ? k2 : k2 - 1;
    const { below, inside } = this;
    if (below > k1 || k2 >= below + inside.length) return null;
    inside.sort((x, y) => x - y);
    return sortedMiddle((k) => inside[k - below], n);
  }
}

/** Rows near a window edge beyond which the reference is not worth it (the caller rebuilds it). */
const MAX_ZONE_ROWS = 4096;

/**
 * The MAD scale of the whitened residuals at β over all n rows from the reference (see the file
 * comment); null when the windows would hold too many rows or a count contradicts them.
 */
export function madFromReference(problem: LinearProblem, beta: Float64Array, ref: SortedResiduals, reach: number): number | null {
  const n = problem.n;
  const { values: v, order, rows: m } = ref;
  const added = n - m;
  if (added < 0 || added > SCALE_REFERENCE_MAX_ADDED || !(reach >= 0) || !Number.isFinite(reach) || m === 0) return null;
  const k2 = n >> 1;
  const k1 = n % 2 === 1 ? k2 : k2 - 1;
  const oldAt = (k: number): number => (k < 0 ? -Infinity : k >= m ? Infinity : v[k]);
  const addedRho = new Float64Array(added);
  for (let i = 0; i < added; i++) addedRho[i] = residualOf(problem, beta, m + i);

  // The median: old rows sorted below lo − reach are below for certain, above hi + reach above.
  const med = new Window(oldAt(k1 - added) - reach, oldAt(k2) + reach);
  const from = bound(v, med.lo - reach, false);
  const to = bound(v, med.hi + reach, true);
  if (to - from > MAX_ZONE_ROWS) return null;
  med.below = from;
  for (let t = from; t < to; t++) med.add(residualOf(problem, beta, order[t]));
  for (let i = 0; i < added; i++) med.add(addedRho[i]);
  const centre = med.middle(n);
  if (centre === null) return null;

  // The deviations: old rows with |v − m_ref| < L are the run v ∈ (m_ref − L, m_ref + L).
  const dev = sortedDeviations(v);
  const devAt = (k: number): number => (k < 0 ? -Infinity : k >= m ? Infinity : dev.kth(k));
  const r2 = reach + Math.abs(centre - dev.m);
  const spread = new Window(devAt(k1 - added) - r2, devAt(k2) + r2);
  const inner = Math.max(0, spread.lo - r2);
  const outer = spread.hi + r2;
  // Rows with old deviation < inner (certainly below): v in (m_ref − inner, m_ref + inner).
  const belowFrom = bound(v, dev.m - inner, true);
  const belowTo = bound(v, dev.m + inner, false);
  // Rows with old deviation ≤ outer: v in [m_ref − outer, m_ref + outer]; the zone is that run less the certain ones.
  const zoneFrom = bound(v, dev.m - outer, false);
  const zoneTo = bound(v, dev.m + outer, true);
  if (belowFrom - zoneFrom + (zoneTo - belowTo) > MAX_ZONE_ROWS) return null;
  spread.below = inner > 0 ? Math.max(0, belowTo - belowFrom) : 0;
  const zone = (a: number, b: number): void => {
    for (let t = a; t < b; t++) spread.add(Math.abs(residualOf(problem, beta, order[t]) - centre));
  };
  if (inner > 0 && belowTo > belowFrom) {
    zone(zoneFrom, belowFrom);
    zone(belowTo, zoneTo);
  } else zone(zoneFrom, zoneTo);
  for (let i = 0; i < added; i++) spread.add(Math.abs(addedRho[i] - centre));
  const d = spread.middle(n);
  return d === null ? null : MAD_CONSISTENCY * d;
}
