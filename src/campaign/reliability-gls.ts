// Least squares of (a, f) to the arcs with their FULL covariance — generalised least squares
// (Aitken 1935) — so that arcs sharing a station are not treated as independent.
//
// Observation model. Arc i joins stations t (to) and s (from); its predicted length on the
// ellipsoid is ŝᵢ = a·|g(φ_t; f) − g(φ_s; f)|, g = G/a the meridian distance per unit a
// (src/geodesy, Helmert series, sub-millimetre). The measured length carries the distance error
// εᵢ (σ_sᵢ) and the prediction carries the errors δφ of the two station latitudes it uses
// (σ_φ = the stations' standard errors), so to first order
//     sᵢ − ŝᵢ = εᵢ − Σⱼ Bᵢⱼ δφⱼ,   Bᵢⱼ = ∂ŝᵢ/∂φⱼ = ±a·M(φⱼ)/a·sgnᵢ (per radian),
//     Σ = D_s + B·S_φ·Bᵀ,          D_s = diag(σ_sᵢ²),  S_φ = diag(σ_φⱼ²).
// Two consecutive arcs sharing station j (its north end for one, its south end for the other) get
// the covariance −M(φⱼ)²σ_φⱼ²: a latitude error that lengthens one arc shortens the next. With
// `independent: true` the off-diagonal terms are dropped, which is exactly the engine's weighting
// (prepare-arcs.ts: σᵢ² = σ_s² + (M₁σ_φ₁)² + (M₂σ_φ₂)²), for comparison.
//
// Estimation: Gauss–Newton on the whitened problem (Σ = L·Lᵀ, rows multiplied by L⁻¹), from the
// reference ellipsoid's f with a solved in closed form. J = [g_tᵢ − g_sᵢ (signed by sgnᵢ),
// a·∂(g_t − g_s)/∂f], ∂/∂f by a central difference (step DF: truncation O(DF²) ≈ 1e-10
// relative, rounding ε/DF ≈ 1e-11). Σ is evaluated once on the reference ellipsoid (M changes by
// parts in 10⁵ between plausible figures: a second-order effect on a standard error). Columns are
// equilibrated before the 2×2 normal matrix is inverted. Stops when both steps fall below
// STEP_TOLERANCE standard errors; GN converges in 2–4 steps here (the model is nearly linear in f
// over a standard error).
//
// Covariance: Q = (JᵀΣ⁻¹J)⁻¹ is the a-priori covariance (σ₀ = 1). σ̂₀² = vᵀΣ⁻¹v/(n − 2) and
// the reported covariance is σ̂₀²·Q, the same convention as the engine's least squares.
import { MAX_ABS_FLATTENING, meridianDistancePerUnitA, meridianRadiusPerUnitA } from '../geodesy/index.ts';
import { cholesky, choleskyInverse, forwardSolve, type CholeskyFactor } from './reliability-linear-algebra.ts';
import type { ArcNetwork } from './reliability-network.ts';
import { ellipsoidFigure } from './figure-uncertainty.ts';
import type { Figure } from './result.ts';

const RAD_PER_ARCSEC = Math.PI / 648000;
/** Central-difference step for ∂g/∂f (see the file comment). */
export const DF = 1e-5;
/** A Gauss–Newton step below this many standard errors (in both a and f) ends the iteration. */
export const STEP_TOLERANCE = 1e-8;
/** Largest |f| Gauss–Newton may visit: the series' bound less the two difference steps ∂/∂f needs. */
export const F_LIMIT = MAX_ABS_FLATTENING - 2 * DF;
/** Cap on Gauss–Newton steps: quadratic convergence from the reference f needs 2–4; ten times that. */
export const MAX_GN_ITERATIONS = 40;
/** Rank test on the equilibrated 2×2 normal matrix: 1 − ρ² below this (|ρ| > 1 − 5e-13) is rank deficient. */
export const RANK_TOLERANCE = 1e-12;

export type CorrelatedStatus = 'ok' | 'too-few-arcs' | 'rank-deficient' | 'not-positive-definite' | 'not-converged';

export interface ArcDesign {
  n: number;
  /** n×2 Jacobian of the predicted arcs with respect to (a, f), row-major. */
  J: Float64Array;
  /** Predicted reduced arc lengths at (a, f), metres. */
  predictedM: Float64Array;
  /** n×n covariance of the arcs' misclosures, m². */
  sigma: Float64Array;
}

export interface CovarianceOptions {
  /** Drop the covariance between arcs (the engine's independent-rows weighting), for comparison. */
  independent?: boolean;
}

