// The exact line search of the least-absolute-deviations descent: a weighted selection.
//
// Along a line β + t·d the objective Σ|ρᵢ − t·vᵢ| + t·h is convex and piecewise linear in t with
// breakpoints τᵢ = ρᵢ/vᵢ; its slope jumps by 2|vᵢ| at τᵢ. The minimiser is therefore the first
// breakpoint (in increasing τ) at which the cumulative jump reaches a target fixed by the slope
// at the start — a weighted quantile (Barrodale & Roberts, SIAM J. Numer. Anal. 10 (1973) 839,
// "passing through several vertices in one iteration"; for p = 2 this is the classic
// weighted-median step). Found here by quickselect with a three-way partition (Hoare 1961;
// Bentley & McIlroy 1993 for the equal keys), expected O(count), exact: it only compares and
// adds the weights of whole partitions, so the answer is the true weighted quantile whatever the
// order of the input.

import { scratchFloat64, scratchInt32 } from './scratch.ts';

/**
 * Rearranges keys[0..count) (with `weights` and `ids` moved alongside) and returns the position j
 * of the first element, in increasing key order, at which the running sum of weights reaches
 * `target`: afterwards positions [0, j) hold keys ≤ keys[j] with total weight < target (ties
 * broken by position), and positions after j hold keys ≥ keys[j]. The caller guarantees that the
 * total weight reaches `target` and count ≥ 1. `below` receives the weight of positions [0, j).
 */
export function selectCumulative(
  keys: Float64Array, weights: Float64Array, ids: Int32Array, count: number, target: number, below: { weight: number },
): number {
  let lo = 0;
  let hi = count - 1;
  let acc = 0; // weight of positions [0, lo), all with keys ≤ every key in [lo, hi]
  while (lo < hi) {
    const pivot = medianOfThree(keys[lo], keys[(lo + hi) >>> 1], keys[hi]);
    // Dutch-flag partition of [lo, hi]: [lo, lt) < pivot, [lt, i) == pivot, (gt, hi] > pivot.
    let lt = lo;
    let i = lo;
    let gt = hi;
    let wLess = 0;
    let wEqual = 0;
    while (i <= gt) {
      const k = keys[i];
      if (k < pivot) {
        wLess += weights[i];
        swap(keys, weights, ids, lt, i);
        lt++;
        i++;
      } else if (k > pivot) {
        swap(keys, weights, ids, i, gt);
        gt--;
      } else {
        wEqual += weights[i];
        i++;
      }
    }
    if (lt > lo && acc + wLess >= target) {
      hi = lt - 1;
      continue;
    }
    if (acc + wLess + wEqual >= target) {
      // The answer is among the equal keys: take them in position order.
      acc += wLess;
      let j = lt;
      while (j < gt && acc + weights[j] < target) {
        acc += weights[j];
        j++;
      }
      below.weight = acc;
      return j;
    }
    if (gt >= hi) {
      // Nothing above the pivot: the target exceeds the range's weight only by rounding (the
      // caller summed in another order), so the last equal key is the answer.
      below.weight = acc + wLess + wEqual - weights[gt];
      return gt;
    }
    acc += wLess + wEqual;
    lo = gt + 1;
  }
  below.weight = acc;
  return lo;
}

function medianOfThree(a: number, b: number, c: number): number {
  if (a < b) return b < c ? b : a < c ? c : a;
  return a < c ? a : b < c ? c : b;
}

function swap(keys: Float64Array, weights: Float64Array, ids: Int32Array, i: number, j: number): void {
  const k = keys[i];
  keys[i] = keys[j];
  keys[j] = k;
  const w = weights[i];
  weights[i] = weights[j];
  weights[j] = w;
  const d = ids[i];
  ids[i] = ids[j];
  ids[j] = d;
}

/** Below this many candidates the exact selection runs on all of them directly. */
export const WINDOW_MIN_COUNT = 4096;
/** Sample size for the window; its rank error is about 0.5/√SAMPLE ≈ 0.8 % of the weight. */
export const WINDOW_SAMPLE = 4096;
/** Half-width of the window in sampling standard deviations (miss probability ~1e-7 each side). */
export const WINDOW_Z = 5;

/** Buffers reused across line searches (sized for the largest count). */
export interface SelectScratch {
  keys: Float64Array;
  weights: Float64Array;
  ids: Int32Array;
  sampleKeys: Float64Array;
  sampleWeights: Float64Array;
  sampleIds: Int32Array;
}

