// The asymptotic covariance of an M-estimate (Huber, Tukey) with Huber's small-sample correction
// (Huber, "Robust Statistics", 1981, §7.6; statsmodels "H1", MASS summary.rlm):
//   K²·[Σψ²/(n − p)]/m²·s²·(XᵀWX)⁻¹,  m = mean ψ′,  K = 1 + (p/n)·var(ψ′)/m².
// It needs m > 0 (Tukey's ψ′ can make it ≤ 0) and n > p. XᵀWX costs one pass over X, so the
// matrix is returned as a function for a field computed when first read (cached-field.ts), as
// MASS (summary.rlm) and statsmodels (RLMResults.bcov, a cached property) defer it.
import { interceptColumn } from './problem.ts';
import type { LinearProblem } from './types.ts';
import { addRows, cofactorMatrix, createNormalWorkspace, factorNormal, resetNormal } from './weighted-normal.ts';

/** Rows per chunk of the XᵀWX pass (the zero residuals it passes are one chunk long). */
const CHUNK_ROWS = 4096;
const ZERO_ROWS = new Float64Array(CHUNK_ROWS);

/**
 * The covariance as a deferred computation from the fit's sums (Σψ′, Σψ′², Σψ² over the rows, at
 * scale s); null where it is undefined (n ≤ p or mean ψ′ ≤ 0). Reads the problem when called.
 */
export function mEstimateCovariance(problem: LinearProblem, s: number, sumD: number, sumD2: number, sumPsi2: number): (() => Float64Array | undefined) | null {
  const { n, p, weights } = problem;
  const m = sumD / n;
  if (!(n > p && m > 0)) return null;
  const varD = Math.max(0, sumD2 / n - m * m);
  const K = 1 + ((p / n) * varD) / (m * m);
  const factor = ((K * K * (sumPsi2 / (n - p))) / (m * m)) * s * s;
  return () => {
    const ws = createNormalWorkspace(problem, interceptColumn(problem));
    resetNormal(ws);
    for (let start = 0; start < n; start += CHUNK_ROWS) {
      const rows = Math.min(CHUNK_ROWS, n - start);
      addRows(ws, problem, start, rows, ZERO_ROWS, weights ? weights.subarray(start, start + rows) : undefined);
    }
    return factorNormal(ws) > 0 ? cofactorMatrix(ws, factor) : undefined;
  };
}