/** Σ (n×n, m²) of the network's arcs: D_s + B·S_φ·Bᵀ, B on the reference ellipsoid (independent of (a, f)). */
export function arcCovariance(network: ArcNetwork, options: CovarianceOptions = {}): Float64Array {
  const n = network.arcs.length;
  const fRef = network.reference.flattening;
  const aRef = network.reference.semiMajorAxisM;
  // B (n×m) per radian: two entries per row, ±M(φ) of the arc's two stations (sign of the arc's direction).
  const bFrom = new Float64Array(n);
  const bTo = new Float64Array(n);
  network.arcs.forEach((arc, i) => {
    const phiT = network.stations[arc.to].latitudeDeg;
    const phiS = network.stations[arc.from].latitudeDeg;
    const sgn = phiT >= phiS ? 1 : -1;
    bTo[i] = sgn * aRef * meridianRadiusPerUnitA(fRef, phiT);
    bFrom[i] = -sgn * aRef * meridianRadiusPerUnitA(fRef, phiS);
  });
  return stationCovariance(network, bFrom, bTo, Float64Array.from(network.arcs, (arc) => arc.sigmaDistanceM ** 2), options);
}

/**
 * Σ = D + B·S_φ·Bᵀ for rows that each depend on two station latitudes: `bFrom`/`bTo` are ∂rowᵢ/∂φ
 * of the arc's from/to station (per radian), `diagonal` the row's own variance D. Used for the arcs
 * (metres) and for the degree rows (metres per degree).
 */
export function stationCovariance(
  network: ArcNetwork, bFrom: Float64Array, bTo: Float64Array, diagonal: Float64Array, options: CovarianceOptions = {},
): Float64Array {
  const n = network.arcs.length;
  const varPhi = network.stations.map((s) => (s.sigmaArcsec * RAD_PER_ARCSEC) ** 2);
  const sigma = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const ai = network.arcs[i];
    sigma[i * n + i] = diagonal[i] + bTo[i] ** 2 * varPhi[ai.to] + bFrom[i] ** 2 * varPhi[ai.from];
    if (options.independent) continue;
    for (let k = 0; k < i; k++) {
      const ak = network.arcs[k];
      let c = 0;
      // Σ_ik = Σ_j B_ij B_kj σ_j² over the stations the two rows share.
      if (ai.to === ak.to) c += bTo[i] * bTo[k] * varPhi[ai.to];
      if (ai.to === ak.from) c += bTo[i] * bFrom[k] * varPhi[ai.to];
      if (ai.from === ak.to) c += bFrom[i] * bTo[k] * varPhi[ai.from];
      if (ai.from === ak.from) c += bFrom[i] * bFrom[k] * varPhi[ai.from];
      sigma[i * n + k] = c;
      sigma[k * n + i] = c;
    }
  }
  return sigma;
}

/** Jacobian (n×2, row-major) and predicted reduced lengths of the network's arcs at (a, f). */
export function arcJacobian(network: ArcNetwork, a: number, f: number): { J: Float64Array; predictedM: Float64Array } {
  const n = network.arcs.length;
  const J = new Float64Array(n * 2);
  const predictedM = new Float64Array(n);
  network.arcs.forEach((arc, i) => {
    const phiT = network.stations[arc.to].latitudeDeg;
    const phiS = network.stations[arc.from].latitudeDeg;
    const d = meridianDistancePerUnitA(f, phiT) - meridianDistancePerUnitA(f, phiS);
    const sgn = d >= 0 ? 1 : -1;
    const dd = (meridianDistancePerUnitA(f + DF, phiT) - meridianDistancePerUnitA(f + DF, phiS)
      - meridianDistancePerUnitA(f - DF, phiT) + meridianDistancePerUnitA(f - DF, phiS)) / (2 * DF);
    J[2 * i] = sgn * d;
    J[2 * i + 1] = sgn * a * dd;
    predictedM[i] = a * sgn * d;
  });
  return { J, predictedM };
}

/** Design of the network at (a, f): Jacobian, predicted lengths and the arc covariance. */
export function arcDesign(network: ArcNetwork, a: number, f: number, options: CovarianceOptions = {}): ArcDesign {
  return { n: network.arcs.length, ...arcJacobian(network, a, f), sigma: arcCovariance(network, options) };
}

interface Normal { Q: Float64Array; ok: boolean; reason: string }

