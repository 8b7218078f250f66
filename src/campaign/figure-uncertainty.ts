// The derived figure (a, 1/f, quadrant) with uncertainties by the delta method:
// Σ_figure = J Σ_β Jᵀ, J the Jacobian of the figure with respect to the fitted coefficients, taken by
// central differences (step DELTA_STEP_RELATIVE·max(|β|, σ_β); truncation O(h²), ≈ 1e-12 relative for
// these smooth maps). First-order: valid while σ_β is small against the curvature of the map, which
// holds for any campaign that determines the figure at all (σ(1/f)/(1/f) ≪ 1).
import { MAX_ABS_FLATTENING, figureFromDegreeCoefficients, meridianDistancePerUnitA, type DerivedFigure } from '../geodesy/index.ts';
import { InputError } from '../errors.ts';
import type { Figure } from './result.ts';

export const DELTA_STEP_RELATIVE = 1e-6;

const variance = (grad: readonly number[], cov: Float64Array, p: number): number => {
  let s = 0;
  for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) s += grad[i] * cov[i * p + j] * grad[j];
  return Math.max(0, s);
};

/** Figure of the rigorous model from (a, f) and their 2×2 covariance. */
export function ellipsoidFigure(a: number, f: number, cov: Float64Array | null): Figure {
  const g90 = meridianDistancePerUnitA(f, 90);
  const h = DELTA_STEP_RELATIVE * Math.max(Math.abs(f), cov ? Math.sqrt(cov[3]) : 0, 1e-9);
  // Stay inside the series' flattening bound (one-sided at the edge).
  const up = Math.min(f + h, MAX_ABS_FLATTENING);
  const down = Math.max(f - h, -MAX_ABS_FLATTENING);
  const dg90 = (meridianDistancePerUnitA(up, 90) - meridianDistancePerUnitA(down, 90)) / (up - down);
  return {
    semiMajorAxisM: a,
    semiMajorAxisStdM: cov ? Math.sqrt(cov[0]) : null,
    flattening: f,
    inverseFlattening: 1 / f,
    inverseFlatteningStd: cov ? Math.sqrt(cov[3]) / (f * f) : null,
    eccentricitySquared: f * (2 - f),
    quadrantM: a * g90,
    quadrantStdM: cov ? Math.sqrt(variance([g90, a * dg90], cov, 2)) : null,
    inversion: 'none needed: a and f fitted directly to the arcs with exact meridian distances (rigorous model)',
  };
}

/** The fitted rows, as the inversion by arcs needs them. */
export interface FittedDegreeRow { latitude1Deg: number; latitude2Deg: number; midLatitudeDeg: number; weight: number }

function invertDegree(beta: readonly number[], rows: readonly FittedDegreeRow[]): DerivedFigure {
  const coef = { c: beta[0], m: beta[1], ...(beta.length > 2 ? { k: beta[2] } : {}) };
  const weights = rows.map((r) => r.weight);
  try {
    return figureFromDegreeCoefficients(coef, { arcs: rows.map((r) => ({ fromLatitudeDeg: r.latitude1Deg, toLatitudeDeg: r.latitude2Deg })), weights });
  } catch (err) {
    // The inversion by arcs finds no figure (coefficients no ellipsoid reproduces): the series one still answers.
    if (!(err instanceof InputError)) throw err;
    return secondOrder(coef, rows, weights);
  }
}

function secondOrder(coef: { c: number; m: number; k?: number }, rows: readonly FittedDegreeRow[], weights: number[]): DerivedFigure {
  return figureFromDegreeCoefficients(coef, { order: 2, latitudesDeg: rows.map((r) => r.midLatitudeDeg), weights });
}

const figureValues = (f: DerivedFigure): [number, number, number] => [f.semiMajorAxisM, f.inverseFlattening, f.quadrantM];

/**
 * Figure of a degree model from (c, m[, k]): the inversion by arcs (exact for exact classic rows;
 * the second-order inversion if it fails), with delta-method errors through the same inversion.
 */
export function degreeFigure(beta: readonly number[], cov: Float64Array | null, rows: readonly FittedDegreeRow[]): Figure {
  const fig = invertDegree(beta, rows);
  let std: [number | null, number | null, number | null] = [null, null, null];
  if (cov) {
    const p = beta.length;
    const grads: number[][] = [[], [], []];
    for (let j = 0; j < p; j++) {
      const h = DELTA_STEP_RELATIVE * Math.max(Math.abs(beta[j]), Math.sqrt(cov[j * p + j]), 1e-9);
      const up = [...beta];
      const down = [...beta];
      up[j] += h;
      down[j] -= h;
      const vu = figureValues(invertDegree(up, rows));
      const vd = figureValues(invertDegree(down, rows));
      for (let q = 0; q < 3; q++) grads[q][j] = (vu[q] - vd[q]) / (2 * h);
    }
    std = [Math.sqrt(variance(grads[0], cov, p)), Math.sqrt(variance(grads[1], cov, p)), Math.sqrt(variance(grads[2], cov, p))];
  }
  let inversion = fig.inversion;
  if (fig.inversion.startsWith('by arcs')) {
    try {
      const plain = secondOrder({ c: beta[0], m: beta[1], ...(beta.length > 2 ? { k: beta[2] } : {}) }, rows, rows.map((r) => r.weight));
      inversion = `inversion ${fig.inversion}; the plain second-order inversion on the mid latitudes would give 1/f = ${plain.inverseFlattening.toFixed(3)}, a = ${plain.semiMajorAxisM.toFixed(1)} m`;
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
    }
  } else {
    inversion = `${fig.inversion} (the inversion by arcs found no figure for these coefficients)`;
  }
  return {
    semiMajorAxisM: fig.semiMajorAxisM,
    semiMajorAxisStdM: std[0],
    flattening: fig.flattening,
    inverseFlattening: fig.inverseFlattening,
    inverseFlatteningStd: std[1],
    eccentricitySquared: fig.eccentricitySquared,
    quadrantM: fig.quadrantM,
    quadrantStdM: std[2],
    inversion,
  };
}
