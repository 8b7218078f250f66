// The MAD scale the exact estimators report, (1/Φ⁻¹(3/4))·median|ρᵢ − median ρ| of the whitened
// residuals (Hampel 1974; 1.4826, check-values.md), computed exactly without sorting or copying
// all n residuals.
//
// Why a window: two exact medians of 10⁶ values by selection cost ~10–20 ms in JavaScript, as
// much as the whole fit. Instead (the sampling idea of Floyd & Rivest, CACM 18 (1975) 165):
// a systematic sample of the residuals gives windows that hold the median of ρ and the median of
// |ρ − m̂| with overwhelming probability; one counting pass over the residuals counts the values
// below each window and keeps only those inside; the exact order statistics are then
// selected among the kept values. The answer is exact whenever the counts prove that the wanted
// ranks fall inside the windows (checked, see `finish`); otherwise the caller's full residuals
// are selected directly, so a missed window costs time, never accuracy. The exact fitters report
// this scale as a field computed when first read (cached-field.ts).

import { MAD_CONSISTENCY, madScaleOverwrite, selectKth } from './robust-scale.ts';
import { scratchFloat64 } from './scratch.ts';

/** Up to this many rows the scale is selected directly from all residuals (cheap enough). */
export const DIRECT_SCALE_MAX_ROWS = 16384;
/**
 * Half-width of the windows in standard deviations of a sample quantile's rank (√(u(1−u)/m) with
 * u = ½): 6 gives a miss probability of ~2e-9 per window under the normal approximation.
 */
export const WINDOW_Z = 6;

export class ScaleCollector {
  medBelow = 0;
  madBelow = 0;
  medCount = 0;
  madCount = 0;
  medBuf: Float64Array;
  madBuf: Float64Array;

  constructor(
    readonly medLo: number, readonly medHi: number,
    readonly centre: number, readonly madLo: number, readonly madHi: number, capacity: number,
  ) {
    this.medBuf = new Float64Array(capacity);
    this.madBuf = new Float64Array(capacity);
  }

  /** Makes room for `more` values after the given counts in both buffers. */
  ensureRoom(medCount: number, madCount: number, more: number): void {
    while (this.medBuf.length < medCount + more) this.medBuf = grow(this.medBuf);
    while (this.madBuf.length < madCount + more) this.madBuf = grow(this.madBuf);
  }

  /**
   * The exact MAD scale of the n values fed, or null when a window missed (then select directly).
   * Median: ranks k₁ = ⌊(n−1)/2⌋, k₂ = ⌊n/2⌋ must fall inside the kept values. MAD: the kept
   * values are re-centred on the exact median m; with D = |m − m̂|, values counted below have
   * |ρ − m| ≤ madLo + D and values above have |ρ − m| ≥ madHi − D, so a selected order statistic
   * inside [madLo + D, madHi − D] is the true one.
   */
  finish(n: number): number | null {
    const k1 = (n - 1) >> 1;
    const k2 = n >> 1;
    if (!(this.medBelow <= k1 && k2 < this.medBelow + this.medCount)) return null;
    const med = 0.5 * middlePair(this.medBuf, this.medCount, k1 - this.medBelow, k2 - this.medBelow);
    const D = Math.abs(med - this.centre);
    if (!(this.madBelow <= k1 && k2 < this.madBelow + this.madCount)) return null;
    const buf = this.madBuf;
    for (let i = 0; i < this.madCount; i++) buf[i] = Math.abs(buf[i] - med);
    const a2 = selectInPlace(buf, this.madCount, k2 - this.madBelow);
    const a1 = k1 === k2 ? a2 : maxBefore(buf, k2 - this.madBelow);
    const lo = this.madLo + D;
    const hi = this.madHi - D;
    if (!(a1 >= lo && a2 <= hi)) return null;
    return MAD_CONSISTENCY * 0.5 * (a1 + a2);
  }
}