/** Q = (J̃ᵀJ̃)⁻¹ for whitened J̃ (n×2), with column equilibration and a scaled rank test. */
function invertNormal(Jw: Float64Array, n: number): Normal {
  let s0 = 0;
  let s1 = 0;
  for (let i = 0; i < n; i++) { s0 += Jw[2 * i] ** 2; s1 += Jw[2 * i + 1] ** 2; }
  const c0 = Math.sqrt(s0);
  const c1 = Math.sqrt(s1);
  if (!(c0 > 0) || !(c1 > 0)) return { Q: new Float64Array(4), ok: false, reason: 'a parameter has no effect on any arc' };
  let n01 = 0;
  for (let i = 0; i < n; i++) n01 += (Jw[2 * i] / c0) * (Jw[2 * i + 1] / c1);
  const det = 1 - n01 * n01;
  if (!(det > RANK_TOLERANCE)) return { Q: new Float64Array(4), ok: false, reason: `a and f are not separable from these arcs (correlation ${n01.toFixed(12)}): observe arcs at other latitudes` };
  // Inverse of the equilibrated [[1, ρ], [ρ, 1]], scaled back.
  const Q = new Float64Array([1 / det / (c0 * c0), -n01 / det / (c0 * c1), -n01 / det / (c0 * c1), 1 / det / (c1 * c1)]);
  return { Q, ok: true, reason: '' };
}

export interface DesignCovariance {
  ok: boolean;
  reason: string;
  /** A-priori 2×2 covariance of (a, f) (σ₀ = 1). */
  covariance: Float64Array;
  design: ArcDesign;
  factor: CholeskyFactor | null;
}

/** Q = (J̃ᵀJ̃)⁻¹ at (a, f) from an already factored Σ = L·Lᵀ (J̃ = L⁻¹J). */
function normalAt(network: ArcNetwork, a: number, f: number, sigma: Float64Array, factor: CholeskyFactor): DesignCovariance {
  const design = { n: network.arcs.length, ...arcJacobian(network, a, f), sigma };
  const normal = invertNormal(forwardSolve(factor, design.J, 2), design.n);
  return { ok: normal.ok, reason: normal.reason, covariance: normal.Q, design, factor };
}

/** The a-priori covariance of (a, f) the network's geometry and sigmas give at (a, f) — no data needed (planning). */
export function designCovariance(network: ArcNetwork, a: number, f: number, options: CovarianceOptions = {}): DesignCovariance {
  const design = arcDesign(network, a, f, options);
  const chol = cholesky(design.sigma, design.n);
  if (!chol.ok) return { ok: false, reason: `arc covariance ${chol.reason}`, covariance: new Float64Array(4), design, factor: null };
  return normalAt(network, a, f, design.sigma, chol.factor);
}

export interface CorrelatedFit {
  status: CorrelatedStatus;
  reason: string;
  semiMajorAxisM: number;
  flattening: number;
  /** σ̂₀²·Q (the reported covariance of (a, f)), or null when undefined. */
  covariance: Float64Array | null;
  /** Q: the a-priori covariance of (a, f). */
  covarianceApriori: Float64Array | null;
  varianceFactor: number | null;
  degreesOfFreedom: number;
  /** vᵀΣ⁻¹v at the solution (the GLS objective; χ² with n − 2 degrees of freedom under the model). */
  quadraticForm: number;
  /** The figure with the reported covariance, and with the a-priori one. */
  figure: Figure | null;
  figureApriori: Figure | null;
  /** Measured minus predicted reduced arc, metres, in network order. */
  residualsM: Float64Array;
  iterations: number;
  converged: boolean;
  independent: boolean;
  design: ArcDesign | null;
  /** Cholesky factor of Σ, for whitening and the diagnostics. */
  factor: CholeskyFactor | null;
  /** Σ⁻¹ (n×n), for the reliability numbers. */
  weightMatrix: Float64Array | null;
}

export interface CorrelatedFitOptions extends CovarianceOptions {
  /**
   * Where Gauss–Newton starts (e.g. the independent-rows fit, found by a global search). Default:
   * the reference ellipsoid's f with a in closed form.
   */
  start?: { semiMajorAxisM: number; flattening: number };
}

function failed(status: CorrelatedStatus, reason: string, n: number, independent: boolean): CorrelatedFit {
  return {
    status, reason, semiMajorAxisM: NaN, flattening: NaN, covariance: null, covarianceApriori: null, varianceFactor: null,
    degreesOfFreedom: Math.max(0, n - 2), quadraticForm: NaN, figure: null, figureApriori: null, residualsM: new Float64Array(n),
    iterations: 0, converged: false, independent, design: null, factor: null, weightMatrix: null,
  };
}

