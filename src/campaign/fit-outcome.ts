// What a model fit hands back to solveCampaign, whichever way it was computed (independent rows,
// generalised least squares with the full arc covariance, or a robust estimator).
import { meridianDistancePerUnitA } from '../geodesy/index.ts';
import type { Coefficient, Figure, SolveStatus } from './result.ts';
import type { PreparedArc } from './prepare-arcs.ts';
import { DEGREE_COEFFICIENT_NAMES, type DegreeModelId } from './degree-model.ts';

/** Per arc in the fit: how its residual is standardized, and the least-squares reliability numbers. */
export interface ArcFitNumbers {
  /**
   * z = √flagWeight·r / scale. Independent rows: the row weight 1/σ². GLS: 1/(Q_vv)ᵢᵢ, the
   * inverse variance of the residual itself (0 for an arc no other reading checks).
   */
  flagWeight: number;
  /** Whether the arc's standardized residual enters the robust (MAD) scale of the flags. */
  inScale: boolean;
  redundancy?: number;
  wTest?: number;
  minimalDetectableBias?: number;
}

export interface FitOutcome {
  status: SolveStatus;
  message: string;
  coefficients: Coefficient[];
  figure: Figure | null;
  /** Residual of any prepared arc with geometry against the fit (excluded arcs too; 0 otherwise). */
  residualOf: (arc: PreparedArc) => number;
  /** The arc's own weight 1/σ² (or 1), for arcs outside `arcNumbers` (excluded ones). */
  weightOf: (arc: PreparedArc) => number;
  /** By arc id, the arcs in the fit. */
  arcNumbers: Map<string, ArcFitNumbers>;
  /** Least squares: vᵀPv over the arcs in the fit (P = Σ⁻¹, or diag(w)); null otherwise. */
  quadraticForm: number | null;
  objective: number;
  iterations: number;
  converged: boolean;
  reason: string;
  p: number;
  /** A caveat for the status message (e.g. how correlated arcs were treated); may be empty. */
  note: string;
}

export const finiteOrNull = (v: number | null | undefined): number | null => (v !== null && v !== undefined && Number.isFinite(v) ? v : null);

/** An outcome with no fit (degenerate campaign or a failed fit). */
export function noFit(status: SolveStatus, message: string, p: number, reason = message): FitOutcome {
  return {
    status, message, coefficients: [], figure: null, residualOf: () => 0, weightOf: () => 1, arcNumbers: new Map(),
    quadraticForm: null, objective: 0, iterations: 0, converged: false, reason, p, note: '',
  };
}

/** Coefficients of the rigorous model: a (m) and 1/f with their standard errors from the figure. */
export function ellipsoidCoefficients(figure: Figure): Coefficient[] {
  return [
    { name: 'a', value: figure.semiMajorAxisM, standardError: finiteOrNull(figure.semiMajorAxisStdM), unit: 'm' },
    { name: 'inverseFlattening', value: figure.inverseFlattening, standardError: finiteOrNull(figure.inverseFlatteningStd), unit: '' },
  ];
}

/** Coefficients c, m[, k] (m/degree) with standard errors from their covariance. */
export function degreeCoefficients(model: DegreeModelId, beta: readonly number[], cov: Float64Array | null): Coefficient[] {
  const p = beta.length;
  return DEGREE_COEFFICIENT_NAMES[model].map((name, j) => ({
    name, value: beta[j], standardError: cov ? finiteOrNull(Math.sqrt(cov[j * p + j])) : null, unit: 'm/degree',
  }));
}

/** Measured minus computed reduced arc (m) on the ellipsoid (a, f). */
export function ellipsoidResidual(a: number, f: number): (arc: PreparedArc) => number {
  return (arc) => {
    const g = arc.geometry;
    if (!g) return 0;
    return g.reducedDistanceM - a * Math.abs(meridianDistancePerUnitA(f, g.latitude2Deg) - meridianDistancePerUnitA(f, g.latitude1Deg));
  };
}

/** Row minus fitted degree length (m/degree). */
export function degreeResidual(beta: readonly number[]): (arc: PreparedArc) => number {
  return (arc) => {
    const row = arc.geometry?.row;
    if (!row) return 0;
    return row.y - (beta[0] + beta[1] * row.x + (beta.length === 3 ? beta[2] * row.x * row.x : 0));
  };
}
