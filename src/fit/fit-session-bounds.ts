// Bounds over a fit session's rows, and how far any row's residual can move when β changes.
//
// Why: the session's kept states (the sorted residual reference of fit-session-scale.ts, the
// rows pinned by the L1 refit of fit-session-l1-refit.ts) were computed at some β_ref. A row's
// whitened residual ρᵢ = √wᵢ(yᵢ − xᵢᵀβ) moves by √wᵢ|xᵢᵀ(β − β_ref)| ≤ √w_max·Σⱼ max|xⱼ|·|βⱼ − β_refⱼ|
// (triangle inequality), one bound for every row with no pass over them.
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
 * A bound on |ρᵢ(β) − ρ̃ᵢ(β_ref)| for every row, ρ̃ the residual as computed: the move above plus
 * the rounding of both residuals, 64ε of √w_max(max|y| + Σⱼ max|xⱼ|(|βⱼ| + |β_refⱼ|)) — far above
 * the few ulps of y − xᵀβ (Higham, "Accuracy and Stability of Numerical Algorithms", §3.1).
 */
export function reachBetween(b: RowBounds, beta: ArrayLike<number>, betaRef: ArrayLike<number>): number {
  let move = 0;
  let size = b.yAbsMax;
  for (let j = 0; j < b.colAbsMax.length; j++) {
    move += b.colAbsMax[j] * Math.abs(beta[j] - betaRef[j]);
    size += b.colAbsMax[j] * (Math.abs(beta[j]) + Math.abs(betaRef[j]));
  }
  return b.sqrtWMax * (move + 64 * Number.EPSILON * size);
}
