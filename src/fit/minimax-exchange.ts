// Exact minimax (Chebyshev) fit of a compact row set by the exchange algorithm.
//
// Minimise max_i |bᵢ − aᵢγ| over m whitened frame rows (simplex-frame.ts). The dual is
//     max Σ_k λ_k σ_k b_k  s.t.  Σ_k λ_k σ_k a_k = 0,  Σ_k λ_k = 1,  λ ≥ 0,
// with one column (σ a_k; 1) per row and sign. A basis is a reference R of p + 1 rows with signs
// σ; its multipliers (γ, h) solve the levelled system a_kγ + σ_k h = b_k on R, and the reduced
// cost of row i with sign σ = sign(ρᵢ) is |ρᵢ| − h. So the entering row is the one with the
// largest residual, and the reference is optimal exactly when no row exceeds the level h: the
// exchange algorithm (Stiefel, Numer. Math. 1 (1959) 1; Cheney, "Introduction to Approximation
// Theory" (1966) ch. 2) is the simplex method on this dual. Every dual-feasible reference gives
// a lower bound h ≤ optimum (weak duality; de la Vallée Poussin), and h never decreases.
// Leaving row: the ratio test keeps λ ≥ 0. Ties (repeated rows, non-Haar designs) can make a
// step degenerate; after STALL_LIMIT degenerate steps in a row the entering and leaving rows are
// chosen by smallest position (Bland's rule), which cannot cycle.
import { factorLu, orthonormalComplement, solveLu, solveLuTransposed, type LuFactors } from './linear-solve.ts';

export interface CompactRows {
  readonly m: number;
  readonly p: number;
  /** m×p whitened frame rows, row-major. */
  readonly A: Float64Array;
  readonly b: Float64Array;
}

export interface ExchangeStart {
  /** p + 1 compact positions and their signs (±1), e.g. the previous optimal reference. */
  reference?: Int32Array;
  signs?: Int8Array;
}

export type ExchangeStatus = 'optimal' | 'iteration-cap' | 'singular' | 'no-reference';

export interface ExchangeResult {
  status: ExchangeStatus;
  gamma: Float64Array;
  /** The level h: the common |residual| on the reference, a lower bound on the optimum. */
  level: number;
  reference: Int32Array;
  signs: Int8Array;
  /** Dual weights λ on the reference (≥ 0, sum 1). */
  lambda: Float64Array;
  /** Largest |residual| over the compact rows at γ. */
  maxAbs: number;
  iterations: number;
}

/** Consecutive degenerate exchanges before Bland's rule takes over. */
export const STALL_LIMIT = 8;
/** A ratio-test entry μ_k counts as positive above this (the columns are O(1) in the frame). */
export const PIVOT_TOL = 1e-12;
/** Optimal when max|ρ| ≤ h·(1 + LEVEL_REL) + rounding of the residuals (LEVEL_EPS ε per unit of row magnitude). */
export const LEVEL_REL = 16 * Number.EPSILON;
export const LEVEL_EPS = 64;

