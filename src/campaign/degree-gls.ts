// Generalised least squares of the degree models (degree-model.ts) with the full row covariance.
//
// Row i is yᵢ = sᵢ/|Δφᵢ| (m/degree, Δφ in degrees) of the arc from station f to station t. To first
// order its error is εᵢ/|Δφᵢ| plus the two station latitude errors through
//     ∂yᵢ/∂φ_t = −sgnᵢ·sᵢ/Δφᵢ²,   ∂yᵢ/∂φ_f = +sgnᵢ·sᵢ/Δφᵢ²   (per degree; × 180/π per radian),
// so Σ = diag(σ_sᵢ²/Δφᵢ²) + B·S_φ·Bᵀ: the diagonal is the `propagated` σ_y² of degree-rows.ts and
// consecutive arcs sharing a station get −(s₁/Δφ₁²)(s₂/Δφ₂²)σ_φ². The error the latitudes cause in
// x = sin²φ_mid is left out, as in the row weights (m·sin2φ·σ_φ ≈ 1e-3 m/degree against s/Δφ²·σ_φ
// ≈ 10 m/degree on a one-degree arc at 0.3″).
//
// The model is linear, so GLS is ordinary least squares on the whitened problem L⁻¹X β = L⁻¹y
// (Σ = L·Lᵀ), solved by the fit layer; its covariance σ̂₀²(X̃ᵀX̃)⁻¹ is the GLS covariance.
import { fitLinear, leastSquaresCofactor } from '../fit/index.ts';
import type { FitResult } from '../fit/types.ts';
import { cholesky, forwardSolve, type CholeskyFactor } from './reliability-linear-algebra.ts';
import { stationCovariance } from './reliability-gls.ts';
import type { ArcNetwork } from './reliability-network.ts';
import { degreeProblem, type DegreeModelId } from './degree-model.ts';
import type { DegreeRow } from './degree-rows.ts';

const DEG_PER_RAD = 180 / Math.PI;

/** Σ (n×n, (m/degree)²) of the degree rows of the network's arcs, in network order. */
export function degreeRowCovariance(network: ArcNetwork): Float64Array {
  const n = network.arcs.length;
  const bFrom = new Float64Array(n);
  const bTo = new Float64Array(n);
  const diagonal = new Float64Array(n);
  network.arcs.forEach((arc, i) => {
    const dPhi = network.stations[arc.to].latitudeDeg - network.stations[arc.from].latitudeDeg;
    const g = (arc.reducedDistanceM / (dPhi * dPhi)) * DEG_PER_RAD;
    const sgn = dPhi >= 0 ? 1 : -1;
    bTo[i] = -sgn * g;
    bFrom[i] = sgn * g;
    diagonal[i] = (arc.sigmaDistanceM / dPhi) ** 2;
  });
  return stationCovariance(network, bFrom, bTo, diagonal);
}

export type DegreeGls =
  | { ok: true; fit: FitResult; X: Float64Array; p: number; sigma: Float64Array; factor: CholeskyFactor; cofactor: Float64Array; quadraticForm: number }
  | { ok: false; reason: string; fit: FitResult | null };

/** GLS of the degree model to `rows` (the network's arcs, same order) with the row covariance Σ. */
export function fitDegreeGls(rows: readonly DegreeRow[], model: DegreeModelId, sigma: Float64Array): DegreeGls {
  const { n, p, X, y } = degreeProblem(rows, model);
  const chol = cholesky(sigma, n);
  if (!chol.ok) return { ok: false, reason: `row covariance ${chol.reason}`, fit: null };
  const whitened = { n, p, X: forwardSolve(chol.factor, X, p), y: forwardSolve(chol.factor, y, 1) };
  const w = fitLinear(whitened, 'least-squares');
  if (w.status !== 'ok') return { ok: false, reason: w.reason, fit: w };
  const cofactor = leastSquaresCofactor(whitened);
  if (typeof cofactor === 'string') return { ok: false, reason: cofactor, fit: w };
  // Residuals back in m/degree: v = y − Xβ (the fit layer's are the whitened ones).
  const residuals = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let pred = 0;
    for (let j = 0; j < p; j++) pred += X[i * p + j] * w.coefficients[j];
    residuals[i] = y[i] - pred;
  }
  const quadraticForm = w.residuals.reduce((s, r) => s + r * r, 0);
  return { ok: true, fit: { ...w, residuals, objective: quadraticForm }, X, p, sigma, factor: chol.factor, cofactor, quadraticForm };
}
