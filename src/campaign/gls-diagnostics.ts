// Residual covariance and Baarda's reliability numbers of a generalised least-squares fit with p
// parameters and a full observation covariance Σ (P = Σ⁻¹), a-priori σ₀ = 1 (W. Baarda, "A
// testing procedure for use in geodetic networks", 1968; correlated observations as in
// P. J. G. Teunissen, "Testing theory", Delft, 2000 — both from memory):
//     Q  = (JᵀPJ)⁻¹                     a-priori covariance of the parameters
//     Q_vv = Σ − J Q Jᵀ                 covariance of the residuals
//     rᵢ = (Q_vv P)ᵢᵢ = 1 − Jᵢ Q (PJ)ᵢᵀ  redundancy (Σ rᵢ = n − p)
//     (P Q_vv P)ᵢᵢ = Pᵢᵢ − (PJ)ᵢ Q (PJ)ᵢᵀ   (because P Σ P = P)
//     wᵢ = (P v)ᵢ / √(P Q_vv P)ᵢᵢ         Baarda's w-test
//     ∇ᵢ = δ₀ / √(P Q_vv P)ᵢᵢ             minimal detectable bias, δ₀ = 4.13 (α₀ = 0.001, β₀ = 0.80)
//     uᵢ = vᵢ / √(Q_vv)ᵢᵢ                  the residual in units of its own standard deviation
// With a diagonal Σ these are the textbook rᵢ = 1 − hᵢᵢ, wᵢ = vᵢ/(σᵢ√rᵢ) and ∇ᵢ = δ₀σᵢ/√rᵢ.
// Only O(n²) work after the factor, apart from the diagonal of P (O(n³), n = arcs in a campaign).
import { MDB_NONCENTRALITY, REDUNDANCY_FLOOR } from '../fit/index.ts';
import { choleskySolve, forwardSolve, type CholeskyFactor } from './reliability-linear-algebra.ts';

export interface GlsDiagnostics {
  /** (Q_vv)ᵢᵢ, the variance of each residual (σ₀ = 1), in the observation's unit squared. */
  residualVariance: Float64Array;
  redundancy: Float64Array;
  /** Baarda's w; NaN where the observation is not controlled. */
  wTest: Float64Array;
  /** In the observation's unit; Infinity where not controlled. */
  minimalDetectableBias: Float64Array;
  /** Redundancy above REDUNDANCY_FLOOR and (P Q_vv P)ᵢᵢ > 0: the other observations check this one. */
  controlled: boolean[];
}

/** Quadratic form x Q yᵀ for rows x, y of length p and Q p×p (row-major). */
function form(x: Float64Array, xi: number, Q: Float64Array, y: Float64Array, yi: number, p: number): number {
  let s = 0;
  for (let j = 0; j < p; j++) for (let k = 0; k < p; k++) s += x[xi * p + j] * Q[j * p + k] * y[yi * p + k];
  return s;
}

/**
 * Diagnostics of a GLS fit: J the n×p design (Jacobian at the solution), Q its a-priori p×p
 * covariance, Σ (n×n) with its Cholesky factor, v the residuals (observed − computed).
 */
export function glsDiagnostics(
  J: Float64Array, p: number, Q: Float64Array, sigma: Float64Array, factor: CholeskyFactor, residuals: ArrayLike<number>,
): GlsDiagnostics {
  const n = factor.n;
  const PJ = choleskySolve(factor, J, p);
  const Pv = choleskySolve(factor, Float64Array.from(residuals), 1);
  // Pᵢᵢ = Σₖ (L⁻¹)ₖᵢ², P = L⁻ᵀL⁻¹.
  const identity = new Float64Array(n * n);
  for (let i = 0; i < n; i++) identity[i * n + i] = 1;
  const Linv = forwardSolve(factor, identity, n);
  const residualVariance = new Float64Array(n);
  const redundancy = new Float64Array(n);
  const wTest = new Float64Array(n);
  const minimalDetectableBias = new Float64Array(n);
  const controlled: boolean[] = [];
  for (let i = 0; i < n; i++) {
    let pii = 0;
    for (let k = i; k < n; k++) pii += Linv[k * n + i] ** 2;
    residualVariance[i] = sigma[i * n + i] - form(J, i, Q, J, i, p);
    redundancy[i] = 1 - form(J, i, Q, PJ, i, p);
    const d = pii - form(PJ, i, Q, PJ, i, p);
    const ok = redundancy[i] > REDUNDANCY_FLOOR && d > 0 && residualVariance[i] > 0;
    controlled.push(ok);
    wTest[i] = ok ? Pv[i] / Math.sqrt(d) : NaN;
    minimalDetectableBias[i] = ok ? MDB_NONCENTRALITY / Math.sqrt(d) : Infinity;
  }
  return { residualVariance, redundancy, wTest, minimalDetectableBias, controlled };
}
