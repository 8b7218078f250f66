// The exact L1 fit's MAD scale, kept by a fit session while the L1 vertex stays optimal.
//
// Why: Huber and Tukey hold the scale s = 1.4826·median|ρᵢ − median ρ| of the exact L1 fit's
// whitened residuals ρ fixed (irls.ts; Hampel 1974, check-values.md). A refit after one more
// reading needs that s on all n rows; selecting two medians costs a pass or three over the data
// (robust-scale.ts), more than the rest of a warm Huber refit. While the session keeps the L1
// vertex (fit-session.ts), the old rows' residuals do not change: the session keeps them sorted,
// inserts the new rows' residuals (a binary search and a copy each), and reads both medians off
// the sorted array — the deviation median as the k-th smallest of two sorted runs (the values
// left of the median, mirrored, and those right of it), O(log n). Exact: values are only compared.
import { residualsRange } from './problem.ts';
import { MAD_CONSISTENCY } from './robust-scale.ts';
import type { LinearProblem } from './types.ts';

/** The whitened L1 residuals at `beta` of rows [0, rows), ascending. Immutable once made (checkpoints share it). */
export interface SortedResiduals {
  readonly beta: Float64Array;
  readonly values: Float64Array;
  readonly rows: number;
}

/** Whitened residuals √wᵢ(yᵢ − xᵢᵀβ) of rows [from, to), by the same arithmetic as residualsOf. */
function whitened(problem: LinearProblem, beta: Float64Array, from: number, to: number): Float64Array {
  const out = residualsRange(problem, beta, from, to - from, new Float64Array(to - from));
  const w = problem.weights;
  if (w) for (let i = 0; i < out.length; i++) out[i] *= Math.sqrt(w[from + i]);
  return out;
}

/** Every row's residual at β, sorted: O(n log n), paid once per vertex. */
export function sortResiduals(problem: LinearProblem, beta: Float64Array): SortedResiduals {
  const values = whitened(problem, beta, 0, problem.n).sort();
  return { beta, values, rows: problem.n };
}

