// Correctness beside speed: every side's answer is re-scored here, on the same data, from its
// coefficients alone (nobody's self-reported objective is trusted).
//
// Rules (design.md "exact"):
// - L1 and L∞: our objective must be within 1e-9 relative of the best objective among the peers
//   (lower is better; HiGHS simplex at default tolerances can miss the L∞ optimum by ~5e-6, so the
//   best of several independent solvers is the reference, not any one of them).
// - Least squares, Huber, Tukey: coefficients within 1e-8 relative of the reference, in the
//   allclose form |Δβⱼ| ≤ 1e-8·|βⱼ| + 1e-8·σ/maxᵢ|Xᵢⱼ|, σ the data's noise level. The second term
//   only matters for a coefficient near zero (the x² term here is ~0.1 ± several units at small n):
//   it holds such a coefficient to a change that moves no fitted value by more than 1e-8 σ.
// Sums use Neumaier's compensated summation (error ~ε·Σ|terms| independent of n, instead of n·ε),
// so the 1e-9 test at n = 10⁶ measures the solvers, not the scorer.

export const OBJECTIVE_REL_TOL = 1e-9;
export const COEFFICIENT_REL_TOL = 1e-8;

/** Σ|yᵢ − xᵢᵀβ| (kind 'l1') or max|yᵢ − xᵢᵀβ| (kind 'linf'), X row-major n×p. */
export function scoreObjective(kind: 'l1' | 'linf', X: Float64Array, y: Float64Array, p: number, beta: ArrayLike<number>): number {
  const n = y.length;
  if (kind === 'linf') {
    let worst = 0;
    for (let i = 0; i < n; i++) {
      let fit = 0;
      for (let j = 0; j < p; j++) fit += X[i * p + j] * beta[j];
      const r = Math.abs(y[i] - fit);
      if (r > worst) worst = r;
    }
    return worst;
  }
  let sum = 0;
  let comp = 0;
  for (let i = 0; i < n; i++) {
    let fit = 0;
    for (let j = 0; j < p; j++) fit += X[i * p + j] * beta[j];
    const r = Math.abs(y[i] - fit);
    const t = sum + r;
    comp += Math.abs(sum) >= r ? sum - t + r : r - t + sum;
    sum = t;
  }
  return sum + comp;
}

export interface CoefficientComparison {
  /** max over j of |Δβⱼ| / (|βⱼ| + σ/max|Xⱼ|): ≤ 1 × COEFFICIENT_REL_TOL passes. */
  scaledDifference: number;
  /** Plain max over j of |Δβⱼ|/|βⱼ| (for the record). */
  maxRelativeDifference: number;
  match: boolean;
}

export function compareCoefficients(ours: ArrayLike<number>, reference: ArrayLike<number>, X: Float64Array, p: number, noiseSd: number): CoefficientComparison {
  const colMax = new Float64Array(p);
  for (let i = 0; i < X.length; i++) {
    const j = i % p;
    const v = Math.abs(X[i]);
    if (v > colMax[j]) colMax[j] = v;
  }
  let scaled = 0;
  let rel = 0;
  for (let j = 0; j < p; j++) {
    const d = Math.abs(ours[j] - reference[j]);
    const floor = colMax[j] > 0 ? noiseSd / colMax[j] : 0;
    scaled = Math.max(scaled, d / (Math.abs(reference[j]) + floor));
    rel = Math.max(rel, Math.abs(reference[j]) > 0 ? d / Math.abs(reference[j]) : d === 0 ? 0 : Number.POSITIVE_INFINITY);
  }
  const ok = ours.length === reference.length && Number.isFinite(scaled);
  return { scaledDifference: scaled, maxRelativeDifference: rel, match: ok && scaled <= COEFFICIENT_REL_TOL };
}

/** Signed (ours − best)/best: ≤ 1e-9 passes; negative means ours is better than every peer. */
export function objectiveGap(ours: number, best: number): number {
  if (best === 0) return ours === 0 ? 0 : Number.POSITIVE_INFINITY;
  return (ours - best) / Math.abs(best);
}
