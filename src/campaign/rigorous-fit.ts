// The rigorous `ellipsoid` model: fit (a, f) so that G(φ₂; a, f) − G(φ₁; a, f) matches each
// measured arc, G the meridian distance (Helmert's series in n to n⁴ and beyond, src/geodesy;
// sub-millimetre against GeographicLib). No degree-length approximation, so no e⁴ model error.
//
// G is linear in a for fixed f: G(φ; a, f) = a·g(φ; f), g = meridianDistancePerUnitA. So for each
// trial f the model sᵢ = a·xᵢ(f), xᵢ = |g(φ₂ᵢ) − g(φ₁ᵢ)|, is a one-column linear problem that every
// estimator solves exactly (least squares: closed form; least absolute deviations: a weighted
// median; minimax: the one-column Chebyshev fit; Huber/Tukey: IRLS) through `fitLinear`. The
// profile objective Φ(f) = min_a ρ-objective is then minimised over f by a grid over a wide
// bracket followed by golden-section search (Kiefer 1953) to F_TOLERANCE.
//
// M-estimators: the scale must not change with f, or Φ(f) is not one function; it is fixed at the
// MAD scale of the whitened residuals of the least-absolute-deviations profile optimum (a robust
// start, as in Huber's "Proposal 2" with scale held fixed). The search is then local: a bracket of
// ±M_BRACKET_SIGMAS standard errors of f around that start (σ_f from the least-squares
// linearization there). A redescending ρ (Tukey) saturates far from the data, leaving Φ(f) flat
// with a narrow basin that a wide grid can miss; like IRLS, the fit finds the minimum nearest its
// robust start.
//
// Standard errors: the Jacobian at the optimum, J = [xᵢ(f̂), â·∂xᵢ/∂f] (∂/∂f by a central
// difference, step F_DERIVATIVE_STEP: truncation O(h²) ≈ 1e-10 relative, rounding ε/h ≈ 1e-11),
// is fitted once more as a two-column linear problem with the same estimator and weights; its
// covariance (where the fit layer defines one: least squares, and asymptotic for Huber/Tukey) is
// the covariance of (a, f). The same step is a Gauss–Newton check: its f-step must be negligible.
import { meridianDistancePerUnitA } from '../geodesy/index.ts';
import { fitLinear, madScale } from '../fit/index.ts';
import type { Estimator, FitOptions, FitResult, LinearProblem } from '../fit/types.ts';

/** Search bracket for f: from a prolate −0.02 to 0.05 (1/f = 20), far beyond any campaign's answer. */
export const F_SEARCH_MIN = -0.02;
export const F_SEARCH_MAX = 0.05;
/** Grid step over the bracket (141 points); the golden section starts from the best cell's neighbours. */
export const F_GRID_STEP = 0.0005;
/**
 * Golden-section stop: bracket narrower than 1e-12 in f (1e-7 in 1/f near 298). The profile
 * objective itself is resolved only to ~1e-11 relative (arcs of 5e5 m against sigmas of metres),
 * which leaves f uncertain by ~σ_f·3e-6 — a few 1e-6 in 1/f, still far below any campaign's σ(1/f).
 */
export const F_TOLERANCE = 1e-12;
/** Cap: a 2·F_GRID_STEP bracket shrinks to F_TOLERANCE in log(1e9)/log(1.618) ≈ 44 steps; twice that. */
export const F_MAX_ITERATIONS = 100;
export const F_DERIVATIVE_STEP = 1e-5;
/** Half-width of the M-estimators' local bracket, in standard errors of f at the L1 start. */
export const M_BRACKET_SIGMAS = 10;
/** Grid cells across the local bracket (each 0.5 σ_f wide). */
export const M_BRACKET_CELLS = 40;
/** The final Gauss–Newton step in f must be below 1e-3·σ_f (or the search resolution) to count as converged. */
export const GAUSS_NEWTON_STEP_RELATIVE = 1e-3;
export const GAUSS_NEWTON_STEP_FLOOR = 10 * F_TOLERANCE;
const GOLDEN = (Math.sqrt(5) - 1) / 2;

