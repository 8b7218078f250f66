// Small dense linear systems (order p or p + 1, p ≲ 12) for the exact estimators' basis and
// reference systems.
//
// LU with partial pivoting (Golub & Van Loan, "Matrix Computations", 4th ed., Alg. 3.4.1). The
// computed solution solves (A + E)x = b with ‖E‖∞ ≲ 3n·ε·‖L‖∞‖U‖∞ (GVL Thm 3.3.2); growth is
// negligible at these orders, so the error in x is of order cond(A)·n·ε. Callers never test a
// pivot against exact zero: `reciprocalCondition` gives 1/(‖A‖₁‖A⁻¹‖₁), computed from the
// explicit inverse (n solves, affordable at these orders), for a scaled test.
// Also a Householder-free orthonormal complement (modified Gram–Schmidt, GVL §5.2.8, with one
// re-orthogonalisation pass — "twice is enough", Giraud et al. 2005) for the null-space
// directions of the least-absolute-deviations start.

import { smallCopy, smallFloat64 } from './small-array.ts';

export interface LuFactors {
  readonly n: number;
  /** L (unit lower, below the diagonal) and U (on and above), row-major n×n. */
  readonly lu: Float64Array;
  /** Row i of PA is row piv[i] of A. */
  readonly piv: Int32Array;
  /** A pivot was exactly zero: the factors cannot be used to solve. */
  readonly singular: boolean;
}

/** Factors the row-major n×n matrix `a` (not modified). */
export function factorLu(a: Float64Array, n: number): LuFactors {
  const lu = smallCopy(a, n * n);
  const piv = new Int32Array(n);
  for (let i = 0; i < n; i++) piv[i] = i;
  let singular = false;
  for (let k = 0; k < n; k++) {
    let best = k;
    let bestAbs = Math.abs(lu[k * n + k]);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(lu[i * n + k]);
      if (v > bestAbs) {
        bestAbs = v;
        best = i;
      }
    }
    if (best !== k) {
      for (let j = 0; j < n; j++) {
        const t = lu[k * n + j];
        lu[k * n + j] = lu[best * n + j];
        lu[best * n + j] = t;
      }
      const t = piv[k];
      piv[k] = piv[best];
      piv[best] = t;
    }
    const d = lu[k * n + k];
    if (d === 0) {
      singular = true;
      continue;
    }
    for (let i = k + 1; i < n; i++) {
      const f = (lu[i * n + k] /= d);
      if (f === 0) continue;
      for (let j = k + 1; j < n; j++) lu[i * n + j] -= f * lu[k * n + j];
    }
  }
  return { n, lu, piv, singular };
}

/** Solves A x = b. `out` may alias nothing else; returns it. */
export function solveLu(f: LuFactors, b: ArrayLike<number>, out: Float64Array = new Float64Array(f.n)): Float64Array {
  const { n, lu, piv } = f;
  for (let i = 0; i < n; i++) {
    let s = b[piv[i]];
    for (let j = 0; j < i; j++) s -= lu[i * n + j] * out[j];
    out[i] = s;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = out[i];
    for (let j = i + 1; j < n; j++) s -= lu[i * n + j] * out[j];
    out[i] = s / lu[i * n + i];
  }
  return out;
}

/** Solves Aᵀ x = b (PA = LU ⇒ Aᵀ = Uᵀ Lᵀ P). Returns `out`. */
export function solveLuTransposed(f: LuFactors, b: ArrayLike<number>, out: Float64Array = new Float64Array(f.n)): Float64Array {
  const { n, lu, piv } = f;
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let j = 0; j < i; j++) s -= lu[j * n + i] * w[j];
    w[i] = s / lu[i * n + i];
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = w[i];
    for (let j = i + 1; j < n; j++) s -= lu[j * n + i] * w[j];
    w[i] = s;
  }
  for (let i = 0; i < n; i++) out[piv[i]] = w[i];
  return out;
}

/**
 * ‖M‖₁ = max over k of Σⱼ|M[j, k]| (row-major p×p). Of M = A⁻¹ it is the bound |δz_k| ≤
 * ‖A⁻¹‖₁·max_j|δG_j| of the dual certificates (least-absolute-certificate.ts, -proof.ts,
 * fit-session.ts); of A and A⁻¹ it gives the condition number.
 */