/** GLS fit of (a, f) to the network's arcs (see the file comment). */
export function fitCorrelatedArcs(network: ArcNetwork, options: CorrelatedFitOptions = {}): CorrelatedFit {
  const n = network.arcs.length;
  const independent = options.independent === true;
  if (n < 2) return failed('too-few-arcs', `${n} arc${n === 1 ? '' : 's'} for the 2 parameters a and f`, n, independent);
  const s = Float64Array.from(network.arcs, (arc) => arc.reducedDistanceM);
  // Σ does not depend on (a, f) (B on the reference ellipsoid): factor it once.
  const sigma = arcCovariance(network, options);
  const chol = cholesky(sigma, n);
  if (!chol.ok) return failed('not-positive-definite', `arc covariance ${chol.reason}`, n, independent);
  const factor = chol.factor;
  let a: number;
  let f: number;
  if (options.start && Number.isFinite(options.start.semiMajorAxisM) && Math.abs(options.start.flattening) <= F_LIMIT) {
    a = options.start.semiMajorAxisM;
    f = options.start.flattening;
  } else {
    f = network.reference.flattening;
    // a in closed form for the starting f: weighted by the diagonal only (a start, not the answer).
    const { J } = arcJacobian(network, 1, f);
    let num = 0;
    let den = 0;
    for (let i = 0; i < n; i++) {
      const w = 1 / sigma[i * n + i];
      num += w * J[2 * i] * s[i];
      den += w * J[2 * i] ** 2;
    }
    a = num / den;
  }
  let iterations = 0;
  let converged = false;
  let reason = '';
  while (iterations < MAX_GN_ITERATIONS) {
    iterations++;
    const dc = normalAt(network, a, f, sigma, factor);
    if (!dc.ok) return failed('rank-deficient', dc.reason, n, independent);
    const r = new Float64Array(n);
    for (let i = 0; i < n; i++) r[i] = s[i] - dc.design.predictedM[i];
    const Jw = forwardSolve(factor, dc.design.J, 2);
    const rw = forwardSolve(factor, r, 1);
    let g0 = 0;
    let g1 = 0;
    for (let i = 0; i < n; i++) { g0 += Jw[2 * i] * rw[i]; g1 += Jw[2 * i + 1] * rw[i]; }
    const Q = dc.covariance;
    const da = Q[0] * g0 + Q[1] * g1;
    const dfStep = Q[2] * g0 + Q[3] * g1;
    if (!(Math.abs(f + dfStep) <= F_LIMIT)) {
      reason = `Gauss–Newton stopped: the step to f = ${(f + dfStep).toPrecision(6)} leaves the meridian series' range |f| ≤ ${F_LIMIT}`;
      break;
    }
    a += da;
    f += dfStep;
    const sa = Math.sqrt(Q[0]);
    const sf = Math.sqrt(Q[3]);
    if (Math.abs(da) <= STEP_TOLERANCE * sa && Math.abs(dfStep) <= STEP_TOLERANCE * sf) {
      converged = true;
      reason = `Gauss–Newton: step ${Math.max(Math.abs(da) / sa, Math.abs(dfStep) / sf).toExponential(1)} standard errors after ${iterations} iterations`;
      break;
    }
  }
  if (!converged && reason === '') reason = `Gauss–Newton stopped at the cap of ${MAX_GN_ITERATIONS} iterations`;
  // Final quantities at the solution.
  const dc = normalAt(network, a, f, sigma, factor);
  if (!dc.ok) return failed('rank-deficient', dc.reason, n, independent);
  const residualsM = new Float64Array(n);
  for (let i = 0; i < n; i++) residualsM[i] = s[i] - dc.design.predictedM[i];
  const rw = forwardSolve(factor, residualsM, 1);
  const quad = rw.reduce((acc, v) => acc + v * v, 0);
  const dof = n - 2;
  const varianceFactor = dof > 0 ? quad / dof : null;
  const Q = dc.covariance;
  const covariance = varianceFactor !== null ? Q.map((q) => q * varianceFactor) : null;
  return {
    status: converged ? 'ok' : 'not-converged',
    reason,
    semiMajorAxisM: a,
    flattening: f,
    covariance,
    covarianceApriori: Q,
    varianceFactor,
    degreesOfFreedom: dof,
    quadraticForm: quad,
    figure: ellipsoidFigure(a, f, covariance),
    figureApriori: ellipsoidFigure(a, f, Q),
    residualsM,
    iterations,
    converged,
    independent,
    design: dc.design,
    factor,
    weightMatrix: choleskyInverse(factor),
  };
}
