// Huber's M-estimate finished by an active set after the first Newton pass (large n, the fused
// pass of irls-fused-pass.ts).
//
// Why: Huber's ρ is quadratic for |u| ≤ k and linear outside, so once every reading's side is
// known (inside, above +k, below −k) the estimate solves one linear system: Σ_inside zzᵀ·δ =
// Σ_inside r⁰z + s·k·Σ_outside sign·z, with r⁰ the residuals at the start β⁰ and β = β⁰ + δ
// (Huber, "Robust Statistics", 1981, §7.8: Newton's method on ρ is exact once the partition is
// right). The first pass already forms that system for the start's partition. A small step can
// only move readings near ±k across, so the pass also lists the readings with ||u| − k| < margin;
// their sides are settled here by re-solving with row updates (O(p²) per moved reading, no pass
// over the data), and every unlisted reading provably keeps its side when max |xᵀδ|/s over the
// box of the columns' ranges is < margin. The fit then needs one more pass, for the returned
// residuals and weights: two passes instead of three or more on the benchmark data.
import { scratchFloat64 } from './scratch.ts';
import type { LinearProblem } from './types.ts';
import { factorNormal, solveCorrection, cloneNormalWorkspace, type NormalWorkspace } from './weighted-normal.ts';

/**
 * Readings near ±k listed by the first pass, with their design rows and residuals at β⁰ copied
 * as they are read (the settle loop then runs on contiguous data: gathering 10⁴ scattered rows
 * afterwards cost ~3 ms in cache misses), and the columns' ranges (for the bound).
 */
export interface HuberBand {
  /** Half-width of the band around |u| = k, in units of the scale. */
  readonly margin: number;
  readonly p: number;
  /** count rows of p design values each. */
  readonly x: Float64Array;
  /** Residual at β⁰ of each listed row. */
  readonly r: Float64Array;
  count: number;
  /** More rows fell in the band than the buffers hold: the listing is incomplete, no active set. */
  overflowed: boolean;
  /** Each column's smallest and largest value (the box the bound on |xᵢᵀδ| is taken over). */
  readonly colMin: Float64Array;
  readonly colMax: Float64Array;
}

/** Below this many rows the plain Newton passes are cheap and the band is not used. */
export const HUBER_BAND_MIN_ROWS = 20000;

/** Re-solves before the active set gives up (the plain iteration then continues). */
export const MAX_RESOLVES = 20;

/**
 * The band's half-width: the step from a √n-consistent start moves u by O(√(p/n)); 12 of those,
 * at least 0.02, keeps the bound below it on the benchmark data (8 was too few at n = 4·10⁴,
 * p = 3) while listing ~0.64·margin of the rows (the normal density at ±1.345 is 0.16, four
 * half-bands).
 */
export function bandMargin(n: number, p: number): number {
  return Math.max(0.02, 12 * Math.sqrt(p / n));
}

/**
 * The band's buffers and the columns' ranges. The ranges do not depend on β, so they are taken
 * here once rather than in every fused pass; one loop per p (measured at n = 10⁶: the generic
 * j-loop cost 5–8 ms, and tracking them inside the listing pass slowed it by 4–6 ns/row, the
 * extra live values spilling its registers).
 */
export function createHuberBand(problem: LinearProblem): HuberBand {
  const { n, p } = problem;
  const margin = bandMargin(n, p);
  const capacity = Math.ceil(n * margin) + 1024;
  const colMin = new Float64Array(p).fill(Infinity);
  const colMax = new Float64Array(p).fill(-Infinity);
  columnRanges(problem, colMin, colMax);
  // The listing buffers never leave the fit (settleHuberPartition reads them before irls returns):
  // scratch slots, reused by the next fit (fresh ones, ~0.5 MB at n = 10⁶, cost ~3 ms in page faults).
  return { margin, p, x: scratchFloat64('huber-band-x', capacity * p), r: scratchFloat64('huber-band-r', capacity), count: 0, overflowed: false, colMin, colMax };
}

/**
 * The first constant column (min = max ≠ 0) from the band's ranges, or −1: interceptColumn's
 * answer (problem.ts) on validated data, where no value is NaN.
 */
export function constantColumn(band: HuberBand): number {
  for (let j = 0; j < band.p; j++) if (band.colMin[j] === band.colMax[j] && band.colMin[j] !== 0) return j;
  return -1;
}