/** Fresh buffers, or (reuse) views of scratch.ts slots; both are only ever written before they are read. */
export function createSelectScratch(capacity: number, reuse = false): SelectScratch {
  const s = Math.min(capacity, WINDOW_SAMPLE);
  if (reuse) {
    return {
      keys: scratchFloat64('select.keys', capacity), weights: scratchFloat64('select.weights', capacity), ids: scratchInt32('select.ids', capacity),
      sampleKeys: scratchFloat64('select.sampleKeys', s), sampleWeights: scratchFloat64('select.sampleWeights', s), sampleIds: scratchInt32('select.sampleIds', s),
    };
  }
  return {
    keys: new Float64Array(capacity), weights: new Float64Array(capacity), ids: new Int32Array(capacity),
    sampleKeys: new Float64Array(s), sampleWeights: new Float64Array(s), sampleIds: new Int32Array(s),
  };
}

export interface Selection {
  key: number;
  id: number;
  /** The crossed breakpoints are ids[0..position) of the scratch (inScratch) or of the input. */
  position: number;
  inScratch: boolean;
}

/**
 * `selectCumulative` for large candidate sets, with the sampling idea of Floyd & Rivest
 * (CACM 18 (1975) 165): a regular sample of the candidates locates the wanted weighted quantile
 * to within a window; one branch-free pass copies the candidates inside the window to the
 * scratch and adds up the weight below it; the exact selection then runs on the window only.
 * The result is exact whenever the window's weight count proves it holds the answer (checked);
 * otherwise the selection runs on all candidates. With `fromStart` (one-sided line searches,
 * where every key ≥ 0 and the crossed set is wanted) the window starts at −∞, so the crossed
 * breakpoints are exactly the scratch positions before the answer.
 */
export function selectBreakpoint(
  keys: Float64Array, weights: Float64Array, ids: Int32Array, count: number, total: number, target: number,
  fromStart: boolean, scratch: SelectScratch,
): Selection {
  const below = { weight: 0 };
  if (count <= WINDOW_MIN_COUNT) {
    const at = selectCumulative(keys, weights, ids, count, target, below);
    return { key: keys[at], id: ids[at], position: at, inScratch: false };
  }
  // Regular sample (the candidates' order carries no information about their keys).
  const { sampleKeys, sampleWeights, sampleIds } = scratch;
  const s = Math.min(sampleKeys.length, count);
  const step = count / s;
  let ws = 0;
  let ws2 = 0;
  for (let k = 0; k < s; k++) {
    const i = Math.floor(k * step);
    sampleKeys[k] = keys[i];
    const w = weights[i];
    sampleWeights[k] = w;
    sampleIds[k] = k;
    ws += w;
    ws2 += w * w;
  }
  // Kish's effective sample size accounts for unequal weights.
  const half = WINDOW_Z * 0.5 / Math.sqrt((ws * ws) / ws2) + (2 * Math.sqrt(ws2 / s)) / ws;
  const q = target / total;
  const qLo = q - half;
  const qHi = q + half;
  if (!(qHi < 1)) {
    const at = selectCumulative(keys, weights, ids, count, target, below);
    return { key: keys[at], id: ids[at], position: at, inScratch: false };
  }
  const hi = sampleKeys[selectCumulative(sampleKeys, sampleWeights, sampleIds, s, qHi * ws, below)];
  const lo = fromStart || qLo <= 0 ? -Infinity : sampleKeys[selectCumulative(sampleKeys, sampleWeights, sampleIds, s, qLo * ws, below)];
  const { keys: wk, weights: ww, ids: wi } = scratch;
  let m = 0;
  let wBelow = 0;
  let wIn = 0;
  for (let i = 0; i < count; i++) {
    const k = keys[i];
    const w = weights[i];
    const under = +(k <= lo);
    const inside = +(k <= hi) - under;
    wk[m] = k;
    ww[m] = w;
    wi[m] = ids[i];
    m += inside;
    wBelow += under * w;
    wIn += inside * w;
  }
  if (wBelow < target && target <= wBelow + wIn && m > 0) {
    const at = selectCumulative(wk, ww, wi, m, target - wBelow, below);
    return { key: wk[at], id: wi[at], position: at, inScratch: true };
  }
  const at = selectCumulative(keys, weights, ids, count, target, below);
  return { key: keys[at], id: ids[at], position: at, inScratch: false };
}