export function matrixNorm1(m: Float64Array, p: number): number {
  let norm = 0;
  for (let k = 0; k < p; k++) {
    let s = 0;
    for (let j = 0; j < p; j++) s += Math.abs(m[j * p + k]);
    norm = Math.max(norm, s);
  }
  return norm;
}

/** A⁻¹, row-major, from the factors. */
export function inverseFromLu(f: LuFactors): Float64Array {
  const { n } = f;
  const inv = smallFloat64(n * n);
  const e = new Float64Array(n);
  const col = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    e.fill(0);
    e[j] = 1;
    solveLu(f, e, col);
    for (let i = 0; i < n; i++) inv[i * n + j] = col[i];
  }
  return inv;
}

/** 1/(‖A‖₁‖A⁻¹‖₁) in [0, 1]; 0 when the factorisation met an exactly zero pivot. */
export function reciprocalCondition(a: Float64Array, f: LuFactors): number {
  if (f.singular) return 0;
  const { n } = f;
  const r = 1 / (matrixNorm1(a, n) * matrixNorm1(inverseFromLu(f), n));
  return Number.isFinite(r) ? Math.min(1, r) : 0;
}

/**
 * Orthonormal basis of the complement of span(rows) in ℝᵖ: `rows` holds k row vectors of length
 * p (row-major); returns p − rank(rows) orthonormal vectors (row-major), so more than p − k when
 * the rows are numerically dependent (callers compare the count). A candidate vector is accepted
 * when its part orthogonal to everything so far keeps more than `COMPLEMENT_KEEP` of its length.
 */
export function orthonormalComplement(rows: Float64Array, k: number, p: number): Float64Array {
  const q = new Float64Array((k + p) * p);
  let m = 0;
  const v = new Float64Array(p);
  const push = (src: ArrayLike<number>, offset: number): boolean => {
    for (let j = 0; j < p; j++) v[j] = src[offset + j];
    let norm0 = 0;
    for (let j = 0; j < p; j++) norm0 += v[j] * v[j];
    norm0 = Math.sqrt(norm0);
    if (norm0 === 0) return false;
    for (let pass = 0; pass < 2; pass++) {
      for (let r = 0; r < m; r++) {
        let d = 0;
        for (let j = 0; j < p; j++) d += q[r * p + j] * v[j];
        for (let j = 0; j < p; j++) v[j] -= d * q[r * p + j];
      }
    }
    let norm = 0;
    for (let j = 0; j < p; j++) norm += v[j] * v[j];
    norm = Math.sqrt(norm);
    if (!(norm > COMPLEMENT_KEEP * norm0)) return false;
    for (let j = 0; j < p; j++) q[m * p + j] = v[j] / norm;
    m++;
    return true;
  };
  for (let r = 0; r < k; r++) push(rows, r * p);
  const spanned = m;
  const unit = new Float64Array(p);
  for (let j = 0; j < p && m < p; j++) {
    unit.fill(0);
    unit[j] = 1;
    push(unit, 0);
  }
  return q.slice(spanned * p, m * p);
}

/**
 * A unit vector keeping less than this fraction of its length after orthogonalisation lies in
 * the span already found, to within the rounding of the two Gram–Schmidt passes (about p·ε
 * relative); 1e-8 ≈ √ε leaves a wide margin on both sides.
 */
export const COMPLEMENT_KEEP = 1e-8;

/**
 * Cholesky G = RᵀR of a symmetric p×p matrix (its upper triangle is read) into the upper
 * triangle of R (row-major; the rest is left as given), false when a pivot is not above
 * relFloor × its diagonal entry: not positive definite (relFloor = 0) or too near it
 * (Golub & Van Loan, "Matrix Computations", 4th ed., §4.2).
 */
export function choleskyUpper(G: Float64Array, p: number, R: Float64Array, relFloor = 0): boolean {
  for (let j = 0; j < p; j++) {
    let d = G[j * p + j];
    for (let k = 0; k < j; k++) d -= R[k * p + j] * R[k * p + j];
    if (!(d > relFloor * G[j * p + j])) return false;
    const rjj = Math.sqrt(d);
    R[j * p + j] = rjj;
    for (let l = j + 1; l < p; l++) {
      let v = G[j * p + l];
      for (let k = 0; k < j; k++) v -= R[k * p + j] * R[k * p + l];
      R[j * p + l] = v / rjj;
    }
  }
  return true;
}
