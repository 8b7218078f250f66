// Bounds over a fit session's rows, and how far any row's residual can move when β changes.
//
// Why: the session's kept states (the sorted residual reference of fit-session-scale.ts, the
// rows pinned by the L1 refit of fit-session-l1-refit.ts) were computed at some β_ref. A row's
// whitened residual ρᵢ = √wᵢ(yᵢ − xᵢᵀβ) moves by |aᵢᵀd|, aᵢ = √wᵢxᵢ, d = β − β_ref. Two bounds
// for every row with no pass over them:
// - raw: Σⱼ max|aⱼ|·|dⱼ| (triangle inequality), from the columns' ranges (RowBounds);
// - framed: for a fixed set of rows (the reference's), the box of their coordinates in a
//   whitening frame (ReachFrame). With collinear columns (1, x, x² for x = sin²φ) a refit's d
//   has large entries that cancel in every row, so the raw bound is 10–50× the true move; in
//   the frame the coordinates are uncorrelated and the box bound is within a small factor of it.
// The smaller one is used; each is a bound on its own.
import { choleskyUpper } from './linear-solve.ts';
import type { LinearProblem } from './types.ts';

/** Over every row ever appended (a superset after a rollback, still a bound): max |xᵢⱼ| per column, max √wᵢ, max |yᵢ|. */
export interface RowBounds {
  colAbsMax: Float64Array;
  sqrtWMax: number;
  yAbsMax: number;
}

export function emptyBounds(p: number): RowBounds {
  return { colAbsMax: new Float64Array(p), sqrtWMax: 0, yAbsMax: 0 };
}

/** Widens the bounds by rows from … n−1. */
export function widenBounds(b: RowBounds, problem: LinearProblem, from: number): void {
  const { n, p, X, y, weights } = problem;
  for (let i = from; i < n; i++) {
    for (let j = 0; j < p; j++) b.colAbsMax[j] = Math.max(b.colAbsMax[j], Math.abs(X[i * p + j]));
    b.sqrtWMax = Math.max(b.sqrtWMax, weights ? Math.sqrt(weights[i]) : 1);
    b.yAbsMax = Math.max(b.yAbsMax, Math.abs(y[i]));
  }
}

/**
 * The rows [0, rows) in a whitening frame: G = Σ aᵢaᵢᵀ = RᵀR (Cholesky, R upper), zᵢ = R⁻ᵀaᵢ
 * (computed), so aᵢᵀd = zᵢᵀu + eᵢᵀd with u = Rd and eᵢ = aᵢ − Rᵀzᵢ what the rounding of zᵢ left.
 * Any R gives a valid bound (eᵢ is measured, not assumed); a good R makes the box of the zᵢ tight.
 */
export interface ReachFrame {
  readonly rows: number;
  /** Upper triangular p×p, row-major. */
  readonly R: Float64Array;
  /** Per frame column: the smallest and largest zᵢⱼ, and max |zᵢⱼ|. */
  readonly zLo: Float64Array;
  readonly zHi: Float64Array;
  readonly zAbs: Float64Array;
  /** Per raw column: a bound on |eᵢⱼ| over the rows, its own rounding and that of aᵢⱼ = √wᵢxᵢⱼ included. */
  readonly eAbs: Float64Array;
}

/** γₖ = kε/(1 − kε) (Higham, "Accuracy and Stability of Numerical Algorithms", Lemma 3.1). */
function gammaOf(k: number): number {
  return (k * Number.EPSILON) / (1 - k * Number.EPSILON);
}

/** Pivots below this fraction of their diagonal: too collinear for a useful frame, the raw bound decides. */
const FRAME_PIVOT_FLOOR = 1e-12;

