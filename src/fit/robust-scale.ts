// Median, MAD scale and an O(n) selection.
//
// Selection is Floyd & Rivest, "Algorithm 489: SELECT", CACM 18(3) 1975: recurse on a small
// sample to pick two pivots that bracket the k-th value with high probability, then partition.
// Expected comparisons n + min(k, n−k) + o(n); exact (it only permutes values, no arithmetic).
// The MAD scale is σ ≈ (1/Φ⁻¹(3/4))·median|rᵢ − median r| (check-values.md: 1.4826, consistent
// at the normal; Hampel 1974).
import { InputError } from '../errors.ts';

/** 1/Φ⁻¹(3/4) = 1/0.6744897501960817 ≈ 1.4826: the MAD is then consistent for σ at the normal. */
export const MAD_CONSISTENCY = 1 / 0.6744897501960817;

/** Below this many elements Floyd–Rivest's sampling step is not worth it (the paper uses 600). */
const SAMPLE_THRESHOLD = 600;

/**
 * Rearranges a[left..right] so that a[k] is the value that would be there after sorting, with
 * smaller-or-equal values before it and larger-or-equal after. In place; returns a[k].
 */
export function quickselect(a: Float64Array, k: number, left = 0, right = a.length - 1): number {
  if (!Number.isInteger(left) || !Number.isInteger(right) || left < 0 || right >= a.length || left > right) {
    throw new InputError('range', [left, right], `must lie within [0, ${a.length - 1}]`);
  }
  if (!Number.isInteger(k) || k < left || k > right) throw new InputError('k', k, `must be a whole number in [${left}, ${right}]`);
  return selectRange(a, k, left, right);
}

/** The k-th smallest (0-based) of a[0..count), rearranging a; unchecked (callers own the bounds). */
export function selectKth(a: Float64Array, count: number, k: number): number {
  return selectRange(a, k, 0, count - 1);
}

/**
 * The exact MAD scale of values[0..n), rearranging and overwriting them (no copy). For even n the
 * lower middle is the largest value left of the upper middle once that is selected: one
 * selection per median instead of two.
 */
export function madScaleOverwrite(values: Float64Array, n: number): number {
  const m = middleOf(values, n);
  for (let i = 0; i < n; i++) values[i] = Math.abs(values[i] - m);
  return MAD_CONSISTENCY * middleOf(values, n);
}

function middleOf(a: Float64Array, n: number): number {
  const upper = n >> 1;
  let lo: number;
  let hi: number;
  if (n >= HISTOGRAM_MIN_COUNT) {
    const pair = middlePairByHistogram(a, n);
    if (pair) {
      if (n % 2 === 1) return pair[1];
      [lo, hi] = pair;
      const m = (lo + hi) / 2;
      return Number.isFinite(m) ? m : lo / 2 + hi / 2;
    }
  }
  hi = selectRange(a, upper, 0, n - 1);
  if (n % 2 === 1) return hi;
  lo = a[0];
  for (let i = 1; i < upper; i++) if (a[i] > lo) lo = a[i];
  const mid = (lo + hi) / 2;
  return Number.isFinite(mid) ? mid : lo / 2 + hi / 2;
}

/** From this many values the middle order statistics are found by a value histogram first. */
export const HISTOGRAM_MIN_COUNT = 2048;
/** Bins of that histogram: the bins holding the middle ranks keep ~n/BINS values for a spread sample. */
const HISTOGRAM_BINS = 1024;
const binCounts = new Int32Array(HISTOGRAM_BINS);
let binValues = new Float64Array(0);

/**
 * The order statistics of ranks ⌊(n−1)/2⌋ and ⌊n/2⌋ of a[0..n) without rearranging it: one pass
 * for the range, one counting the values per equal-width bin, one collecting the values of the
 * bins that hold those ranks, then selection among them — about three reads of the data instead
 * of a partitioning selection's several (exact: values are only compared and copied). Null when
 * the bins would not help (a non-finite range, or the middle bins holding over a quarter of the
 * values, e.g. heavy ties); the caller then selects directly.
 */
