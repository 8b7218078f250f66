// Shared types of the fitting layer. The layer is pure numerics: no geodesy, no I/O.
//
// Weighting convention (every estimator): `weights[i]` = 1/σᵢ². Each estimator works on the
// whitened problem (row i and yᵢ multiplied by √wᵢ), so least squares minimises Σ wᵢ rᵢ²,
// least absolute deviations Σ √wᵢ |rᵢ|, minimax max √wᵢ |rᵢ|, and the M-estimators apply ρ to
// √wᵢ rᵢ / scale. Residuals returned are always raw (unwhitened) yᵢ − xᵢᵀβ.

export const ESTIMATORS = ['least-squares', 'least-absolute', 'minimax', 'huber', 'tukey'] as const;
export type Estimator = (typeof ESTIMATORS)[number];

/** y = Xβ (+ noise), n rows, p columns, X stored row-major: X[i*p + j]. */
export interface LinearProblem {
  n: number;
  p: number;
  X: Float64Array;
  y: Float64Array;
  /** Optional 1/σᵢ²; all ones when absent. Must be finite and > 0 (checked at the schema, asserted here). */
  weights?: Float64Array;
}

/** Data-dependent outcomes are a status, not a throw (style.md §12). */
export type FitStatus = 'ok' | 'too-few-rows' | 'rank-deficient' | 'not-converged';

export interface FitResult {
  estimator: Estimator;
  status: FitStatus;
  coefficients: Float64Array;
  /** Raw residuals yᵢ − xᵢᵀβ (length n). */
  residuals: Float64Array;
  /** The minimised objective on the whitened problem (Σr², Σ|r|, max|r|, Σρ(r/s)). */
  objective: number;
  /** Scale of the whitened residuals: σ₀ for least squares, the MAD-based scale for the robust ones (for L1, computed when first read). */
  scale: number;
  iterations: number;
  converged: boolean;
  /** Why the iteration stopped, in words ("relative change 3e-13 below 1e-12", "exact: optimal basis"). */
  reason: string;
  /**
   * p×p covariance of the coefficients, row-major, where defined (least squares; asymptotic for
   * M-estimators, computed from the problem's arrays when first read and then cached).
   */
  covariance?: Float64Array;
  /** IRLS weights of the last iteration (M-estimators), for diagnostics. */
  robustWeights?: Float64Array;
  /**
   * Indices of the rows defining the exact solution (L1: p interpolated rows; minimax: the p+1
   * reference). Huber and Tukey: the vertex of the L1 start they ran on this data, so that a warm
   * refit can re-derive the same start and scale cheaply (irls.ts).
   */
  basis?: Int32Array;
}

export interface FitOptions {
  /** Previous solution (e.g. before one more reading was added): a start, never trusted blindly. */
  warmStart?: Pick<FitResult, 'coefficients'> & Partial<Pick<FitResult, 'scale' | 'basis'>>;
  /** Tuning constant: Huber k (default 1.345), Tukey c (default 4.685). */
  tuning?: number;
  /** Fixed scale for the M-estimators instead of re-estimating it (MAD of the start). */
  scale?: number;
  maxIterations?: number;
  /** Relative convergence tolerance on the coefficients (default 1e-12 for IRLS). */
  tolerance?: number;
}
