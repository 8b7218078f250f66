// Building, validating and whitening a LinearProblem, and the one rank tolerance of the layer.
//
// Shape and value errors are programmer errors here (the campaign schema refuses non-finite
// numbers and sigma <= 0 long before a fit), so they throw InputError naming the element.
// What the data imply (n < p, rank deficiency) is a status on the result, never a throw.
import { InputError } from '../errors.ts';
import type { Estimator, FitResult, FitStatus, LinearProblem } from './types.ts';

/**
 * The ε of the rank tolerance: a pivot |R_jj| counts as zero when |R_jj| <= max(n, p)·ε·max|R_ii| on
 * unit-norm columns. It is the default of numpy.linalg.matrix_rank and of LAPACK's xGELSD rcond
 * (Press et al., Numerical Recipes 3rd ed. §2.6): the backward error of Householder QR is of order
 * max(n, p)·ε relative, so a smaller pivot cannot be told from an exactly dependent column.
 */
export const RANK_TOLERANCE_FACTOR = Number.EPSILON;

/** True when pivot `rjj` is negligible against the largest pivot for an n×p problem. */
export function isNegligiblePivot(rjj: number, maxPivot: number, n: number, p: number): boolean {
  return Math.abs(rjj) <= Math.max(n, p) * RANK_TOLERANCE_FACTOR * maxPivot;
}

/** Builds a problem from row arrays (design rows x_i, readings y_i, optional weights 1/σᵢ²). */
export function createProblem(rows: readonly (readonly number[])[], y: readonly number[], weights?: readonly number[]): LinearProblem {
  const n = rows.length;
  if (n === 0) throw new InputError('rows', rows, 'a problem needs at least one row');
  const p = rows[0].length;
  const X = new Float64Array(n * p);
  for (let i = 0; i < n; i++) {
    if (rows[i].length !== p) throw new InputError(`rows[${i}]`, rows[i], `has ${rows[i].length} columns, row 0 has ${p}`);
    X.set(rows[i], i * p);
  }
  if (y.length !== n) throw new InputError('y', y.length, `has ${y.length} readings for ${n} rows`);
  const problem: LinearProblem = { n, p, X, y: Float64Array.from(y) };
  if (weights !== undefined) {
    if (weights.length !== n) throw new InputError('weights', weights.length, `has ${weights.length} weights for ${n} rows`);
    problem.weights = Float64Array.from(weights);
  }
  validateProblem(problem);
  return problem;
}

/** Throws InputError for a malformed problem: bad sizes, non-finite X / y / weights, weights <= 0. */
export function validateProblem(problem: LinearProblem): void {
  const { n, p, X, y, weights } = problem;
  if (!Number.isInteger(n) || n < 1) throw new InputError('n', n, 'must be a whole number >= 1');
  if (!Number.isInteger(p) || p < 1) throw new InputError('p', p, 'must be a whole number >= 1');
  if (!(X instanceof Float64Array) || X.length !== n * p) throw new InputError('X', X?.length, `must be a Float64Array of n·p = ${n * p} values`);
  if (!(y instanceof Float64Array) || y.length !== n) throw new InputError('y', y?.length, `must be a Float64Array of n = ${n} values`);
  // x·0 is NaN exactly when x is ±∞ or NaN: one branch-free sum per array, the search only on failure.
  if (Number.isNaN(zeroSum(X))) {
    const k = X.findIndex((v) => !Number.isFinite(v));
    throw new InputError(`X[${Math.floor(k / p)}, ${k % p}]`, X[k], 'design values must be finite');
  }
  if (Number.isNaN(zeroSum(y))) {
    const i = y.findIndex((v) => !Number.isFinite(v));
    throw new InputError(`y[${i}]`, y[i], 'readings must be finite');
  }
  if (weights !== undefined) {
    if (!(weights instanceof Float64Array) || weights.length !== n) throw new InputError('weights', weights?.length, `must be a Float64Array of n = ${n} values`);
    for (let i = 0; i < n; i++) {
      const w = weights[i];
      if (!Number.isFinite(w) || w <= 0) throw new InputError(`weights[${i}]`, w, 'weights are 1/σ² and must be finite and > 0');
    }
  }
}

