// One IRLS/Newton pass in a single loop per row, for the degree models (p = 2, 3) without prior
// weights: the bulk of every large refit.
//
// Why: the general pass (irls.ts, Chunk.sweep) runs three loops per chunk — residuals, the ψ
// sweep, the normal equations — each reloading what the previous one stored. Here each row is
// read once and its residual, ψ weights, Σρ terms and normal-equation terms are formed in
// registers. Same arithmetic as the general pass up to the order of summation (the general pass
// adds chunk subtotals) and the rounding of Huber's outside ρ (irls-huber-pass.ts).
// The loops themselves are one per estimator and per p (irls-huber-pass.ts, irls-tukey-pass.ts):
// one generic loop with `p === 3 ?` per row, an estimator branch and a sometimes-null band cost
// 10 ns/row at n = 10⁴ but 17–37 ns/row at 10⁶ (varying by process); each specialised loop is
// called with a single shape.
import type { HuberBand } from './huber-active-set.ts';
import type { FusedSums } from './irls-fused-pass-sums.ts';
import { huberEvaluate, huberPass2, huberPass3 } from './irls-huber-pass.ts';
import { tukeyPass2, tukeyPass3 } from './irls-tukey-pass.ts';
import type { RhoFunction } from './rho-function.ts';
import type { LinearProblem } from './types.ts';
import type { NormalWorkspace } from './weighted-normal.ts';

export type { FusedSums } from './irls-fused-pass-sums.ts';

/** Whether the fused pass applies: Huber or Tukey, p = 2 or 3, no prior weights. */
export function fusedPassApplies(problem: LinearProblem, rho: RhoFunction): boolean {
  return !problem.weights && (problem.p === 2 || problem.p === 3) && (rho.estimator === 'huber' || rho.estimator === 'tukey');
}

/**
 * At β: residuals and robust weights into the given n-sized arrays (residuals only read when
 * `residualsReady`), and into `ws` the normal equations G = Σ gᵢzᵢzᵢᵀ, b = Σ vᵢrᵢzᵢ with vᵢ the
 * IRLS weight ψ(u)/u and gᵢ = ψ′(uᵢ) for a Newton step (`newton`), vᵢ otherwise; z as in
 * weighted-normal.ts (upper triangle; the rest of G is zeroed). With a Huber `band` the pass also
 * lists the readings with ||u| − k| < band.margin (huber-active-set.ts).
 */
export function fusedPass(problem: LinearProblem, rho: RhoFunction, beta: Float64Array, scale: number, residuals: Float64Array,
  robustWeights: Float64Array, residualsReady: boolean, ws: NormalWorkspace, newton: boolean, out: FusedSums, band: HuberBand | null = null): void {
  const inv = 1 / scale;
  const three = problem.p === 3;
  if (rho.estimator === 'huber') {
    if (three) huberPass3(problem, rho.tuning, beta, inv, residuals, robustWeights, residualsReady, ws, newton, out, band);
    else huberPass2(problem, rho.tuning, beta, inv, residuals, robustWeights, residualsReady, ws, newton, out, band);
  } else if (three) tukeyPass3(problem, rho.tuning, beta, inv, residuals, robustWeights, residualsReady, ws, newton, out);
  else tukeyPass2(problem, rho.tuning, beta, inv, residuals, robustWeights, residualsReady, ws, newton, out);
}

/**
 * Residuals, robust weights and the sums at β, for a pass whose normal equations nobody reads
 * (the pass after Huber's active-set finish, the final pass of a fit). Huber skips the
 * normal equations (measured: see irls-huber-pass.ts); for Tukey this is fusedPass's IRLS plan
 * and `ws` is overwritten.
 */
export function fusedEvaluate(problem: LinearProblem, rho: RhoFunction, beta: Float64Array, scale: number, residuals: Float64Array,
  robustWeights: Float64Array, ws: NormalWorkspace, out: FusedSums): void {
  if (rho.estimator === 'huber') huberEvaluate(problem, rho.tuning, beta, 1 / scale, residuals, robustWeights, out);
  else fusedPass(problem, rho, beta, scale, residuals, robustWeights, false, ws, false, out);
}
