// The rank test of the simplex-type exact estimators, for the rare path where no well-conditioned
// basis was found (see least-absolute.ts and minimax.ts: a basis with a large reciprocal
// condition already proves full rank, so this pass runs only when that proof is missing).
//
// The rule is the fit layer's: a pivot |R_jj| of the QR of the whitened design with unit-norm
// columns counts as zero when |R_jj| ≤ max(n, p)·ε·max|R_ii| (the numpy matrix_rank / LAPACK
// xGELSD default; backward error of orthogonal QR is O(max(n, p)·ε), Golub & Van Loan §5.2).
// R is accumulated row by row with Givens rotations (GVL §5.1.8; backward stable like
// Householder), so the pass needs O(p²) memory. Column scaling commutes with the QR
// (X·D = Q·(R·D)), and ‖X e_j‖ = ‖R e_j‖, so the unit-norm pivots come from R alone.
import type { LinearProblem } from './types.ts';

export interface RankReport {
  deficient: boolean;
  /** First column whose scaled pivot is negligible (−1 when none). */
  column: number;
  /** Scaled pivots |R_jj|/‖R e_j‖. */
  pivots: Float64Array;
  /** max(n, p)·ε·max scaled pivot. */
  threshold: number;
}

export function designRank(problem: LinearProblem): RankReport {
  const { n, p, X, weights } = problem;
  const R = new Float64Array(p * p);
  const row = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    const s = weights ? Math.sqrt(weights[i]) : 1;
    for (let j = 0; j < p; j++) row[j] = s * X[i * p + j];
    for (let j = 0; j < p; j++) {
      const a = R[j * p + j];
      const bj = row[j];
      if (bj === 0) continue;
      const r = Math.hypot(a, bj);
      const cs = a / r;
      const sn = bj / r;
      R[j * p + j] = r;
      row[j] = 0;
      for (let k = j + 1; k < p; k++) {
        const u = R[j * p + k];
        const v = row[k];
        R[j * p + k] = cs * u + sn * v;
        row[k] = cs * v - sn * u;
      }
    }
  }
  const pivots = new Float64Array(p);
  let maxPivot = 0;
  for (let j = 0; j < p; j++) {
    let norm = 0;
    for (let k = 0; k <= j; k++) norm += R[k * p + j] * R[k * p + j];
    norm = Math.sqrt(norm);
    pivots[j] = norm > 0 ? Math.abs(R[j * p + j]) / norm : 0;
    maxPivot = Math.max(maxPivot, pivots[j]);
  }
  const threshold = Math.max(n, p) * Number.EPSILON * maxPivot;
  let column = -1;
  for (let j = 0; j < p && column < 0; j++) if (!(pivots[j] > threshold)) column = j;
  return { deficient: column >= 0, column, pivots, threshold };
}