export interface ArcForFit {
  id: string;
  latitude1Deg: number;
  latitude2Deg: number;
  /** Measured distance reduced to the ellipsoid, metres. */
  distanceM: number;
  /** 1/σ² with σ in metres (propagated), or 1 (equal weighting). */
  weight: number;
}

export interface RigorousFitOptions {
  /** The previous solution's f and its standard error: a local bracket to start from. */
  warmStart?: { f: number; sigmaF: number };
  tuning?: number;
}

export interface RigorousFitResult {
  status: 'ok' | 'too-few-rows' | 'rank-deficient' | 'not-converged';
  semiMajorAxisM: number;
  flattening: number;
  /** 2×2 covariance of (a, f), row-major, or null where the estimator gives none. */
  covariance: Float64Array | null;
  /** Measured minus computed arc, metres. */
  residuals: Float64Array;
  objective: number;
  scale: number;
  iterations: number;
  converged: boolean;
  reason: string;
  /** The final linear fit at the optimum (two columns: a and the f-step), for diagnostics. */
  linearized: FitResult;
  linearizedProblem: LinearProblem;
}

function columnAt(arcs: readonly ArcForFit[], f: number): Float64Array {
  const x = new Float64Array(arcs.length);
  arcs.forEach((arc, i) => {
    x[i] = Math.abs(meridianDistancePerUnitA(f, arc.latitude2Deg) - meridianDistancePerUnitA(f, arc.latitude1Deg));
  });
  return x;
}