/** a[j1] + a[j2] of the sorted order, j2 = j1 or j1 + 1: one selection (the lower one is the largest value left of the upper). */
function middlePair(a: Float64Array, count: number, j1: number, j2: number): number {
  const hi = selectInPlace(a, count, j2);
  return (j1 === j2 ? hi : maxBefore(a, j2)) + hi;
}

/** Largest of a[0..j) (after a selection of rank j, these are the values ranked below it). */
function maxBefore(a: Float64Array, j: number): number {
  let m = a[0];
  for (let i = 1; i < j; i++) if (a[i] > m) m = a[i];
  return m;
}

/**
 * Plans the windows from `count` whitened sample residuals at the final coefficients (the buffer
 * is reordered). Returns null when n is small enough to select directly.
 */
export function planScale(sample: Float64Array, count: number, n: number): ScaleCollector | null {
  if (n <= DIRECT_SCALE_MAX_ROWS || count < 64) return null;
  const [medLo, medHi, centre, madLo, madHi, half] = windowEdges(sample, count);
  // Expected kept values ≈ 2·half·n per window; room for 1.5× that before growing.
  return new ScaleCollector(medLo, medHi, centre, madLo, madHi, Math.ceil(3 * half * n) + 64);
}

/** [medLo, medHi, centre, madLo, madHi, half]: sample quantiles at ½ ± half, for ρ and |ρ − centre|. */
function windowEdges(sample: Float64Array, count: number): [number, number, number, number, number, number] {
  const half = WINDOW_Z * Math.sqrt(0.25 / count) + 2 / count;
  const lowRank = (u: number): number => Math.max(0, Math.min(count - 1, Math.floor(u * count)));
  const centre = selectInPlace(sample, count, (count - 1) >> 1);
  const medLo = selectInPlace(sample, count, lowRank(0.5 - half));
  const medHi = selectInPlace(sample, count, lowRank(0.5 + half));
  for (let i = 0; i < count; i++) sample[i] = Math.abs(sample[i] - centre);
  const madLo = selectInPlace(sample, count, lowRank(0.5 - half));
  const madHi = selectInPlace(sample, count, lowRank(0.5 + half));
  return [medLo, medHi, centre, madLo, madHi, half];
}

/** The MAD scale of all n whitened residuals by direct selection (reorders and overwrites `values`). */
export function madScaleInPlace(values: Float64Array, n: number): number {
  return madScaleOverwrite(values, n);
}

/**
 * The k-th smallest (0-based) of a[0..count), rearranging a: Floyd & Rivest's SELECT
 * (robust-scale.ts), whose sampled pivots make it ~2× faster here than a median-of-three
 * quickselect; exact (it only permutes values).
 */
export function selectInPlace(a: Float64Array, count: number, k: number): number {
  return selectKth(a, count, k);
}

function grow(buf: Float64Array): Float64Array {
  const next = new Float64Array(buf.length * 2 + 16);
  next.set(buf);
  return next;
}

/** Rows sampled (at a constant stride) to plan the windows of `madScaleOfResiduals`: each window then holds ≈ 2·WINDOW_Z·0.5/√this ≈ 5 % of the rows. */
export const SCALE_SAMPLE_ROWS = 16384;

/**
 * The MAD scale of the whitened residuals √wᵢ·rᵢ of a finished fit, from its raw residuals: the
 * windows are planned from a systematic sample of the residuals, one branch-free counting pass
 * over the residual array keeps the values inside them, and a missed window falls back to
 * selecting among all n values. Exact either way.
 */
export function madScaleOfResiduals(residuals: Float64Array, weights: Float64Array | undefined): number {
  const n = residuals.length;
  if (n > DIRECT_SCALE_MAX_ROWS) {
    const count = scaleSampleCount(n);
    const sample = new Float64Array(count);
    const stride = n / count;
    for (let k = 0; k < count; k++) {
      const i = Math.floor(k * stride);
      sample[k] = (weights ? Math.sqrt(weights[i]) : 1) * residuals[i];
    }
    const col = planScale(sample, count, n);
    if (col) {
      countWindows(residuals, weights, col);
      const scale = col.finish(n);
      if (scale !== null) return scale;
    }
  }
  return selectedScale(residuals, weights);
}