/** Each column's min and max into colMin/colMax (filled with ±∞): compares, not Math.min/max (V8's NaN/−0 handling). */
function columnRanges(problem: LinearProblem, colMin: Float64Array, colMax: Float64Array): void {
  const { n, p, X } = problem;
  if (p === 2) {
    let lo0 = Infinity, hi0 = -Infinity, lo1 = Infinity, hi1 = -Infinity;
    for (let o = 0; o < 2 * n; o += 2) {
      const x0 = X[o], x1 = X[o + 1];
      if (x0 < lo0) lo0 = x0;
      if (x0 > hi0) hi0 = x0;
      if (x1 < lo1) lo1 = x1;
      if (x1 > hi1) hi1 = x1;
    }
    colMin[0] = lo0; colMax[0] = hi0; colMin[1] = lo1; colMax[1] = hi1;
    return;
  }
  if (p === 3) {
    let lo0 = Infinity, hi0 = -Infinity, lo1 = Infinity, hi1 = -Infinity, lo2 = Infinity, hi2 = -Infinity;
    for (let o = 0; o < 3 * n; o += 3) {
      const x0 = X[o], x1 = X[o + 1], x2 = X[o + 2];
      if (x0 < lo0) lo0 = x0;
      if (x0 > hi0) hi0 = x0;
      if (x1 < lo1) lo1 = x1;
      if (x1 > hi1) hi1 = x1;
      if (x2 < lo2) lo2 = x2;
      if (x2 > hi2) hi2 = x2;
    }
    colMin[0] = lo0; colMax[0] = hi0; colMin[1] = lo1; colMax[1] = hi1; colMin[2] = lo2; colMax[2] = hi2;
    return;
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < p; j++) {
      const v = X[i * p + j];
      if (v < colMin[j]) colMin[j] = v;
      if (v > colMax[j]) colMax[j] = v;
    }
  }
}

export interface SettledPartition {
  /** β − β⁰. */
  delta: Float64Array;
  /** Readings inside |u| ≤ k at β (the Huber pass's Σψ′). */
  inside: number;
  resolves: number;
  moved: number;
  /** max over unlisted readings of |Δu| (a bound), < margin. */
  bound: number;
  listed: number;
  margin: number;
}

/**
 * Settles the sides of the listed readings. `ws` holds the first pass's Newton system at β⁰ (not
 * modified), `inside0` the number of readings inside at β⁰.
 * Null when the listing overflowed, the active set does not settle within MAX_RESOLVES, the system is singular, or the
 * bound does not prove the unlisted readings' sides: the caller then iterates as usual.
 */
export function settleHuberPartition(k: number, s: number, ws: NormalWorkspace, band: HuberBand, inside0: number, minPivot: number): SettledPartition | null {
  const { p } = ws;
  if (band.overflowed) return null;
  const sys = cloneNormalWorkspace(ws);
  sys.gram.set(ws.gram);
  sys.rhs.set(ws.rhs);
  const { x: X, r: residuals, count } = band;
  const side = new Int8Array(count);
  const ks = k * s;
  for (let t = 0; t < count; t++) side[t] = sideOf(residuals[t], ks);
  const delta = new Float64Array(p);
  const z = new Float64Array(p);
  let inside = inside0;
  let moved = 0;
  for (let resolves = 1; resolves <= MAX_RESOLVES; resolves++) {
    if (!(factorNormal(sys) >= minPivot)) return null;
    solveCorrection(sys, delta);
    let changes = 0;
    for (let t = 0; t < count; t++) {
      let f = 0;
      for (let j = 0; j < p; j++) f += X[t * p + j] * delta[j];
      const r0 = residuals[t];
      const now = sideOf(r0 - f, ks);
      if (now === side[t]) continue;
      rowZ(sys, X, t, z);
      // Take the old side's terms out, put the new side's in (inside: zzᵀ and r⁰z; outside: ±s·k·z).
      addContribution(sys, z, side[t], r0, ks, -1);
      addContribution(sys, z, now, r0, ks, 1);
      inside += (now === 0 ? 1 : 0) - (side[t] === 0 ? 1 : 0);
      side[t] = now;
      changes++;
    }
    moved += changes;
    if (changes === 0) {
      // max over the columns' box of |xᵀδ| = |midᵀδ| + Σⱼ halfⱼ|δⱼ| (mid, half of each range): a
      // bound on every row's change (centred, so an intercept shift traded against a slope
      // shift is not counted twice).
      let centre = 0;
      let spread = 0;
      for (let j = 0; j < p; j++) {
        centre += 0.5 * (band.colMin[j] + band.colMax[j]) * delta[j];
        spread += 0.5 * (band.colMax[j] - band.colMin[j]) * Math.abs(delta[j]);
      }
      const bound = (Math.abs(centre) + spread) / s;
      return bound < band.margin ? { delta, inside, resolves, moved, bound, listed: count, margin: band.margin } : null;
    }
  }
  return null;
}

/** 0 inside |r| ≤ k·s (as the fused pass decides it), else the sign of r. */
function sideOf(r: number, ks: number): number {
  return Math.abs(r) <= ks ? 0 : r > 0 ? 1 : -1;
}

/** The centred, scaled row z of weighted-normal.ts (no prior weights on the fused path). */
function rowZ(ws: NormalWorkspace, X: Float64Array, i: number, z: Float64Array): void {
  const { p, shift, scale } = ws;
  for (let j = 0; j < p; j++) z[j] = (X[i * p + j] - shift[j]) * scale[j];
}

/** sign·(this side's terms): inside zzᵀ into the matrix (upper triangle) and r⁰z into b; outside ±k·s·z into b. */
function addContribution(ws: NormalWorkspace, z: Float64Array, side: number, r0: number, ks: number, sign: number): void {
  const { p, gram, rhs } = ws;
  if (side === 0) {
    for (let a = 0; a < p; a++) {
      for (let b = a; b < p; b++) gram[a * p + b] += sign * z[a] * z[b];
      rhs[a] += sign * r0 * z[a];
    }
  } else {
    for (let a = 0; a < p; a++) rhs[a] += sign * side * ks * z[a];
  }
}
