// The campaign's figure against the reference ellipsoids: the difference in a and in 1/f, each in
// metres / units and in standard errors (z = (fit − reference)/σ), and a joint test of both with
// their correlation: χ² = dᵀC⁻¹d on 2 degrees of freedom, d = (Δa, Δ(1/f)), whose upper tail is
// exactly exp(−χ²/2). The covariance of (a, 1/f) follows from that of (a, f) by the delta method:
// var(1/f) = var(f)/f⁴, cov(a, 1/f) = −cov(a, f)/f² (first order; σ_f/f ≈ 1e-3 makes the
// neglected second-order term ~1e-3 relative).
import { ELLIPSOID_IDS, ellipsoidById, type Ellipsoid } from '../geodesy/index.ts';

/** Significance level of the joint test (common practice: 5 %). */
export const COMPARISON_ALPHA = 0.05;

export interface FigureWithUncertainty {
  semiMajorAxisM: number;
  inverseFlattening: number;
  semiMajorAxisStdM: number | null;
  inverseFlatteningStd: number | null;
  /** 2×2 covariance of (a, f), row-major, when known (enables the joint test). */
  covarianceAF?: Float64Array | null;
}

export interface EllipsoidComparison {
  id: string;
  name: string;
  semiMajorAxisM: number;
  inverseFlattening: number;
  /** Fit minus reference. */
  deltaSemiMajorAxisM: number;
  deltaInverseFlattening: number;
  /** The differences in standard errors (null without uncertainties). */
  semiMajorAxisZ: number | null;
  inverseFlatteningZ: number | null;
  /** χ² of both differences together, 2 degrees of freedom, and its p-value (null without a covariance). */
  jointChiSquare: number | null;
  jointPValue: number | null;
  /** Whether the campaign can tell this ellipsoid apart from its own figure at COMPARISON_ALPHA (null without a covariance). */
  distinguishable: boolean | null;
}

export function compareWithEllipsoids(fit: FigureWithUncertainty, ellipsoids: readonly Ellipsoid[] = ELLIPSOID_IDS.map(ellipsoidById)): EllipsoidComparison[] {
  const f = 1 / fit.inverseFlattening;
  let C: [number, number, number] | null = null; // var(a), cov(a, 1/f), var(1/f)
  const cov = fit.covarianceAF;
  if (cov && cov.length === 4 && cov.every(Number.isFinite)) C = [cov[0], -cov[1] / (f * f), cov[3] / f ** 4];
  return ellipsoids.map((e) => {
    const da = fit.semiMajorAxisM - e.semiMajorAxisM;
    const dInv = fit.inverseFlattening - e.inverseFlattening;
    let chi: number | null = null;
    if (C) {
      const det = C[0] * C[2] - C[1] * C[1];
      if (det > 0) chi = (C[2] * da * da - 2 * C[1] * da * dInv + C[0] * dInv * dInv) / det;
    }
    const p = chi === null ? null : Math.exp(-chi / 2);
    return {
      id: e.id, name: e.name, semiMajorAxisM: e.semiMajorAxisM, inverseFlattening: e.inverseFlattening,
      deltaSemiMajorAxisM: da, deltaInverseFlattening: dInv,
      semiMajorAxisZ: fit.semiMajorAxisStdM ? da / fit.semiMajorAxisStdM : null,
      inverseFlatteningZ: fit.inverseFlatteningStd ? dInv / fit.inverseFlatteningStd : null,
      jointChiSquare: chi, jointPValue: p, distinguishable: p === null ? null : p < COMPARISON_ALPHA,
    };
  });
}
