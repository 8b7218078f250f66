// The MAD scale the exact estimators report, (1/Φ⁻¹(3/4))·median|ρᵢ − median ρ| of the whitened
// residuals (Hampel 1974; 1.4826, check-values.md), computed exactly without sorting or copying
// all n residuals.
//
// Why a window: two exact medians of 10⁶ values by selection cost ~10–20 ms in JavaScript, as
// much as the whole fit. Instead (the sampling idea of Floyd & Rivest, CACM 18 (1975) 165):
// before the final pass, a sample of residuals at the final coefficients gives windows that hold
// the median of ρ and the median of |ρ − m̂| with overwhelming probability; the final pass counts
// the values below each window and keeps only those inside; the exact order statistics are then
// selected among the kept values. The answer is exact whenever the counts prove that the wanted
// ranks fall inside the windows (checked, see `finish`); otherwise the caller's full residuals
// are selected directly, so a missed window costs time, never accuracy.

/** 1/Φ⁻¹(3/4): the MAD is then consistent for σ at the normal. */
export const MAD_CONSISTENCY = 1 / 0.6744897501960817;
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

  /**
   * The pass keeps the below-window counts itself (branch-free, see least-absolute-certificate.ts)
   * and stores them in medBelow / madBelow; values inside a window are pushed here.
   */
  pushMedian(rho: number): void {
    if (this.medCount === this.medBuf.length) this.medBuf = grow(this.medBuf);
    this.medBuf[this.medCount++] = rho;
  }

  pushMad(rho: number): void {
    if (this.madCount === this.madBuf.length) this.madBuf = grow(this.madBuf);
    this.madBuf[this.madCount++] = rho;
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
    const med = 0.5 * (selectInPlace(this.medBuf, this.medCount, k1 - this.medBelow) +
      selectInPlace(this.medBuf, this.medCount, k2 - this.medBelow));
    const D = Math.abs(med - this.centre);
    if (!(this.madBelow <= k1 && k2 < this.madBelow + this.madCount)) return null;
    const buf = this.madBuf;
    for (let i = 0; i < this.madCount; i++) buf[i] = Math.abs(buf[i] - med);
    const a1 = selectInPlace(buf, this.madCount, k1 - this.madBelow);
    const a2 = selectInPlace(buf, this.madCount, k2 - this.madBelow);
    const lo = this.madLo + D;
    const hi = this.madHi - D;
    if (!(a1 >= lo && a2 <= hi)) return null;
    return MAD_CONSISTENCY * 0.5 * (a1 + a2);
  }
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

/** The MAD scale of all n whitened residuals by direct selection (reorders `values`). */
export function madScaleInPlace(values: Float64Array, n: number): number {
  const k1 = (n - 1) >> 1;
  const k2 = n >> 1;
  const med = 0.5 * (selectInPlace(values, n, k1) + selectInPlace(values, n, k2));
  for (let i = 0; i < n; i++) values[i] = Math.abs(values[i] - med);
  return MAD_CONSISTENCY * 0.5 * (selectInPlace(values, n, k1) + selectInPlace(values, n, k2));
}

/**
 * The k-th smallest (0-based) of a[0..count), rearranging a. Quickselect with a median-of-three
 * pivot and a three-way partition (many equal values are common: exact fits, repeated rows).
 */
export function selectInPlace(a: Float64Array, count: number, k: number): number {
  let lo = 0;
  let hi = count - 1;
  while (lo < hi) {
    const x = a[lo];
    const y = a[(lo + hi) >>> 1];
    const z = a[hi];
    const pivot = x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
    let lt = lo;
    let i = lo;
    let gt = hi;
    while (i <= gt) {
      const v = a[i];
      if (v < pivot) {
        a[i] = a[lt];
        a[lt] = v;
        lt++;
        i++;
      } else if (v > pivot) {
        a[i] = a[gt];
        a[gt] = v;
        gt--;
      } else i++;
    }
    if (k < lt) hi = lt - 1;
    else if (k > gt) lo = gt + 1;
    else return pivot;
  }
  return a[k];
}

function grow(buf: Float64Array): Float64Array {
  const next = new Float64Array(buf.length * 2 + 16);
  next.set(buf);
  return next;
}

/**
 * The windows of `ScaleCollector`, for a pass at coefficients β_s made before the final β* is
 * known (the screening pass of the least-absolute-deviations fit). Every row's whitened residual
 * moves by at most `margin` between the two (checked by the caller), so rows are counted below
 * a window only when they are below it by more than the margin, and kept as candidates (by
 * index) when within the margin of it; the exact values at β* are read back afterwards.
 */
export class ShiftedScaleWindows {
  medBelow = 0;
  madBelow = 0;
  medCount = 0;
  madCount = 0;
  medRows: Int32Array;
  madRows: Int32Array;
  /** Window edges widened by the margin (what the pass compares against). */
  readonly medLoOut: number;
  readonly medHiOut: number;
  readonly madLoOut: number;
  readonly madHiOut: number;

