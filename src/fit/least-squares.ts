// Weighted least squares: minimise Σ wᵢ(yᵢ − xᵢᵀβ)² with wᵢ = 1/σᵢ².
//
// Route 1 (below STREAMING_MIN_ROWS rows, and whenever route 2's guard fails): Householder QR
// (ml-matrix QrDecomposition) of the whitened design [√W X D | √W y], D scaling every column to
// unit norm. Householder QR is
// backward stable (Golub & Van Loan, "Matrix Computations" 4th ed., §5.3), so the coefficients
// carry an error of order cond(X)·ε whatever the conditioning; the scaling makes the rank test
// independent of units. Beyond QR_BLOCK_ROWS the QR is taken block by block (TSQR: the R of each
// block is stacked on the next), which is the same factorisation up to row signs.
// Route 2 (from STREAMING_MIN_ROWS rows): streaming normal equations on centred, scaled columns
// with refinement in correction form (weighted-normal.ts). Exact to ~1e-14 relative when the pivot guard passes;
// otherwise the problem goes to route 1 instead.
// Covariance σ₀²(XᵀWX)⁻¹ with σ₀² = Σwr²/(n − p); the expected σ₀² is 1 when wᵢ = 1/σᵢ².
import { Matrix, QrDecomposition } from 'ml-matrix';
import { interceptColumn, isNegligiblePivot, noSolution, residualsOf, validateProblem } from './problem.ts';
import { scratchFloat64 } from './scratch.ts';
import type { FitOptions, FitResult, LinearProblem } from './types.ts';
import { accumulateNormal, accumulateResidualRhs, cofactorMatrix, createNormalWorkspace, factorNormal, solveCorrection } from './weighted-normal.ts';

export type LeastSquaresMethod = 'auto' | 'qr' | 'normal';

export interface LeastSquaresOptions extends FitOptions {
  /** 'auto' (QR up to STREAMING_MIN_ROWS rows, then normal equations), or force one route. */
  method?: LeastSquaresMethod;
}

/**
 * From this many rows on, 'auto' streams the normal equations (guarded; QR decides when the guard
 * fails). Measured with bench/: ml-matrix's QR costs ~6 ms at 10⁴ rows (its rows are JavaScript
 * arrays), the normal route ~0.1 ms; below a few hundred rows both are negligible and QR is kept.
 */
export const STREAMING_MIN_ROWS = 256;
/** Rows per QR block: bounds ml-matrix's per-row objects to a few hundred kB at any n. */
export const QR_BLOCK_ROWS = 4096;
/**
 * Smallest pivot ratio (sine of the angle between a column and the others, see factorNormal)
 * accepted on the normal-equation route: cond ≲ 1e4, so cond²·ε ≲ 2e-8 and each refinement step
 * shrinks the error by that factor; below it the QR route decides.
 */
export const NORMAL_MIN_PIVOT = 1e-4;
/** Refinement steps after the first solve: one takes the guard's worst 2e-8 error to ~4e-16. */
export const REFINEMENT_STEPS = 1;

interface Solution {
  beta: Float64Array;
  /** (XᵀWX)⁻¹, row-major p×p. */
  cofactor: Float64Array;
  how: string;
}

/** Weighted least squares with covariance, σ₀ and a status for degenerate designs. */
export function fitLeastSquares(problem: LinearProblem, options: LeastSquaresOptions = {}): FitResult {
  validateProblem(problem);
  const { n, p } = problem;
  if (n < p) return noSolution('least-squares', problem, 'too-few-rows', `${n} rows for ${p} parameters`);
  const sol = solveLeastSquares(problem, options.method ?? 'auto');
  if (typeof sol === 'string') return noSolution('least-squares', problem, 'rank-deficient', sol);
  const residuals = residualsOf(problem, sol.beta);
  const w = problem.weights;
  let objective = 0;
  for (let i = 0; i < n; i++) objective += (w ? w[i] : 1) * residuals[i] * residuals[i];
  const dof = n - p;
  const result: FitResult = {
    estimator: 'least-squares',
    status: 'ok',
    coefficients: sol.beta,
    residuals,
    objective,
    scale: dof > 0 ? Math.sqrt(objective / dof) : NaN,
    iterations: 0,
    converged: true,
    reason: dof > 0 ? sol.how : `${sol.how}; n = p: an exact fit with no redundancy, σ₀ and covariance undefined`,
  };
  if (dof > 0) {
    const s2 = objective / dof;
    result.covariance = sol.cofactor.map((c) => c * s2);
  }
  return result;
}

/**
 * (XᵀWX)⁻¹ of a validated problem with n ≥ p (for diagnostics), or a string saying why it does
 * not exist.
 */
export function leastSquaresCofactor(problem: LinearProblem): Float64Array | string {
  const sol = solveLeastSquares(problem, 'auto');
  return typeof sol === 'string' ? sol : sol.cofactor;
}

function solveLeastSquares(problem: LinearProblem, method: LeastSquaresMethod): Solution | string {
  const useNormal = method === 'normal' || (method === 'auto' && problem.n >= STREAMING_MIN_ROWS);
  if (useNormal) {
    const sol = solveNormal(problem);
    if (sol) return sol;
  }
  return solveQr(problem);
}

