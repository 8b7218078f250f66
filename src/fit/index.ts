// The fit layer's public API: pure numerics for y = Xβ with weights 1/σ² (see types.ts).
export * from './types.ts';
export { createProblem, interceptColumn, isNegligiblePivot, noSolution, RANK_TOLERANCE_FACTOR, residualsOf, sqrtWeights, validateProblem, whitenProblem, whitenResiduals } from './problem.ts';
export { MAD_CONSISTENCY, madScale, median, medianInPlace, quickselect } from './robust-scale.ts';
export { fitLeastSquares, leastSquaresCofactor, NORMAL_MIN_PIVOT, QR_BLOCK_ROWS, REFINEMENT_STEPS, STREAMING_MIN_ROWS, type LeastSquaresMethod, type LeastSquaresOptions } from './least-squares.ts';
export { chiSquareLowerTail, chiSquareTest, chiSquareUpperTail, logGamma, regularizedGamma, type ChiSquareTail, type ChiSquareTest } from './chi-square-test.ts';
export {
  leastSquaresDiagnostics, MDB_NONCENTRALITY, REDUNDANCY_FLOOR, RESIDUAL_ROUNDING, standardizedResiduals, SUSPECT_THRESHOLD, suspectFlags,
  W_TEST_CRITICAL_VALUE, type LeastSquaresDiagnostics, type LeastSquaresDiagnosticsOptions,
} from './diagnostics.ts';
export { IRLS_MAX_ITERATIONS, IRLS_MIN_PIVOT, IRLS_TOLERANCE, type RhoFunction } from './irls.ts';
export { fitHuber, HUBER_K, huberRho } from './huber.ts';
export { fitTukey, TUKEY_C, tukeyRho } from './tukey.ts';
export { fitLeastAbsolute } from './least-absolute.ts';
export { fitMinimax } from './minimax.ts';
export { fitLinear } from './fit-linear.ts';
export { createFitSession, SUMS_REBUILD_GROWTH, type FitSession, type SessionRow } from './fit-session.ts';