/** Σ aₖ·0 in four independent sums: one chain would wait on each add's latency (~4× slower at 10⁶ rows). */
function zeroSum(a: Float64Array): number {
  let a0 = 0;
  let a1 = 0;
  let a2 = 0;
  let a3 = 0;
  const n = a.length;
  const n4 = n - (n % 4);
  for (let k = 0; k < n4; k += 4) {
    a0 += a[k] * 0;
    a1 += a[k + 1] * 0;
    a2 += a[k + 2] * 0;
    a3 += a[k + 3] * 0;
  }
  for (let k = n4; k < n; k++) a0 += a[k] * 0;
  return a0 + a1 + a2 + a3;
}

/** √wᵢ for every row (all ones without weights). */
export function sqrtWeights(problem: LinearProblem): Float64Array {
  const s = new Float64Array(problem.n);
  const w = problem.weights;
  for (let i = 0; i < problem.n; i++) s[i] = w ? Math.sqrt(w[i]) : 1;
  return s;
}

/** The whitened problem √W X, √W y (row i times √wᵢ), as a new unweighted problem. */
export function whitenProblem(problem: LinearProblem): LinearProblem {
  const { n, p, X, y } = problem;
  const s = sqrtWeights(problem);
  const Xw = new Float64Array(n * p);
  const yw = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < p; j++) Xw[i * p + j] = X[i * p + j] * s[i];
    yw[i] = y[i] * s[i];
  }
  return { n, p, X: Xw, y: yw };
}

/** Whitened residuals √wᵢ·rᵢ of raw residuals r. */
export function whitenResiduals(problem: LinearProblem, residuals: Float64Array): Float64Array {
  const out = new Float64Array(problem.n);
  const w = problem.weights;
  for (let i = 0; i < problem.n; i++) out[i] = w ? residuals[i] * Math.sqrt(w[i]) : residuals[i];
  return out;
}

/** Raw residuals y − Xβ. */
export function residualsOf(problem: LinearProblem, beta: ArrayLike<number>, out = new Float64Array(problem.n)): Float64Array {
  return residualsRange(problem, beta, 0, problem.n, out);
}

/**
 * rᵢ = yᵢ − xᵢᵀβ for the m rows from `start` into out[0..m): the chunked passes of IRLS keep
 * their residuals in a cache-sized buffer instead of an n-sized one.
 */
export function residualsRange(problem: LinearProblem, beta: ArrayLike<number>, start: number, m: number, out: Float64Array): Float64Array {
  const { p, X, y } = problem;
  // The degree models (p = 2, 3) unrolled: this pass runs several times per fit at n = 10⁶.
  if (p === 2) {
    const b0 = beta[0], b1 = beta[1];
    for (let i = 0, g = start; i < m; i++, g++) out[i] = y[g] - (X[2 * g] * b0 + X[2 * g + 1] * b1);
    return out;
  }
  if (p === 3) {
    const b0 = beta[0], b1 = beta[1], b2 = beta[2];
    for (let i = 0, g = start; i < m; i++, g++) out[i] = y[g] - (X[3 * g] * b0 + X[3 * g + 1] * b1 + X[3 * g + 2] * b2);
    return out;
  }
  for (let i = 0, g = start; i < m; i++, g++) {
    let f = 0;
    for (let j = 0; j < p; j++) f += X[g * p + j] * beta[j];
    out[i] = y[g] - f;
  }
  return out;
}

/**
 * Index of an intercept column (every entry equal and non-zero), or −1. Centring the other
 * columns about their weighted means is then an exact reparameterisation of the model.
 */
export function interceptColumn(problem: LinearProblem): number {
  const { n, p, X } = problem;
  for (let j = 0; j < p; j++) {
    const v = X[j];
    if (v === 0) continue;
    let constant = true;
    for (let i = 1; i < n && constant; i++) constant = X[i * p + j] === v;
    if (constant) return j;
  }
  return -1;
}

/**
 * A result with no solution (too few rows, rank deficiency): coefficients, residuals, objective
 * and scale are NaN so nothing downstream can mistake them for a fit; `status` and `reason` say why.
 */
export function noSolution(estimator: Estimator, problem: LinearProblem, status: Exclude<FitStatus, 'ok'>, reason: string): FitResult {
  return {
    estimator,
    status,
    coefficients: new Float64Array(problem.p).fill(NaN),
    residuals: new Float64Array(problem.n).fill(NaN),
    objective: NaN,
    scale: NaN,
    iterations: 0,
    converged: false,
    reason,
  };
}