  constructor(
    readonly medLo: number, readonly medHi: number, readonly centre: number,
    readonly madLo: number, readonly madHi: number, readonly margin: number, capacity: number,
  ) {
    this.medLoOut = medLo - margin;
    this.medHiOut = medHi + margin;
    this.madLoOut = madLo - margin;
    this.madHiOut = madHi + margin;
    this.medRows = new Int32Array(capacity);
    this.madRows = new Int32Array(capacity);
  }

  pushMedian(row: number): void {
    if (this.medCount === this.medRows.length) this.medRows = growInt(this.medRows);
    this.medRows[this.medCount++] = row;
  }

  pushMad(row: number): void {
    if (this.madCount === this.madRows.length) this.madRows = growInt(this.madRows);
    this.madRows[this.madCount++] = row;
  }

  /**
   * The exact MAD scale of the n residuals at β*, given `rhoAt(row)` (whitened, at β*) and the
   * proven bound `shift` on every row's move (must be ≤ margin), or null when a window missed.
   * Rows counted below moved at most `shift`, so they lie at or below the unwidened edge; the
   * candidates' exact values then decide as in `ScaleCollector.finish`.
   */
  finish(n: number, shift: number, rhoAt: (row: number) => number): number | null {
    if (!(shift <= this.margin)) return null;
    const k1 = (n - 1) >> 1;
    const k2 = n >> 1;
    if (!(this.medBelow <= k1 && k2 < this.medBelow + this.medCount)) return null;
    const med = new Float64Array(this.medCount);
    for (let k = 0; k < this.medCount; k++) med[k] = rhoAt(this.medRows[k]);
    const v1 = selectInPlace(med, this.medCount, k1 - this.medBelow);
    const v2 = selectInPlace(med, this.medCount, k2 - this.medBelow);
    if (!(v1 >= this.medLo && v2 <= this.medHi)) return null;
    const m = 0.5 * (v1 + v2);
    const D = Math.abs(m - this.centre);
    if (!(this.madBelow <= k1 && k2 < this.madBelow + this.madCount)) return null;
    const mad = new Float64Array(this.madCount);
    for (let k = 0; k < this.madCount; k++) mad[k] = Math.abs(rhoAt(this.madRows[k]) - m);
    const a1 = selectInPlace(mad, this.madCount, k1 - this.madBelow);
    const a2 = selectInPlace(mad, this.madCount, k2 - this.madBelow);
    if (!(a1 >= this.madLo + D && a2 <= this.madHi - D)) return null;
    return MAD_CONSISTENCY * 0.5 * (a1 + a2);
  }
}

/** Windows for a pass at β_s from `count` whitened sample residuals at β_s (reordered). */
export function planShiftedScale(sample: Float64Array, count: number, n: number, margin: number): ShiftedScaleWindows | null {
  if (n <= DIRECT_SCALE_MAX_ROWS || count < 64) return null;
  const [medLo, medHi, centre, madLo, madHi, half] = windowEdges(sample, count);
  return new ShiftedScaleWindows(medLo, medHi, centre, madLo, madHi, margin, Math.ceil(3 * half * n) + 64);
}

function growInt(buf: Int32Array): Int32Array {
  const next = new Int32Array(buf.length * 2 + 16);
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
    const count = Math.min(n, SCALE_SAMPLE_ROWS);
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
  const all = new Float64Array(n);
  for (let i = 0; i < n; i++) all[i] = (weights ? Math.sqrt(weights[i]) : 1) * residuals[i];
  return madScaleInPlace(all, n);
}

/**
 * The counting pass of `madScaleOfResiduals`, branch-free: every value is written at the end of
 * both buffers and the ends advance by the 0/1 window tests (a branch on them would mispredict
 * for the ~10 % of rows inside a window, at random). Room for a whole chunk is made before it.
 */
function countWindows(residuals: Float64Array, weights: Float64Array | undefined, col: ScaleCollector): void {
  const n = residuals.length;
  const { medLo, medHi, centre, madLo, madHi } = col;
  let medBelow = 0;
  let madBelow = 0;
  let mc = col.medCount;
  let ac = col.madCount;
  for (let from = 0; from < n; from += COUNT_CHUNK) {
    const to = Math.min(n, from + COUNT_CHUNK);
    col.ensureRoom(mc, ac, to - from);
    const med = col.medBuf;
    const mad = col.madBuf;
    for (let i = from; i < to; i++) {
      const rho = weights ? Math.sqrt(weights[i]) * residuals[i] : residuals[i];
      const belowMed = +(rho <= medLo);
      medBelow += belowMed;
      const am = Math.abs(rho - centre);
      const belowMad = +(am <= madLo);
      madBelow += belowMad;
      med[mc] = rho;
      mc += +(rho < medHi) - belowMed;
      mad[ac] = rho;
      ac += +(am < madHi) - belowMad;
    }
  }
  col.medCount = mc;
  col.madCount = ac;
  col.medBelow = medBelow;
  col.madBelow = madBelow;
}

/** Rows between capacity checks of the branch-free counting pass. */
const COUNT_CHUNK = 4096;