export function fitEllipsoidToArcs(
  arcs: readonly ArcForFit[], estimator: Estimator, options: RigorousFitOptions = {},
): RigorousFitResult {
  const n = arcs.length;
  const y = Float64Array.from(arcs, (a) => a.distanceM);
  const weights = Float64Array.from(arcs, (a) => a.weight);
  const profile = (f: number, fitOptions: FitOptions, est: Estimator): FitResult =>
    fitLinear({ n, p: 1, X: columnAt(arcs, f), y, weights }, est, fitOptions);

  // Fixed scale for the M-estimators from the L1 profile optimum (see the file comment).
  let fitOptions: FitOptions = options.tuning !== undefined ? { tuning: options.tuning } : {};
  let iterations = 0;
  let bracket: Bracket = { lo: F_SEARCH_MIN, hi: F_SEARCH_MAX, cells: Math.round((F_SEARCH_MAX - F_SEARCH_MIN) / F_GRID_STEP) };
  if (estimator === 'huber' || estimator === 'tukey') {
    const start = searchF((f) => profile(f, {}, 'least-absolute'), bracket);
    iterations += start.iterations;
    const sigmaF = leastSquaresSigmaF(arcs, y, weights, start.f, start.fit.coefficients[0]);
    if (sigmaF !== null) {
      const half = Math.max(M_BRACKET_SIGMAS * sigmaF, 1e3 * F_TOLERANCE);
      bracket = { lo: Math.max(F_SEARCH_MIN, start.f - half), hi: Math.min(F_SEARCH_MAX, start.f + half), cells: M_BRACKET_CELLS };
    }
    const whitened = Float64Array.from(start.fit.residuals, (r, i) => r * Math.sqrt(weights[i]));
    const s = madScale(whitened);
    // A zero MAD (more than half the arcs fitted exactly) leaves ρ(r/s) undefined; fall back to the
    // smallest non-zero |whitened residual|, which keeps those arcs inside the quadratic core.
    const nonzero = [...whitened].map(Math.abs).filter((v) => v > 0);
    const scale = s > 0 ? s : nonzero.length > 0 ? Math.min(...nonzero) : 1;
    fitOptions = { ...fitOptions, scale };
  }
  // Warm start (least squares, L1, minimax): a local bracket around the previous f; if the optimum
  // sits on its edge the data moved it further, and the full bracket is searched after all.
  let best: Search | null = null;
  const warm = options.warmStart;
  if (warm && estimator !== 'huber' && estimator !== 'tukey' && Number.isFinite(warm.f) && warm.sigmaF > 0 && Math.abs(warm.f) < F_SEARCH_MAX) {
    const half = Math.max(M_BRACKET_SIGMAS * warm.sigmaF, 1e3 * F_TOLERANCE);
    const local = searchF((f) => profile(f, fitOptions, estimator),
      { lo: Math.max(F_SEARCH_MIN, warm.f - half), hi: Math.min(F_SEARCH_MAX, warm.f + half), cells: M_BRACKET_CELLS });
    iterations += local.iterations;
    if (local.converged) best = { ...local, reason: `${local.reason}, warm-started at the previous f` };
  }
  best ??= searchF((f) => profile(f, fitOptions, estimator), bracket);
  iterations += best.iterations;

  const f = best.f;
  const a = best.fit.coefficients[0];
  const x = columnAt(arcs, f);
  const linearizedProblem = linearize(arcs, y, weights, f, a, x);
  const linearized = fitLinear(linearizedProblem, estimator, fitOptions);

  const residuals = best.fit.residuals;
  let status: RigorousFitResult['status'] = best.fit.status === 'ok' ? 'ok' : best.fit.status;
  if (status === 'ok' && linearized.status === 'rank-deficient') status = 'rank-deficient';
  if (status === 'ok' && linearized.status === 'too-few-rows') status = 'too-few-rows';
  let converged = best.converged && best.fit.converged;
  let reason = best.reason;
  if (!best.fit.converged) reason += `; inner fit: ${best.fit.reason}`;
  if (status === 'ok' && !converged) status = 'not-converged';
  const covariance = linearized.status === 'ok' && linearized.covariance ? linearized.covariance : null;
  // Gauss–Newton check (least squares only, where the linearized optimum is unique and smooth).
  if (estimator === 'least-squares' && covariance && linearized.status === 'ok') {
    const step = Math.abs(linearized.coefficients[1]);
    const sd = Math.sqrt(covariance[3]);
    // Negligible: below a thousandth of σ_f, or at the golden section's own resolution.
    if (step > Math.max(GAUSS_NEWTON_STEP_RELATIVE * sd, GAUSS_NEWTON_STEP_FLOOR)) {
      converged = false;
      status = status === 'ok' ? 'not-converged' : status;
      reason += `; Gauss–Newton step in f ${step.toExponential(2)} is not negligible against σ_f ${sd.toExponential(2)}`;
    }
  }
  return {
    status, semiMajorAxisM: a, flattening: f, covariance, residuals,
    objective: best.fit.objective, scale: best.fit.scale,
    iterations, converged, reason, linearized, linearizedProblem,
  };
}

/** The two-column problem linearized at (a, f): columns xᵢ(f) and a·∂xᵢ/∂f, coefficients (a, f-step). */
function linearize(arcs: readonly ArcForFit[], y: Float64Array, weights: Float64Array, f: number, a: number, x = columnAt(arcs, f)): LinearProblem {
  const n = arcs.length;
  // One-sided at the bracket edges, where the series' flattening bound forbids stepping outside.
  const fUp = Math.min(f + F_DERIVATIVE_STEP, F_SEARCH_MAX);
  const fDown = Math.max(f - F_DERIVATIVE_STEP, F_SEARCH_MIN);
  const dx = columnAt(arcs, fUp);
  const dxm = columnAt(arcs, fDown);
  const X = new Float64Array(2 * n);
  for (let i = 0; i < n; i++) {
    X[2 * i] = x[i];
    X[2 * i + 1] = (Number.isFinite(a) ? a : 0) * (dx[i] - dxm[i]) / (fUp - fDown);
  }
  return { n, p: 2, X, y, weights };
}