/** The frame of rows [0, rows): two passes, O(rows·p²); null when the Gram matrix is numerically singular. */
export function buildReachFrame(problem: LinearProblem, rows: number): ReachFrame | null {
  const { p, X, weights } = problem;
  if (rows < p) return null;
  const G = new Float64Array(p * p);
  for (let i = 0; i < rows; i++) {
    const sw2 = weights ? weights[i] : 1;
    for (let j = 0; j < p; j++) {
      const xj = X[i * p + j];
      for (let k = j; k < p; k++) G[j * p + k] += sw2 * xj * X[i * p + k];
    }
  }
  const R = new Float64Array(p * p);
  if (!choleskyUpper(G, p, R, FRAME_PIVOT_FLOOR)) return null;
  const zLo = new Float64Array(p).fill(Infinity);
  const zHi = new Float64Array(p).fill(-Infinity);
  const zAbs = new Float64Array(p);
  const eAbs = new Float64Array(p);
  const z = new Float64Array(p);
  const g = gammaOf(p + 1);
  for (let i = 0; i < rows; i++) {
    const sw = weights ? Math.sqrt(weights[i]) : 1;
    // Forward substitution Rᵀz = a, then e = a − Rᵀz with its rounding (≤ γ_{p+1}(|a| + Σ|R||z|)).
    for (let j = 0; j < p; j++) {
      const a = sw * X[i * p + j];
      let s = a;
      let size = Math.abs(a);
      for (let k = 0; k < j; k++) {
        s -= R[k * p + j] * z[k];
        size += Math.abs(R[k * p + j] * z[k]);
      }
      z[j] = s / R[j * p + j];
      const e = s - R[j * p + j] * z[j];
      size += Math.abs(R[j * p + j] * z[j]);
      // 2ε|a|: a itself is √wᵢxᵢⱼ rounded once (and √wᵢ as the residuals round it).
      eAbs[j] = Math.max(eAbs[j], Math.abs(e) + g * size + 2 * Number.EPSILON * Math.abs(a));
      zLo[j] = Math.min(zLo[j], z[j]);
      zHi[j] = Math.max(zHi[j], z[j]);
      zAbs[j] = Math.max(zAbs[j], Math.abs(z[j]));
    }
  }
  return { rows, R, zLo, zHi, zAbs, eAbs };
}

/** max over the frame's rows of |aᵢᵀd|, bounded: the box of the zᵢ against u = Rd, u's rounding and the eᵢ. */
function framedMove(f: ReachFrame, d: Float64Array): number {
  const p = d.length;
  const g = gammaOf(p);
  let lo = 0;
  let hi = 0;
  let slack = 0;
  for (let j = 0; j < p; j++) {
    let u = 0;
    let size = 0;
    for (let l = j; l < p; l++) {
      u += f.R[j * p + l] * d[l];
      size += Math.abs(f.R[j * p + l] * d[l]);
    }
    const a = f.zLo[j] * u;
    const b = f.zHi[j] * u;
    lo += Math.min(a, b);
    hi += Math.max(a, b);
    slack += f.zAbs[j] * g * size + f.eAbs[j] * Math.abs(d[j]);
  }
  // The sums above are of at most 3p terms each, rounded: a relative γ_{4p} covers them and d's own rounding.
  return (Math.max(-lo, hi) + slack) * (1 + gammaOf(4 * p + 4));
}

/**
 * A bound on |ρᵢ(β) − ρ̃ᵢ(β_ref)| for every row, ρ̃ the residual as computed: the move above (the
 * frame's when given, for its rows only, and the raw bound, whichever is smaller) plus the
 * rounding of both residuals, 64ε of √w_max(max|y| + Σⱼ max|xⱼ|(|βⱼ| + |β_refⱼ|)) — far above the
 * few ulps of y − xᵀβ (Higham, §3.1).
 */
export function reachBetween(b: RowBounds, beta: ArrayLike<number>, betaRef: ArrayLike<number>, frame?: ReachFrame | null): number {
  const p = b.colAbsMax.length;
  let move = 0;
  let size = b.yAbsMax;
  const d = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    d[j] = beta[j] - betaRef[j];
    move += b.colAbsMax[j] * Math.abs(d[j]);
    size += b.colAbsMax[j] * (Math.abs(beta[j]) + Math.abs(betaRef[j]));
  }
  move *= b.sqrtWMax;
  if (frame) move = Math.min(move, framedMove(frame, d));
  return move + b.sqrtWMax * 64 * Number.EPSILON * size;
}
