// Least squares for a tiny dense system (m ≤ a few dozen rows, ≤ 5 unknowns) by Householder QR
// (Golub & Van Loan, "Matrix Computations", §5.3): used to recover coefficients from an LP's active
// set, where m is p or p+1. Backward stable; no normal equations (they square the condition number).
import { InputError } from '../../src/errors.ts';

/** Solves min ‖A z − b‖ for A (m×q, row-major), m ≥ q; returns z, or null if A is rank-deficient. */
export function smallLeastSquares(A: Float64Array, b: Float64Array, m: number, q: number): Float64Array | null {
  if (A.length !== m * q || b.length !== m) throw new InputError('smallLeastSquares.A', `${A.length}/${b.length}`, `expected ${m}×${q} and ${m}`);
  if (m < q) return null;
  const R = Float64Array.from(A);
  const c = Float64Array.from(b);
  let largest = 0;
  for (const v of R) largest = Math.max(largest, Math.abs(v));
  // A pivot below this is rank deficiency at double precision (scale of A times m·ε).
  const tiny = largest * m * Number.EPSILON * 16;
  for (let j = 0; j < q; j++) {
    let norm = 0;
    for (let i = j; i < m; i++) norm = Math.hypot(norm, R[i * q + j]);
    if (norm <= tiny) return null;
    const alpha = R[j * q + j] > 0 ? -norm : norm;
    const v = new Float64Array(m);
    for (let i = j; i < m; i++) v[i] = R[i * q + j];
    v[j] -= alpha;
    let vv = 0;
    for (let i = j; i < m; i++) vv += v[i] * v[i];
    if (vv === 0) continue;
    for (let col = j; col < q; col++) {
      let s = 0;
      for (let i = j; i < m; i++) s += v[i] * R[i * q + col];
      const f = (2 * s) / vv;
      for (let i = j; i < m; i++) R[i * q + col] -= f * v[i];
    }
    let s = 0;
    for (let i = j; i < m; i++) s += v[i] * c[i];
    const f = (2 * s) / vv;
    for (let i = j; i < m; i++) c[i] -= f * v[i];
  }
  const z = new Float64Array(q);
  for (let j = q - 1; j >= 0; j--) {
    let s = c[j];
    for (let col = j + 1; col < q; col++) s -= R[j * q + col] * z[col];
    z[j] = s / R[j * q + j];
  }
  return z;
}