/** Route 2; null when the pivot guard sends the problem to QR. */
function solveNormal(problem: LinearProblem): Solution | null {
  const { p } = problem;
  const ws = createNormalWorkspace(problem, interceptColumn(problem));
  const beta = new Float64Array(p);
  const delta = new Float64Array(p);
  // β = 0 to start: the first residual is y itself.
  accumulateNormal(ws, problem, problem.y, undefined);
  const ratio = factorNormal(ws);
  if (!(ratio >= NORMAL_MIN_PIVOT)) return null;
  solveCorrection(ws, delta);
  for (let j = 0; j < p; j++) beta[j] += delta[j];
  // The refinement's residuals are temporary (the returned ones are computed at the final β).
  const r = scratchFloat64('least-squares-refine', problem.n);
  for (let step = 0; step < REFINEMENT_STEPS; step++) {
    // The Gram matrix does not depend on β: keep its factor, only the right-hand side is new.
    accumulateResidualRhs(ws, problem, beta, r);
    solveCorrection(ws, delta);
    for (let j = 0; j < p; j++) beta[j] += delta[j];
  }
  return {
    beta,
    cofactor: cofactorMatrix(ws),
    how: `normal equations on centred columns, ${REFINEMENT_STEPS} refinement step, pivot ratio ${ratio.toExponential(2)}`,
  };
}

/** Route 1: Householder QR of [√W X D | √W y], in blocks of QR_BLOCK_ROWS rows. */
function solveQr(problem: LinearProblem): Solution | string {
  const { n, p, X, y, weights } = problem;
  const q = p + 1;
  const d = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    const w = weights ? weights[i] : 1;
    for (let j = 0; j < p; j++) d[j] += w * X[i * p + j] * X[i * p + j];
  }
  for (let j = 0; j < p; j++) d[j] = d[j] > 0 ? 1 / Math.sqrt(d[j]) : 1;
  // R of the augmented matrix so far, (q×q, upper triangular), stacked on top of each block.
  let r: Float64Array | null = null;
  for (let start = 0; start < n; start += QR_BLOCK_ROWS) {
    const end = Math.min(n, start + QR_BLOCK_ROWS);
    const top = r ? q : 0;
    // At least q rows, so the factor is square; zero rows leave the problem unchanged.
    const rows = Math.max(q, top + end - start);
    const block = new Float64Array(rows * q);
    if (r) block.set(r);
    for (let i = start; i < end; i++) {
      const s = weights ? Math.sqrt(weights[i]) : 1;
      const o = (top + i - start) * q;
      for (let j = 0; j < p; j++) block[o + j] = X[i * p + j] * s * d[j];
      block[o + p] = y[i] * s;
    }
    const ut = new QrDecomposition(Matrix.from1DArray(rows, q, block)).upperTriangularMatrix;
    r = Float64Array.from(ut.to1DArray());
  }
  const R = r as Float64Array;
  let maxPivot = 0;
  for (let j = 0; j < p; j++) maxPivot = Math.max(maxPivot, Math.abs(R[j * q + j]));
  for (let j = 0; j < p; j++) {
    if (maxPivot === 0 || isNegligiblePivot(R[j * q + j], maxPivot, n, p)) {
      return `column ${j} is a combination of the others (|R_${j}${j}| = ${Math.abs(R[j * q + j]).toExponential(2)} ≤ ` +
        `max(n, p)·ε·max|R_ii| = ${(Math.max(n, p) * Number.EPSILON * maxPivot).toExponential(2)} on unit-norm columns)`;
    }
  }
  // Back substitution R βs = Qᵀy, then β = D βs.
  const beta = new Float64Array(p);
  for (let j = p - 1; j >= 0; j--) {
    let s = R[j * q + p];
    for (let k = j + 1; k < p; k++) s -= R[j * q + k] * beta[k];
    beta[j] = s / R[j * q + j];
  }
  // R⁻¹ (upper triangular), then (XᵀWX)⁻¹ = D R⁻¹ R⁻ᵀ D.
  const inv = new Float64Array(p * p);
  for (let j = p - 1; j >= 0; j--) {
    inv[j * p + j] = 1 / R[j * q + j];
    for (let k = j + 1; k < p; k++) {
      let s = 0;
      for (let m = j + 1; m <= k; m++) s += R[j * q + m] * inv[m * p + k];
      inv[j * p + k] = -s / R[j * q + j];
    }
  }
  const cofactor = new Float64Array(p * p);
  for (let a = 0; a < p; a++) {
    for (let b = 0; b < p; b++) {
      let s = 0;
      for (let k = Math.max(a, b); k < p; k++) s += inv[a * p + k] * inv[b * p + k];
      cofactor[a * p + b] = s * d[a] * d[b];
    }
  }
  for (let j = 0; j < p; j++) beta[j] *= d[j];
  // One correction from the residual with the same R (corrected semi-normal equations, Björck
  // 1996 §2.5.3): QR's rounding of Qᵀy is of order ε·‖y‖, large when the readings are big next to
  // their residuals (degree lengths of 1.1e5 m with residuals of metres); RᵀR δ = DXᵀWr removes it.
  const g = new Float64Array(p);
  const res = residualsOf(problem, beta);
  for (let i = 0; i < n; i++) {
    const wr = (weights ? weights[i] : 1) * res[i];
    for (let j = 0; j < p; j++) g[j] += X[i * p + j] * d[j] * wr;
  }
  for (let j = 0; j < p; j++) {
    let s = g[j];
    for (let k = 0; k < j; k++) s -= R[k * q + j] * g[k];
    g[j] = s / R[j * q + j];
  }
  for (let j = p - 1; j >= 0; j--) {
    let s = g[j];
    for (let k = j + 1; k < p; k++) s -= R[j * q + k] * g[k];
    g[j] = s / R[j * q + j];
  }
  for (let j = 0; j < p; j++) beta[j] += g[j] * d[j];
  const blocks = Math.ceil(n / QR_BLOCK_ROWS);
  return { beta, cofactor, how: `Householder QR (ml-matrix)${blocks > 1 ? `, ${blocks} blocks` : ''}, unit-norm columns, one correction` };
}
