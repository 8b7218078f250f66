// The screening pass of the exact least-absolute-deviations fit (the preprocessing of Portnoy &
// Koenker, "The Gaussian hare and the Laplacian tortoise", Statistical Science 12 (1997) 279, §4).
//
// Given a fit β close to the optimum (from a subsample, a previous round, or a warm start) and a
// band (least-absolute-band.ts: leverage-shaped, r² < scale·xQxᵀ), every row is either kept
// (inside the band: it may end up on either side of the optimum, or in its basis) or pinned to
// the side it is on. Pinned rows enter the small problem only through their sum Σ sᵢaᵢ, the
// linear term ("glob" rows of the paper). If every pinned row keeps its side at the small
// problem's optimum, that optimum is the full problem's — which the final pass then proves with
// the dual certificate on all rows (least-absolute-certificate.ts); otherwise the caller widens
// the band and repeats. One pass, O(n·p), no per-row allocation: indices go to a growable
// Int32Array, the sums to p accumulators.
import type { Band } from './least-absolute-band.ts';
import { dotRow, quadRow } from './row-forms.ts';
import { nonFiniteRow } from './simplex-frame.ts';
import type { LinearProblem } from './types.ts';

export interface ScreenResult {
  /** Kept rows, increasing. */
  kept: Int32Array;
  keptCount: number;
  /** Σ sᵢ·√wᵢ·xᵢ over pinned rows (raw columns; frame columns for `screenCompact`), sᵢ = ±1 their side. */
  pinnedSum: Float64Array;
  above: number;
  below: number;
}

export interface FullScreen extends ScreenResult {
  /** Raw rows and readings of the kept rows, copied while streaming (no second, scattered gather). */
  keptX: Float64Array;
  keptY: Float64Array;
  /** √wᵢ of the kept rows (all ones without weights). */
  keptS: Float64Array;
  /** Σ |ρᵢ| over pinned rows at β (the pinned part of the objective, up to a linear term). */
  pinnedAbs: number;
  /** Σ (√wᵢ xᵢⱼ)² per column over all rows: column norms for the rank proof and rounding bounds. */
  colSq: Float64Array;
}

/**
 * The screening pass over all n rows at β with `band`, doing in the same stream everything the
 * certificate needs from the full data (least-absolute.ts): the pinned sum (blocks of SCREEN_BLOCK
 * rows summed plainly, blocks combined with TwoSum, as in least-absolute-certificate.ts), the
 * pinned rows' Σ|ρ|, column norms and a copy of each kept row. Branch-free on the side
 * (s = 1 − 2·[ρ < 0]; `+(bool)` compiles to a set-on-condition): every row adds s·aᵢ to the block sum and kept rows (a few per cent,
 * a well-predicted branch) take it back out; a branch on the random side would mispredict half
 * the time and cost several times the pass.
 */
