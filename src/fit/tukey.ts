// Tukey's biweight (bisquare) M-estimator (Beaton & Tukey, Technometrics 16, 1974):
// ρ(u) = c²/6·[1 − (1 − (u/c)²)³] for |u| ≤ c and c²/6 beyond; IRLS weight (1 − (u/c)²)², zero
// beyond c, so gross outliers get no weight at all. c = 4.685 gives 95 % efficiency at the normal
// (check-values.md). ρ is not convex: the estimate is the stationary point reached from the
// robust start, which is why the start is the exact L1 fit and not least squares.
import { fitLeastAbsolute } from './least-absolute.ts';
import { mEstimate, tuningOrDefault, type RhoFunction, type SweepState } from './irls.ts';
import { validateProblem } from './problem.ts';
import type { FitOptions, FitResult, LinearProblem } from './types.ts';

/** Tukey's c for 95 % efficiency at the normal (Holland & Welsch 1977 — from memory). */
export const TUKEY_C = 4.685;

/** Tukey's biweight ρ with tuning c. */
export function tukeyRho(c: number): RhoFunction {
  const c2 = c * c;
  return {
    estimator: 'tukey',
    tuning: c,
    piecewiseQuadratic: false,
    rho: (u) => {
      if (!(Math.abs(u) <= c)) return c2 / 6;
      const t = 1 - (u * u) / c2;
      return (c2 / 6) * (1 - t * t * t);
    },
    psi: (u) => {
      if (!(Math.abs(u) <= c)) return 0;
      const t = 1 - (u * u) / c2;
      return u * t * t;
    },
    psiDerivative: (u) => {
      if (!(Math.abs(u) <= c)) return 0;
      const q = (u * u) / c2;
      return (1 - q) * (1 - 5 * q);
    },
    weight: (u) => {
      if (!(Math.abs(u) <= c)) return 0;
      const t = 1 - (u * u) / c2;
      return t * t;
    },
    sweep: (r: Float64Array, sw: Float64Array, s: number, v: Float64Array, h: Float64Array, side: Uint8Array, state: SweepState) => {
      let objective = 0;
      let changed = false;
      const cap = c2 / 6;
      for (let i = 0; i < r.length; i++) {
        const w = sw[i];
        const u = (w * r[i]) / s;
        const w2 = w * w;
        let sd = 0;
        if (Math.abs(u) <= c) {
          const q = (u * u) / c2;
          const t = 1 - q;
          objective += cap * (1 - t * t * t);
          v[i] = w2 * t * t;
          const d = t * (1 - 5 * q);
          h[i] = w2 * d;
          sd = d > 0 ? 1 : 0;
        } else {
          objective += cap;
          v[i] = 0;
          h[i] = 0;
        }
        if (side[i] !== sd) changed = true;
        side[i] = sd;
      }
      state.changed = changed;
      return objective;
    },
  };
}

/**
 * Tukey biweight fit by IRLS from the L1 fit (or the warm start), with the MAD scale of the
 * start's whitened residuals held fixed (options.scale overrides). See irls.ts.
 */
export function fitTukey(problem: LinearProblem, options: FitOptions = {}): FitResult {
  validateProblem(problem);
  return mEstimate(problem, tukeyRho(tuningOrDefault(options, TUKEY_C)), options, (pr, o) => fitLeastAbsolute(pr, o));
}
