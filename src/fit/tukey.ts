// Tukey's biweight (bisquare) M-estimator (Beaton & Tukey, Technometrics 16, 1974):
// ρ(u) = c²/6·[1 − (1 − (u/c)²)³] for |u| ≤ c and c²/6 beyond; IRLS weight (1 − (u/c)²)², zero
// beyond c, so gross outliers get no weight at all. c = 4.685 gives 95 % efficiency at the normal
// (check-values.md). ρ is not convex: the estimate is the stationary point reached from the
// robust start, which is why the start is the exact L1 fit and not least squares.
import { fitLeastAbsolute } from './least-absolute.ts';
import { mEstimate, tuningOrDefault, type RhoFunction } from './irls.ts';
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
    sweep: (r, sw, invScale, v, h, side, robustWeights, state) => {
      let objective = 0;
      let changed = false;
      let sumPsi2 = 0;
      let sumD = 0;
      let sumD2 = 0;
      const cap = c2 / 6;
      const invC2 = 1 / c2;
      const m = r.length;
      for (let i = 0; i < m; i++) {
        const w = sw === null ? 1 : sw[i];
        const u = w * r[i] * invScale;
        const w2 = w * w;
        let sd = 0;
        if (Math.abs(u) <= c) {
          const q = u * u * invC2;
          const t = 1 - q;
          objective += cap * (1 - t * t * t);
          const wt = t * t;
          v[i] = w2 * wt;
          robustWeights[i] = wt;
          const ps = u * wt;
          sumPsi2 += ps * ps;
          const d = t * (1 - 5 * q);
          h[i] = w2 * d;
          sumD += d;
          sumD2 += d * d;
          sd = d > 0 ? 1 : 0;
        } else {
          objective += cap;
          v[i] = 0;
          h[i] = 0;
          robustWeights[i] = 0;
        }
        if (side[i] !== sd) changed = true;
        side[i] = sd;
      }
      state.changed = changed;
      state.sumPsi2 += sumPsi2;
      state.sumD += sumD;
      state.sumD2 += sumD2;
      return objective;
    },
  };
}

/**
 * Tukey biweight fit by IRLS from the L1 fit (or the warm start), with the MAD scale of the
 * start's whitened residuals held fixed (options.scale overrides). See irls.ts.
 */
export function fitTukey(problem: LinearProblem, options: FitOptions = {}): FitResult {
  return mEstimate(problem, tukeyRho(tuningOrDefault(options, TUKEY_C)), options, (pr, o) => fitLeastAbsolute(pr, o));
}