function middlePairByHistogram(a: Float64Array, n: number): [number, number] | null {
  let min = a[0];
  let max = a[0];
  for (let i = 1; i < n; i++) {
    const x = a[i];
    if (x < min) min = x;
    else if (x > max) max = x;
  }
  if (min === max) return [min, min];
  const width = max - min;
  if (!Number.isFinite(width)) return null;
  const B = HISTOGRAM_BINS;
  const perUnit = B / width;
  const counts = binCounts;
  counts.fill(0);
  // Same expression in both passes, so a value always lands in the same bin.
  for (let i = 0; i < n; i++) {
    const b = ((a[i] - min) * perUnit) | 0;
    counts[b < B ? b : B - 1]++;
  }
  const k1 = (n - 1) >> 1;
  const k2 = n >> 1;
  let below = 0;
  let b1 = 0;
  while (below + counts[b1] <= k1) below += counts[b1++];
  let b2 = b1;
  let through = below + counts[b1];
  while (through <= k2) through += counts[++b2];
  const kept = through - below;
  if (kept > n >> 2) return null;
  if (binValues.length < kept) binValues = new Float64Array(Math.max(kept, 2 * binValues.length));
  const buf = binValues;
  let c = 0;
  for (let i = 0; i < n; i++) {
    const x = a[i];
    let b = ((x - min) * perUnit) | 0;
    if (b >= B) b = B - 1;
    if (b >= b1 && b <= b2) buf[c++] = x;
  }
  const v2 = selectRange(buf, k2 - below, 0, kept - 1);
  if (k1 === k2) return [v2, v2];
  // The lower middle is the largest value left of the upper one after its selection.
  // (k1 ≥ below, so that value is among the collected ones.)
  let v1 = -Infinity;
  for (let i = 0; i < k2 - below; i++) if (buf[i] > v1) v1 = buf[i];
  return [v1, v2];
}


// The sample bracket always contains k (its half-width exceeds the shift once n > 600), so the
// recursion needs no checks.
function selectRange(a: Float64Array, k: number, left: number, right: number): number {
  while (right > left) {
    if (right - left > SAMPLE_THRESHOLD) {
      // Narrow [left, right] to a sample-based bracket around k (Floyd–Rivest, constants from the paper).
      const n = right - left + 1;
      const i = k - left + 1;
      const z = Math.log(n);
      const s = 0.5 * Math.exp((2 * z) / 3);
      const sd = 0.5 * Math.sqrt((z * s * (n - s)) / n) * Math.sign(i - n / 2);
      const newLeft = Math.max(left, Math.floor(k - (i * s) / n + sd));
      const newRight = Math.min(right, Math.floor(k + ((n - i) * s) / n + sd));
      selectRange(a, k, newLeft, newRight);
    }
    const t = a[k];
    let i = left;
    let j = right;
    swap(a, left, k);
    if (a[right] > t) swap(a, left, right);
    while (i < j) {
      swap(a, i, j);
      i++;
      j--;
      while (a[i] < t) i++;
      while (a[j] > t) j--;
    }
    if (a[left] === t) swap(a, left, j);
    else {
      j++;
      swap(a, j, right);
    }
    if (j <= k) left = j + 1;
    if (k <= j) right = j - 1;
  }
  return a[k];
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i];
  a[i] = a[j];
  a[j] = t;
}

function checkValues(values: ArrayLike<number>, field: string): void {
  if (values.length === 0) throw new InputError(field, values, 'needs at least one value');
  // x − x is 0 exactly for finite x and NaN for ±∞ and NaN.
  for (let i = 0; i < values.length; i++) {
    const x = values[i];
    if (x - x !== 0) throw new InputError(`${field}[${i}]`, x, 'must be finite');
  }
}

/**
 * Median of the values in a scratch buffer (reordered in place). For even n the mean of the two
 * middle values: after selecting the upper middle, the lower middle is the largest value left of it.
 */
export function medianInPlace(scratch: Float64Array, length = scratch.length): number {
  if (!Number.isInteger(length) || length < 1 || length > scratch.length) throw new InputError('length', length, `must be a whole number in [1, ${scratch.length}]`);
  return middleOf(scratch, length);
}

/** Median of finite values (the input is not modified). */
export function median(values: ArrayLike<number>): number {
  checkValues(values, 'values');
  return medianInPlace(Float64Array.from(values));
}

/**
 * MAD scale (1/Φ⁻¹(3/4))·median|vᵢ − median v|. Zero when more than half the values are equal —
 * a true outcome (identical repeats), left for the caller to report.
 */
export function madScale(values: ArrayLike<number>, scratch?: Float64Array): number {
  checkValues(values, 'values');
  const n = values.length;
  const buf = scratch && scratch.length >= n ? scratch : new Float64Array(n);
  if (values instanceof Float64Array) buf.set(values);
  else for (let i = 0; i < n; i++) buf[i] = values[i];
  return madScaleOverwrite(buf, n);
}