/** Index of the first value > v in a[0..n). */
function upperBound(a: Float64Array, n: number, v: number): number {
  let lo = 0;
  let hi = n;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (a[mid] <= v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** A new sorted array with rows kept.rows … problem.n − 1 at the same β inserted (the old one is left as it was). */
export function extendSorted(kept: SortedResiduals, problem: LinearProblem): SortedResiduals {
  const added = whitened(problem, kept.beta, kept.rows, problem.n).sort();
  const old = kept.values;
  const values = new Float64Array(old.length + added.length);
  // Segments of the old array between the insertion points, copied whole (memcpy speed).
  let from = 0;
  for (let k = 0; k < added.length; k++) {
    const at = upperBound(old, old.length, added[k]);
    values.set(old.subarray(from, at), from + k);
    values[at + k] = added[k];
    from = at;
  }
  values.set(old.subarray(from), from + added.length);
  return { beta: kept.beta, values, rows: problem.n };
}

/** The middle of sorted a[0..n) as middleOf in robust-scale.ts takes it (mean of the two middles for even n). */
function sortedMiddle(kth: (k: number) => number, n: number): number {
  const hi = kth(n >> 1);
  if (n % 2 === 1) return hi;
  const lo = kth((n >> 1) - 1);
  const mid = (lo + hi) / 2;
  return Number.isFinite(mid) ? mid : lo / 2 + hi / 2;
}

/** The median m of sorted v and the k-th smallest |vᵢ − m| (0-based), O(log n) each. */
function sortedDeviations(v: Float64Array): { m: number; kth: (k: number) => number } {
  const n = v.length;
  const m = sortedMiddle((k) => v[k], n);
  // Deviations: A[j] = m − v[a−1−j] (left of m, ascending), B[j] = v[a+j] − m (right, ascending).
  const a = upperBound(v, n, m);
  const na = a;
  const nb = n - a;
  const A = (j: number): number => m - v[a - 1 - j];
  const B = (j: number): number => v[a + j] - m;
  // k-th smallest of A ∪ B: t values from A and k + 1 − t from B, the smallest t with
  // A[t] ≥ B[k − t] (binary search; both runs ascending).
  const kth = (k: number): number => {
    let lo = Math.max(0, k + 1 - nb);
    let hi = Math.min(k + 1, na);
    while (lo < hi) {
      const t = (lo + hi) >> 1;
      if (B(k - t) > A(t)) lo = t + 1;
      else hi = t;
    }
    const fromA = lo > 0 ? A(lo - 1) : -Infinity;
    const fromB = k - lo >= 0 && k - lo < nb ? B(k - lo) : -Infinity;
    return Math.max(fromA, fromB);
  };
  return { m, kth };
}

/** 1.4826·median|vᵢ − median v| of sorted v, the MAD scale robust-scale.ts computes by selection. */
export function madOfSorted(v: Float64Array): number {
  const n = v.length;
  if (n === 0) return NaN;
  const { kth } = sortedDeviations(v);
  return MAD_CONSISTENCY * sortedMiddle(kth, n);
}

/**
 * The MAD scale at a new vertex β′ from the sorted residuals at the previous one, in two passes
 * over the rows instead of a selection over all of them. Each old row's whitened residual moved by
 * at most `reach` (≥ √wᵢ|xᵢᵀ(β′ − β)|, from the columns' ranges), so each order statistic of
 * the old rows moved by at most `reach`, and a added rows shift ranks by at most a: the wanted
 * order statistics lie in windows [old(k₁ − a) − reach, old(k₂) + reach]. A pass counts the rows
 * below the window and keeps those inside; a selection among the kept gives the exact value. The
 * deviations |ρ′ᵢ − m′| moved by at most reach + |m′ − m|, which gives the second pass's window.
 * Null when a count contradicts the windows (rounding at their edges): the caller selects directly.
 */
export function madAfterMove(problem: LinearProblem, beta: Float64Array, old: SortedResiduals, reach: number): number | null {
  const n = problem.n;
  const added = n - old.rows;
  if (added < 0 || !(reach >= 0) || !Number.isFinite(reach)) return null;
  const rho = whitened(problem, beta, 0, n);
  const oldAt = (k: number): number => (k < 0 ? -Infinity : k >= old.rows ? Infinity : old.values[k]);
  const middle = windowedMiddle(rho, n, (k) => oldAt(k), added, reach);
  if (middle === null) return null;
  const dev = sortedDeviations(old.values);
  const devAt = (k: number): number => (k < 0 ? -Infinity : k >= old.rows ? Infinity : dev.kth(k));
  for (let i = 0; i < n; i++) rho[i] = Math.abs(rho[i] - middle);
  const spread = windowedMiddle(rho, n, devAt, added, reach + Math.abs(middle - dev.m));
  return spread === null ? null : MAD_CONSISTENCY * spread;
}

/** The middle of values[0..n) (as sortedMiddle takes it) found inside the window the old order statistics give. */
function windowedMiddle(values: Float64Array, n: number, oldAt: (k: number) => number, added: number, reach: number): number | null {
  const k2 = n >> 1;
  const k1 = n % 2 === 1 ? k2 : k2 - 1;
  const lo = oldAt(k1 - added) - reach;
  const hi = oldAt(k2) + reach;
  let below = 0;
  const inside: number[] = [];
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (v < lo) below++;
    else if (v <= hi && inside.length <= n >> 2) inside.push(v);
    else if (v <= hi) return null;
  }
  // A window holding a quarter of the rows saves nothing over a selection.
  if (below > k1 || k2 >= below + inside.length || inside.length > Math.max(64, n >> 2)) return null;
  inside.sort((a, b) => a - b);
  return sortedMiddle((k) => inside[k - below], n);
}