export function exchangeMinimax(rows: CompactRows, start: ExchangeStart, maxIterations: number): ExchangeResult {
  const { m, p, A, b } = rows;
  const q = p + 1;
  let bMax = 0;
  let aMax = 0;
  for (let i = 0; i < m; i++) {
    bMax = Math.max(bMax, Math.abs(b[i]));
    for (let j = 0; j < p; j++) aMax = Math.max(aMax, Math.abs(A[i * p + j]));
  }
  const reference = new Int32Array(q);
  const signs = new Int8Array(q);
  if (!(start.reference && start.signs && validStart(rows, start.reference, start.signs, reference, signs))) {
    if (!initialReference(rows, reference, signs)) {
      return { status: 'no-reference', gamma: new Float64Array(p), level: 0, reference, signs, lambda: new Float64Array(q), maxAbs: Infinity, iterations: 0 };
    }
  }
  const D = new Float64Array(q * q);
  const rhs = new Float64Array(q);
  const col = new Float64Array(q);
  const e = new Float64Array(q);
  e[p] = 1;
  let gamma: Float64Array = new Float64Array(p);
  let level = 0;
  let lambda: Float64Array = new Float64Array(q);
  let iterations = 0;
  let stall = 0;
  for (;;) {
    // D: column k = (σ_k a_k; 1) for reference row k (stored row-major as D[row·q + k]).
    for (let k = 0; k < q; k++) {
      const i = reference[k];
      for (let j = 0; j < p; j++) D[j * q + k] = signs[k] * A[i * p + j];
      D[p * q + k] = 1;
    }
    const lu: LuFactors = factorLu(D, q);
    if (lu.singular) return { status: 'singular', gamma, level, reference, signs, lambda, maxAbs: Infinity, iterations };
    lambda = solveLu(lu, e);
    for (let k = 0; k < q; k++) rhs[k] = signs[k] * b[reference[k]];
    const y = solveLuTransposed(lu, rhs);
    gamma = y.slice(0, p);
    level = y[p];
    // Pricing: the largest |residual| (all rows; a reference row's is h).
    let gn = 0;
    for (let j = 0; j < p; j++) gn += Math.abs(gamma[j]);
    const tol = level * LEVEL_REL + LEVEL_EPS * Number.EPSILON * (bMax + aMax * gn);
    let enter = -1;
    let best = -Infinity;
    for (let i = 0; i < m; i++) {
      let f = 0;
      for (let j = 0; j < p; j++) f += A[i * p + j] * gamma[j];
      const a = Math.abs(b[i] - f);
      if (a > best) {
        best = a;
        enter = i;
      }
    }
    if (best <= level + tol) return { status: 'optimal', gamma, level, reference, signs, lambda, maxAbs: best, iterations };
    if (iterations >= maxIterations) return { status: 'iteration-cap', gamma, level, reference, signs, lambda, maxAbs: best, iterations };
    if (stall >= STALL_LIMIT) {
      // Bland: the first row (by position) that violates the level enters.
      for (let i = 0; i < m; i++) {
        let f = 0;
        for (let j = 0; j < p; j++) f += A[i * p + j] * gamma[j];
        if (Math.abs(b[i] - f) > level + tol) {
          enter = i;
          break;
        }
      }
    }
    let f = 0;
    for (let j = 0; j < p; j++) f += A[enter * p + j] * gamma[j];
    const s: 1 | -1 = b[enter] - f >= 0 ? 1 : -1;
    for (let j = 0; j < p; j++) col[j] = s * A[enter * p + j];
    col[p] = 1;
    const mu = solveLu(lu, col);
    let leave = -1;
    let theta = Infinity;
    for (let k = 0; k < q; k++) {
      if (!(mu[k] > PIVOT_TOL)) continue;
      const t = Math.max(0, lambda[k]) / mu[k];
      if (t < theta || (t === theta && leave >= 0 && reference[k] < reference[leave])) {
        theta = t;
        leave = k;
      }
    }
    if (leave < 0) return { status: 'singular', gamma, level, reference, signs, lambda, maxAbs: best, iterations };
    stall = theta <= PIVOT_TOL ? stall + 1 : 0;
    reference[leave] = enter;
    signs[leave] = s;
    iterations++;
  }
}

/** Copies a usable start (distinct in-range rows, signs ±1, dual-feasible) into ref/sgn. */
function validStart(rows: CompactRows, ref0: Int32Array, sgn0: Int8Array, ref: Int32Array, sgn: Int8Array): boolean {
  const { m, p } = rows;
  const q = p + 1;
  if (ref0.length !== q || sgn0.length !== q) return false;
  const seen = new Set<number>();
  for (let k = 0; k < q; k++) {
    const r = ref0[k];
    if (!(r >= 0 && r < m) || seen.has(r) || (sgn0[k] !== 1 && sgn0[k] !== -1)) return false;
    seen.add(r);
  }
  ref.set(ref0);
  sgn.set(sgn0);
  return dualWeights(rows, ref, sgn) !== null;
}

