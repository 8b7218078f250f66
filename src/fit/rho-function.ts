// The ρ function an M-estimator hands to IRLS (irls.ts): ρ, ψ = ρ′, ψ′ and the IRLS weight ψ(u)/u,
// plus a one-loop sweep. Its own file so the fused pass (irls-fused-pass.ts) and IRLS share it
// without importing each other.
import type { Estimator } from './types.ts';

/** A ρ function of the standardized residual u with its ψ = ρ′, ψ′ and IRLS weight ψ(u)/u. */
export interface RhoFunction {
  readonly estimator: Extract<Estimator, 'huber' | 'tukey'>;
  readonly tuning: number;
  /**
   * ρ is quadratic on each set where ψ′ is constant (Huber): a Newton step after which no
   * reading changed side of ±k landed exactly on the minimum.
   */
  readonly piecewiseQuadratic: boolean;
  rho(u: number): number;
  psi(u: number): number;
  psiDerivative(u: number): number;
  weight(u: number): number;
  /**
   * One IRLS sweep in a single loop (no per-row calls): for uᵢ = swᵢ·rᵢ·invScale writes vᵢ =
   * swᵢ²·ψ(uᵢ)/uᵢ, hᵢ = swᵢ²·ψ′(uᵢ), sideᵢ = [ψ′(uᵢ) > 0] and the robust weight ψ(uᵢ)/uᵢ; returns
   * Σρ(uᵢ) and adds Σψ(uᵢ)², Σψ′(uᵢ), Σψ′(uᵢ)² to state (for the covariance), with state.changed
   * saying whether any side flipped. `sw` null: no prior weights (every swᵢ = 1).
   */
  sweep(r: Float64Array, sw: Float64Array | null, invScale: number, v: Float64Array, h: Float64Array, side: Uint8Array,
    robustWeights: Float64Array, state: SweepState): number;
}

/** What a sweep reports beside Σρ (the sums are added to, changed is set). */
export interface SweepState { changed: boolean; sumPsi2: number; sumD: number; sumD2: number }