/** σ_f of a least-squares fit linearized at (a, f), or null where undefined (n ≤ 2, rank deficiency). */
function leastSquaresSigmaF(arcs: readonly ArcForFit[], y: Float64Array, weights: Float64Array, f: number, a: number): number | null {
  const ls = fitLinear(linearize(arcs, y, weights, f, a), 'least-squares');
  const v = ls.status === 'ok' && ls.covariance ? ls.covariance[3] : Number.NaN;
  return Number.isFinite(v) && v > 0 ? Math.sqrt(v) : null;
}

interface Search { f: number; fit: FitResult; iterations: number; converged: boolean; reason: string }
interface Bracket { lo: number; hi: number; cells: number }

/**
 * Grid over the bracket, then golden section in the best cell's neighbourhood. Among equal grid
 * values (a saturated ρ) the point nearest the bracket's centre — the robust start — wins.
 */
function searchF(evaluate: (f: number) => FitResult, bracket: Bracket): Search {
  const value = (r: FitResult): number => (r.status === 'ok' && Number.isFinite(r.objective) ? r.objective : Number.POSITIVE_INFINITY);
  const { lo: F_LO, hi: F_HI, cells } = bracket;
  const step = (F_HI - F_LO) / cells;
  const centre = cells / 2;
  let bestK = 0;
  let bestV = Number.POSITIVE_INFINITY;
  let bestFit: FitResult | null = null;
  for (let k = 0; k <= cells; k++) {
    const r = evaluate(F_LO + k * step);
    const v = value(r);
    if (v < bestV || (v === bestV && v < Number.POSITIVE_INFINITY && Math.abs(k - centre) < Math.abs(bestK - centre))) {
      bestV = v;
      bestK = k;
      bestFit = r;
    }
  }
  if (bestFit === null) {
    const f = (F_LO + F_HI) / 2;
    const r = evaluate(f);
    return { f, fit: r, iterations: cells + 1, converged: false, reason: `no trial flattening gave a fit (${r.reason})` };
  }
  if (bestK === 0 || bestK === cells) {
    const f = F_LO + bestK * step;
    return { f, fit: bestFit, iterations: cells + 1, converged: false, reason: `the best flattening lies at the edge of the search bracket [${F_LO.toPrecision(6)}, ${F_HI.toPrecision(6)}]` };
  }
  let lo = F_LO + (bestK - 1) * step;
  let hi = F_LO + (bestK + 1) * step;
  let c = hi - GOLDEN * (hi - lo);
  let d = lo + GOLDEN * (hi - lo);
  let fc = evaluate(c);
  let fd = evaluate(d);
  let iterations = 0;
  while (hi - lo > F_TOLERANCE && iterations < F_MAX_ITERATIONS) {
    iterations++;
    if (value(fc) <= value(fd)) {
      hi = d;
      d = c;
      fd = fc;
      c = hi - GOLDEN * (hi - lo);
      fc = evaluate(c);
    } else {
      lo = c;
      c = d;
      fc = fd;
      d = lo + GOLDEN * (hi - lo);
      fd = evaluate(d);
    }
  }
  const converged = hi - lo <= F_TOLERANCE;
  const [f, fit] = value(fc) <= value(fd) ? [c, fc] : [d, fd];
  // The grid point may still beat the interior (a flat or kinked profile): keep the better one.
  const gridF = F_LO + bestK * step;
  const useGrid = value(bestFit) < value(fit);
  return {
    f: useGrid ? gridF : f,
    fit: useGrid ? bestFit : fit,
    iterations: iterations + cells + 1,
    converged,
    reason: converged
      ? `golden section: bracket ${(hi - lo).toExponential(1)} in f below ${F_TOLERANCE} after ${iterations} steps (grid of ${cells + 1})`
      : `golden section stopped at the cap of ${F_MAX_ITERATIONS} steps, bracket ${(hi - lo).toExponential(1)} in f`,
  };
}
