// The least-squares state of a fit session (fit-session.ts): centred normal-equation sums about
// the refinement's base β₀, folded row by row, so a refit after one more reading is O(p²).
import { defineCachedField } from './cached-field.ts';
import { interceptColumn, residualsOf, residualsRange } from './problem.ts';
import { scratchFloat64 } from './scratch.ts';
import type { FitResult, LinearProblem } from './types.ts';
import {
  accumulateNormal, accumulateResidualRhs, addRows, cloneNormalWorkspace, cofactorMatrix, createNormalWorkspace, factorNormal, lowerSolveNormSquared, solveCorrection,
  type NormalWorkspace,
} from './weighted-normal.ts';
import { NORMAL_MIN_PIVOT } from './least-squares.ts';

/**
 * Rows folded into the sums since the last full pass, relative to the rows of that pass, before
 * the next fit rebuilds them: rebuilding when the rows have doubled keeps the O(n) pass amortised
 * O(1) per row, and keeps β₀ near β and the sample shift and scale representative.
 */
export const SUMS_REBUILD_GROWTH = 1;

/**
 * Least-squares state. Cold route (`buildSums`), as fitLeastSquares' normal route with its one
 * refinement step: a first solve from y gives β₀, then b = Σ w z (y − xᵀβ₀) and β = β₀ + G⁻¹b,
 * the refinement's correction. The session keeps G, b and S at that β₀ and adds each new row's
 * terms: the sums over n + k rows are the sums a cold pass at β₀ would form (up to summation
 * order), so the answer is the cold refinement from β₀ on all rows. Accuracy: b is summed from
 * residuals about β₀ (metres, not the 1e5 m/degree readings), exactly what the refinement step
 * buys; G⁻¹'s error (cond²·ε ≤ 2e-8 under the pivot guard) multiplies the small correction
 * only. The objective Σw(r₀ − zᵀθ)² = S − bᵀG⁻¹b at Gθ = b carries rounding of order ε·S.
 */
export interface NormalSums {
  ws: NormalWorkspace;
  base: Float64Array;
  s: number;
  rows: number;
  baseRows: number;
}

/** The full pass: the cold normal route's first solve and refinement right-hand side; null when the guard fails. */
export function buildSums(problem: LinearProblem): NormalSums | null {
  const { n, p, weights } = problem;
  const ws = createNormalWorkspace(problem, interceptColumn(problem));
  accumulateNormal(ws, problem, problem.y, undefined);
  if (!(factorNormal(ws) >= NORMAL_MIN_PIVOT)) return null;
  const base = new Float64Array(p);
  solveCorrection(ws, base);
  const r = scratchFloat64('fit-session-residuals', n);
  accumulateResidualRhs(ws, problem, base, r);
  let s = 0;
  for (let i = 0; i < n; i++) s += (weights ? weights[i] : 1) * r[i] * r[i];
  return { ws, base, s, rows: n, baseRows: n };
}

/** Chunk of new rows folded at a time (the residual buffer stays in cache). */
const FOLD_CHUNK = 1024;

/** Adds rows sums.rows … n−1 to G, b and S; false when a row breaks the intercept column the centring relies on. */
export function foldRows(sums: NormalSums, problem: LinearProblem): boolean {
  const { ws } = sums;
  const { n, p, X, weights } = problem;
  if (ws.intercept >= 0) {
    for (let i = sums.rows; i < n; i++) if (X[i * p + ws.intercept] !== ws.interceptValue) return false;
  }
  // Scratch: a refit on every save folds one row at a time, and a fresh buffer per fold was garbage.
  const r = scratchFloat64('fit-session-fold', Math.min(FOLD_CHUNK, n - sums.rows));
  for (let start = sums.rows; start < n; start += FOLD_CHUNK) {
    const m = Math.min(FOLD_CHUNK, n - start);
    residualsRange(problem, sums.base, start, m, r);
    for (let i = 0; i < m; i++) sums.s += (weights ? weights[start + i] : 1) * r[i] * r[i];
    addRows(ws, problem, start, m, r, weights?.subarray(start, start + m));
  }
  sums.rows = n;
  return true;
}

export function cloneSums(sums: NormalSums): NormalSums {
  const ws = cloneNormalWorkspace(sums.ws);
  ws.gram.set(sums.ws.gram);
  ws.rhs.set(sums.ws.rhs);
  return { ws, base: Float64Array.from(sums.base), s: sums.s, rows: sums.rows, baseRows: sums.baseRows };
}

/**
 * The checkpoint's sums, copied into `into` when it has the same layout (a rollback then
 * allocates nothing: a refit on every save rolls back often), else a fresh copy.
 */
export function restoreSums(into: NormalSums | null, from: NormalSums): NormalSums {
  if (!into || into === from || into.ws.p !== from.ws.p || into.ws.intercept !== from.ws.intercept || into.ws.interceptValue !== from.ws.interceptValue) {
    return cloneSums(from);
  }
  const a = into.ws;
  const b = from.ws;
  a.shift.set(b.shift);
  a.scale.set(b.scale);
  a.order.set(b.order);
  a.gram.set(b.gram);
  a.rhs.set(b.rhs);
  into.base.set(from.base);
  into.s = from.s;
  into.rows = from.rows;
  into.baseRows = from.baseRows;
  return into;
}

/** bᵀG⁻¹b = ‖L⁻¹Pb‖² from the last factorisation. */
function explainedSquares(ws: NormalWorkspace): number {
  return lowerSolveNormSquared(ws, ws.rhs, scratchFloat64('fit-session-explained', ws.p));
}

export function sumsResult(problem: LinearProblem, sums: NormalSums, ratio: number, rebuilt: boolean): FitResult {
  const { n, p } = problem;
  const beta = new Float64Array(p);
  solveCorrection(sums.ws, beta);
  for (let j = 0; j < p; j++) beta[j] += sums.base[j];
  const objective = Math.max(0, sums.s - explainedSquares(sums.ws));
  const dof = n - p;
  const how = rebuilt
    ? `normal equations on centred columns, 1 refinement step, pivot ratio ${ratio.toExponential(2)} (fit session, full pass over ${n} rows)`
    : `normal equations on centred columns kept by the fit session: ${n - sums.baseRows} rows added to the sums of ${sums.baseRows} at the ` +
      `refinement's base β, pivot ratio ${ratio.toExponential(2)}`;
  const result: FitResult = {
    estimator: 'least-squares',
    status: 'ok',
    coefficients: beta,
    residuals: new Float64Array(0),
    objective,
    scale: dof > 0 ? Math.sqrt(objective / dof) : NaN,
    iterations: 0,
    converged: true,
    reason: dof > 0 ? how : `${how}; n = p: an exact fit with no redundancy, σ₀ and covariance undefined`,
  };
  if (dof > 0) {
    const s2 = objective / dof;
    result.covariance = cofactorMatrix(sums.ws, s2);
  }
  defineCachedField(result, 'residuals', () => residualsOf(problem, beta));
  return result;
}