/** A quarter of the rows at most: below that the windows would hold most of them anyway. */
function scaleSampleCount(n: number): number {
  return Math.min(n >> 2, SCALE_SAMPLE_ROWS);
}

/** The MAD scale by direct selection among all n whitened residuals (a scratch copy). */
function selectedScale(residuals: Float64Array, weights: Float64Array | undefined): number {
  const n = residuals.length;
  const all = scratchFloat64('mad-scale', n);
  if (weights) for (let i = 0; i < n; i++) all[i] = Math.sqrt(weights[i]) * residuals[i];
  else all.set(residuals);
  return madScaleInPlace(all, n);
}

/**
 * The counting pass of `madScaleOfResiduals`, branch-free: every value is written at the end of
 * both buffers and the ends advance by the 0/1 window tests (a branch on them would mispredict
 * for the ~10 % of rows inside a window, at random). Room for a whole chunk is made before it.
 */
function countWindows(residuals: Float64Array, weights: Float64Array | undefined, col: ScaleCollector): void {
  const n = residuals.length;
  const counts = new Float64Array(4);
  counts[0] = col.medCount;
  counts[1] = col.madCount;
  for (let from = 0; from < n; from += COUNT_CHUNK) {
    const to = Math.min(n, from + COUNT_CHUNK);
    col.ensureRoom(counts[0], counts[1], to - from);
    if (weights) countChunkWeighted(residuals, weights, col.medBuf, col.madBuf, col.medLo, col.medHi, col.centre, col.madLo, col.madHi, from, to, counts);
    else countChunk(residuals, col.medBuf, col.madBuf, col.medLo, col.medHi, col.centre, col.madLo, col.madHi, from, to, counts);
  }
  col.medCount = counts[0];
  col.madCount = counts[1];
  col.medBelow = counts[2];
  col.madBelow = counts[3];
}

/** counts = [kept in the median window, kept in the MAD window, below the median window, below the MAD window]. */
function countChunk(
  rho: Float64Array, med: Float64Array, mad: Float64Array, medLo: number, medHi: number, centre: number, madLo: number, madHi: number,
  from: number, to: number, counts: Float64Array,
): void {
  let mc = counts[0] | 0;
  let ac = counts[1] | 0;
  let medBelow = 0;
  let madBelow = 0;
  for (let i = from; i < to; i++) {
    const v = rho[i];
    const belowMed = +(v <= medLo);
    medBelow += belowMed;
    const am = Math.abs(v - centre);
    const belowMad = +(am <= madLo);
    madBelow += belowMad;
    med[mc] = v;
    mc += +(v < medHi) - belowMed;
    mad[ac] = v;
    ac += +(am < madHi) - belowMad;
  }
  counts[0] = mc;
  counts[1] = ac;
  counts[2] += medBelow;
  counts[3] += madBelow;
}

function countChunkWeighted(
  residuals: Float64Array, weights: Float64Array, med: Float64Array, mad: Float64Array, medLo: number, medHi: number, centre: number,
  madLo: number, madHi: number, from: number, to: number, counts: Float64Array,
): void {
  let mc = counts[0] | 0;
  let ac = counts[1] | 0;
  let medBelow = 0;
  let madBelow = 0;
  for (let i = from; i < to; i++) {
    const v = Math.sqrt(weights[i]) * residuals[i];
    const belowMed = +(v <= medLo);
    medBelow += belowMed;
    const am = Math.abs(v - centre);
    const belowMad = +(am <= madLo);
    madBelow += belowMad;
    med[mc] = v;
    mc += +(v < medHi) - belowMed;
    mad[ac] = v;
    ac += +(am < madHi) - belowMad;
  }
  counts[0] = mc;
  counts[1] = ac;
  counts[2] += medBelow;
  counts[3] += madBelow;
}

/** Rows between capacity checks of the branch-free counting pass. */
const COUNT_CHUNK = 4096;