export function screenRows(problem: LinearProblem, beta: Float64Array, band: Band, capacityHint: number): FullScreen {
  const { n, p, X, y, weights } = problem;
  const buf = new KeptBuffer(p, Math.max(16, Math.min(n, capacityHint)), n);
  const pinned = new Float64Array(p);
  const comp = new Float64Array(p);
  const blockSum = new Float64Array(p);
  const colSq = new Float64Array(p);
  let pinnedAbs = 0;
  // The unrolled loops note kept rows here and copy them after each block (the rows are still in
  // cache): a method call inside the loop made the compiler keep its accumulators in memory
  // around the call, ~7 % of the pass at n = 10⁴.
  const blockKept = new Int32Array(SCREEN_BLOCK);
  let sideSum = 0;
  const Q = band.rawQ;
  const scale = band.scale;
  const floor = band.floor;
  for (let start = 0; start < n; start += SCREEN_BLOCK) {
    const end = Math.min(n, start + SCREEN_BLOCK);
    let absBlock = 0;
    let nk = 0;
    if (p === 2 && !weights) {
      // The degree model, unweighted: the bulk of every large fit, unrolled.
      const b0 = beta[0];
      const b1 = beta[1];
      const q00 = Q[0];
      const q01 = Q[1] + Q[2];
      const q11 = Q[3];
      let s0 = 0;
      let s1 = 0;
      let c0 = 0;
      let c1 = 0;
      for (let i = start; i < end; i++) {
        const x0 = X[2 * i];
        const x1 = X[2 * i + 1];
        const r = y[i] - b0 * x0 - b1 * x1;
        const sg = 1 - 2 * +(r < 0);
        const lev = x0 * (q00 * x0 + q01 * x1) + q11 * x1 * x1;
        s0 += sg * x0;
        s1 += sg * x1;
        c0 += x0 * x0;
        c1 += x1 * x1;
        sideSum += sg;
        const a = Math.abs(r);
        absBlock += a;
        if (!(r * r >= scale * lev + floor)) {
          // Kept (rare): take the row back out of the pinned sums and copy it.
          if (!(r === r)) throw nonFiniteRow(problem, i);
          s0 -= sg * x0;
          s1 -= sg * x1;
          sideSum -= sg;
          absBlock -= a;
          blockKept[nk++] = i;
        }
      }
      blockSum[0] = s0;
      blockSum[1] = s1;
      colSq[0] += c0;
      colSq[1] += c1;
    } else if (p === 3 && !weights) {
      // The degree model with the x² term, unweighted, unrolled likewise.
      const b0 = beta[0];
      const b1 = beta[1];
      const b2 = beta[2];
      const q00 = Q[0];
      const q01 = Q[1] + Q[3];
      const q02 = Q[2] + Q[6];
      const q11 = Q[4];
      const q12 = Q[5] + Q[7];
      const q22 = Q[8];
      let s0 = 0;
      let s1 = 0;
      let s2 = 0;
      let c0 = 0;
      let c1 = 0;
      let c2 = 0;
      for (let i = start; i < end; i++) {
        const x0 = X[3 * i];
        const x1 = X[3 * i + 1];
        const x2 = X[3 * i + 2];
        const r = y[i] - b0 * x0 - b1 * x1 - b2 * x2;
        const sg = 1 - 2 * +(r < 0);
        const lev = x0 * (q00 * x0 + q01 * x1 + q02 * x2) + x1 * (q11 * x1 + q12 * x2) + q22 * x2 * x2;
        s0 += sg * x0;
        s1 += sg * x1;
        s2 += sg * x2;
        c0 += x0 * x0;
        c1 += x1 * x1;
        c2 += x2 * x2;
        sideSum += sg;
        const a = Math.abs(r);
        absBlock += a;
        if (!(r * r >= scale * lev + floor)) {
          if (!(r === r)) throw nonFiniteRow(problem, i);
          s0 -= sg * x0;
          s1 -= sg * x1;
          s2 -= sg * x2;
          sideSum -= sg;
          absBlock -= a;
          blockKept[nk++] = i;
        }
      }
      blockSum[0] = s0;
      blockSum[1] = s1;
      blockSum[2] = s2;
      colSq[0] += c0;
      colSq[1] += c1;
      colSq[2] += c2;
    } else {
      for (let i = start; i < end; i++) {
        const o = i * p;
        let s = 1;
        if (weights) {
          const w = weights[i];
          if (!(w > 0 && w < Infinity)) throw nonFiniteRow(problem, i);
          s = Math.sqrt(w);
        }
        let f = 0;
        let lev = 0;
        for (let j = 0; j < p; j++) {
          const xj = X[o + j];
          f += xj * beta[j];
          let t = 0;
          for (let k = 0; k < p; k++) t += Q[j * p + k] * X[o + k];
          lev += xj * t;
          colSq[j] += s * s * xj * xj;
        }
        const r = y[i] - f;
        const rho = s * r;
        const sg = 1 - 2 * +(r < 0);
        const a = Math.abs(rho);
        if (r * r >= scale * lev + floor) {
          const ss = s * sg;
          for (let j = 0; j < p; j++) blockSum[j] += ss * X[o + j];
          sideSum += sg;
          absBlock += a;
        } else {
          if (!(r === r)) throw nonFiniteRow(problem, i);
          buf.push(X, y, i, s);
        }
      }
    }
    for (let k = 0; k < nk; k++) buf.push(X, y, blockKept[k], 1);
    // A non-finite value makes its residual ±∞ or NaN, and so the block's Σ|r| (kept rows are
    // taken out, ∞ − ∞ is NaN): one test per block, the culprit found only then.
    if (!Number.isFinite(absBlock)) throw nonFiniteIn(problem, beta, start, end);
    pinnedAbs += absBlock;
    for (let j = 0; j < p; j++) {
      const t = pinned[j] + blockSum[j];
      const w = t - pinned[j];
      comp[j] += pinned[j] - (t - w) + (blockSum[j] - w);
      pinned[j] = t;
      blockSum[j] = 0;
    }
  }
  for (let j = 0; j < p; j++) pinned[j] += comp[j];
  const count = buf.count;
  const pinnedCount = n - count;
  return {
    kept: buf.rows, keptCount: count, pinnedSum: pinned, above: (pinnedCount + sideSum) / 2, below: (pinnedCount - sideSum) / 2,
    keptX: buf.X, keptY: buf.y, keptS: buf.s, pinnedAbs, colSq,
  };
}