/** λ for a reference, or null when it is singular or not dual-feasible (some λ_k < 0). */
function dualWeights(rows: CompactRows, ref: Int32Array, sgn: Int8Array): Float64Array | null {
  const { p, A } = rows;
  const q = p + 1;
  const D = new Float64Array(q * q);
  for (let k = 0; k < q; k++) {
    for (let j = 0; j < p; j++) D[j * q + k] = sgn[k] * A[ref[k] * p + j];
    D[p * q + k] = 1;
  }
  const lu = factorLu(D, q);
  if (lu.singular) return null;
  const e = new Float64Array(q);
  e[p] = 1;
  const lambda = solveLu(lu, e);
  for (let k = 0; k < q; k++) if (!(lambda[k] >= -PIVOT_TOL) || !Number.isFinite(lambda[k])) return null;
  return lambda;
}

/**
 * A first dual-feasible reference: p rows chosen greedily by the largest component orthogonal to
 * the rows already chosen (spread rows: the ends of the latitude range first), then the row whose
 * expansion μ = A_B⁻ᵀaⱼ has the largest min|μ_k| (preferably all non-zero: the null vector
 * (μ, −1) of the (p+1)×p reference matrix then has no zero entry); the signs are the null
 * vector's.
 */
function initialReference(rows: CompactRows, ref: Int32Array, sgn: Int8Array): boolean {
  const { m, p, A } = rows;
  if (m < p + 1) return false;
  const chosen: number[] = [];
  const basis = new Float64Array(p * p);
  for (let k = 0; k < p; k++) {
    const comp = orthonormalComplement(basis.subarray(0, k * p), k, p);
    const dims = comp.length / p;
    let bestRow = -1;
    let bestNorm = 0;
    for (let i = 0; i < m; i++) {
      let norm = 0;
      for (let t = 0; t < dims; t++) {
        let dot = 0;
        for (let j = 0; j < p; j++) dot += comp[t * p + j] * A[i * p + j];
        norm += dot * dot;
      }
      if (norm > bestNorm) {
        bestNorm = norm;
        bestRow = i;
      }
    }
    if (bestRow < 0) return false;
    chosen.push(bestRow);
    for (let j = 0; j < p; j++) basis[k * p + j] = A[bestRow * p + j];
  }
  const lu = factorLu(basis, p);
  if (lu.singular) return false;
  // A row with some μ_k = 0 (a repeated abscissa, a non-Haar design) still gives a nonsingular,
  // dual-feasible (degenerate) reference: λ_k = 0 there and D stays invertible, since the null
  // space of the reference rows is spanned by ν = (μ, −1) and Σ|ν_k| ≠ 0.
  let bestRow = -1;
  let bestMin = -1;
  let bestMu: Float64Array | null = null;
  const aj = new Float64Array(p);
  for (let i = 0; i < m; i++) {
    if (chosen.includes(i)) continue;
    for (let j = 0; j < p; j++) aj[j] = A[i * p + j];
    const mu = solveLuTransposed(lu, aj);
    let mn = Infinity;
    for (let j = 0; j < p; j++) mn = Math.min(mn, Math.abs(mu[j]));
    if (mn > bestMin && Number.isFinite(mn)) {
      bestMin = mn;
      bestRow = i;
      bestMu = mu;
    }
  }
  if (bestRow < 0 || !bestMu) return false;
  // Null vector ν = (μ, −1): Σ_k μ_k a_k − a_j = 0; signs σ = sign(ν) (+ where ν_k = 0).
  for (let k = 0; k < p; k++) {
    ref[k] = chosen[k];
    sgn[k] = bestMu[k] >= 0 ? 1 : -1;
  }
  ref[p] = bestRow;
  sgn[p] = -1;
  return dualWeights(rows, ref, sgn) !== null;
}
