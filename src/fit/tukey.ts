// Tukey's biweight (bisquare) M-estimator (Beaton & Tukey, Technometrics 16, 1974):
// ρ(u) = c²/6·[1 − (1 − (u/c)²)³] for |u| ≤ c and c²/6 beyond; IRLS weight (1 − (u/c)²)², zero
// beyond c, so gross outliers get no weight at all. c = 4.685 gives 95 % efficiency at the normal
// (check-values.md). ρ is not convex: the estimate is the stationary point reached from the
// robust start, which is why the start is the exact L1 fit and not least squares.
import { fitLeastAbsolute } from './least-absolute.ts';
import { mEstimate, tuningOrDefault, type RhoFunction } from './irls.ts';
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
  };
}

/**
 * Tukey biweight fit by IRLS from the L1 fit (or the warm start), with the MAD scale of the
 * start's whitened residuals held fixed (options.scale overrides). See irls.ts.
 */
export function fitTukey(problem: LinearProblem, options: FitOptions = {}): FitResult {
  validateProblem(problem);
  return mEstimate(problem, tukeyRho(tuningOrDefault(options, TUKEY_C)), options, (pr) => fitLeastAbsolute(pr));
}