/** Growable copy of the kept rows (a class, so the pass calls one stable method). */
class KeptBuffer {
  rows: Int32Array;
  X: Float64Array;
  y: Float64Array;
  s: Float64Array;
  count = 0;

  constructor(readonly p: number, private cap: number, private readonly limit: number) {
    this.rows = new Int32Array(cap);
    this.X = new Float64Array(cap * p);
    this.y = new Float64Array(cap);
    this.s = new Float64Array(cap);
  }

  push(X: Float64Array, y: Float64Array, i: number, s: number): void {
    if (this.count === this.cap) this.grow();
    const p = this.p;
    const k = this.count++;
    this.rows[k] = i;
    for (let j = 0; j < p; j++) this.X[k * p + j] = X[i * p + j];
    this.y[k] = y[i];
    this.s[k] = s;
  }

  private grow(): void {
    this.cap = Math.min(this.limit, this.cap * 2);
    this.rows = resizeInt(this.rows, this.cap);
    this.X = resize(this.X, this.cap * this.p);
    this.y = resize(this.y, this.cap);
    this.s = resize(this.s, this.cap);
  }
}

/** The InputError for the first row of [from, to) whose residual at β is not finite. */
function nonFiniteIn(problem: LinearProblem, beta: Float64Array, from: number, to: number): Error {
  const { p, X, y } = problem;
  for (let i = from; i < to; i++) {
    let f = 0;
    for (let j = 0; j < p; j++) f += X[i * p + j] * beta[j];
    if (!Number.isFinite(y[i] - f)) return nonFiniteRow(problem, i);
  }
  return nonFiniteRow(problem, from);
}

/** Rows per block of the pinned sums (error ≤ γ_SCREEN_BLOCK·Σ|aᵢⱼ| + 2ε|S_j|). */
export const SCREEN_BLOCK = 1024;

/**
 * The compact-row version (inner screening levels): frame rows A, b at γ, band in the frame.
 * The pinned sums are formed afterwards, a column at a time in a local (the same terms in the
 * same order as adding each pinned row into the p sums, which kept them in memory: a store and
 * reload per term).
 */
export function screenCompact(A: Float64Array, b: Float64Array, m: number, p: number, gamma: Float64Array, band: Band): ScreenResult {
  let kept: Int32Array = new Int32Array(Math.max(16, Math.min(m, 64)));
  let count = 0;
  const side = new Float64Array(m);
  let sideSum = 0;
  const Q = band.frameQ;
  const scale = band.scale;
  for (let i = 0; i < m; i++) {
    const o = i * p;
    const r = b[i] - dotRow(A, o, gamma, p);
    if (r * r >= scale * quadRow(A, o, Q, p)) {
      const sg = 1 - 2 * +(r < 0);
      side[i] = sg;
      sideSum += sg;
    } else {
      if (count === kept.length) kept = grow(kept, m);
      kept[count++] = i;
    }
  }
  const pinned = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    let sum = 0;
    for (let i = 0; i < m; i++) sum += side[i] * A[i * p + j]; // kept rows add 0
    pinned[j] = sum;
  }
  const pinnedCount = m - count;
  return { kept, keptCount: count, pinnedSum: pinned, above: (pinnedCount + sideSum) / 2, below: (pinnedCount - sideSum) / 2 };
}

function grow(buf: Int32Array, cap: number): Int32Array {
  return resizeInt(buf, Math.min(cap, buf.length * 2));
}

function resizeInt(buf: Int32Array, size: number): Int32Array {
  const next = new Int32Array(size);
  next.set(buf.subarray(0, Math.min(size, buf.length)));
  return next;
}

function resize(buf: Float64Array, size: number): Float64Array {
  const next = new Float64Array(size);
  next.set(buf.subarray(0, Math.min(size, buf.length)));
  return next;
}
