// Huber's M-estimator (Huber, "Robust estimation of a location parameter", Ann. Math. Statist.
// 35, 1964): ρ(u) = u²/2 for |u| ≤ k, k|u| − k²/2 beyond, so ψ(u) = clamp(u, −k, k) and the IRLS
// weight is min(1, k/|u|). k = 1.345 gives 95 % efficiency at the normal (check-values.md).
// Convex at a fixed scale, so the estimate does not depend on the start, only on the scale.
import { fitLeastAbsolute } from './least-absolute.ts';
import { mEstimate, tuningOrDefault, type RhoFunction } from './irls.ts';
import type { FitOptions, FitResult, LinearProblem } from './types.ts';

/** Huber's k for 95 % efficiency at the normal (Holland & Welsch 1977 — from memory). */
export const HUBER_K = 1.345;

/** Huber's ρ with tuning k. */
export function huberRho(k: number): RhoFunction {
  return {
    estimator: 'huber',
    tuning: k,
    piecewiseQuadratic: true,
    rho: (u) => {
      const a = Math.abs(u);
      return a <= k ? 0.5 * u * u : k * a - 0.5 * k * k;
    },
    psi: (u) => (u > k ? k : u < -k ? -k : u),
    psiDerivative: (u) => (Math.abs(u) <= k ? 1 : 0),
    weight: (u) => {
      const a = Math.abs(u);
      return a <= k ? 1 : k / a;
    },
    sweep: (r, sw, invScale, v, h, side, robustWeights, state) => {
      // ψ′ ∈ {0, 1}, so Σψ′² = Σψ′ (the count inside ±k). `sw === null` is loop-invariant: the
      // branch on it is always predicted.
      let objective = 0;
      let changed = false;
      let sumPsi2 = 0;
      let inside = 0;
      const half = 0.5 * k * k;
      const k2 = k * k;
      const m = r.length;
      for (let i = 0; i < m; i++) {
        const w = sw === null ? 1 : sw[i];
        const u = w * r[i] * invScale;
        const a = Math.abs(u);
        const w2 = w * w;
        let sd = 0;
        if (a <= k) {
          objective += 0.5 * u * u;
          v[i] = w2;
          h[i] = w2;
          robustWeights[i] = 1;
          sumPsi2 += u * u;
          sd = 1;
        } else {
          objective += k * a - half;
          const wt = k / a;
          v[i] = w2 * wt;
          h[i] = 0;
          robustWeights[i] = wt;
          sumPsi2 += k2;
        }
        inside += sd;
        if (side[i] !== sd) changed = true;
        side[i] = sd;
      }
      state.changed = changed;
      state.sumPsi2 += sumPsi2;
      state.sumD += inside;
      state.sumD2 += inside;
      return objective;
    },
  };
}

/**
 * Huber fit by IRLS from the L1 fit (or the warm start), with the MAD scale of the start's
 * whitened residuals held fixed (options.scale overrides). See irls.ts for the start and scale rules.
 */
export function fitHuber(problem: LinearProblem, options: FitOptions = {}): FitResult {
  return mEstimate(problem, huberRho(tuningOrDefault(options, HUBER_K)), options, (pr, o) => fitLeastAbsolute(pr, o));
}
