// Small dense linear algebra for the correlated-arc computations (n = arcs in a campaign, tens to a
// few hundred; p = 2 parameters): Cholesky factorisation of a symmetric positive definite matrix
// and the solves built on it. Row-major Float64Array throughout.
//
// Cholesky–Banachiewicz (Golub & Van Loan, "Matrix Computations", 4th ed., Alg. 4.2.1): backward
// stable for SPD input, no pivoting needed. A pivot that falls below PIVOT_RELATIVE_FLOOR times
// the largest diagonal entry means the matrix is not numerically positive definite at double
// precision (cond ≳ 1e13); that is reported, never silently regularised.

/** Relative pivot floor: ~ n·ε for n up to a few hundred, with margin (a scaled test, never against 0). */
export const PIVOT_RELATIVE_FLOOR = 1e-13;

export interface CholeskyFactor {
  n: number;
  /** Lower triangle L (row-major n×n) with A = L·Lᵀ; the upper part is zero. */
  L: Float64Array;
}

export type CholeskyOutcome = { ok: true; factor: CholeskyFactor } | { ok: false; reason: string; row: number };

export function cholesky(A: Float64Array, n: number): CholeskyOutcome {
  const L = new Float64Array(n * n);
  let maxDiag = 0;
  for (let i = 0; i < n; i++) maxDiag = Math.max(maxDiag, Math.abs(A[i * n + i]));
  const floor = PIVOT_RELATIVE_FLOOR * maxDiag;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = A[i * n + j];
      for (let k = 0; k < j; k++) s -= L[i * n + k] * L[j * n + k];
      if (i === j) {
        if (!(s > floor)) return { ok: false, reason: `not positive definite: pivot ${s.toExponential(3)} at row ${i} below ${floor.toExponential(3)}`, row: i };
        L[i * n + i] = Math.sqrt(s);
      } else {
        L[i * n + j] = s / L[j * n + j];
      }
    }
  }
  return { ok: true, factor: { n, L } };
}

/** Solve L·x = b (forward substitution) for each of the m columns of B (n×m, row-major); returns a new matrix. */
export function forwardSolve(f: CholeskyFactor, B: Float64Array, m: number): Float64Array {
  const { n, L } = f;
  const X = Float64Array.from(B);
  for (let c = 0; c < m; c++) {
    for (let i = 0; i < n; i++) {
      let s = X[i * m + c];
      for (let k = 0; k < i; k++) s -= L[i * n + k] * X[k * m + c];
      X[i * m + c] = s / L[i * n + i];
    }
  }
  return X;
}

/** Solve Lᵀ·x = b (back substitution) for each column of B. */
export function backSolve(f: CholeskyFactor, B: Float64Array, m: number): Float64Array {
  const { n, L } = f;
  const X = Float64Array.from(B);
  for (let c = 0; c < m; c++) {
    for (let i = n - 1; i >= 0; i--) {
      let s = X[i * m + c];
      for (let k = i + 1; k < n; k++) s -= L[k * n + i] * X[k * m + c];
      X[i * m + c] = s / L[i * n + i];
    }
  }
  return X;
}

/** A⁻¹·B for A = L·Lᵀ. */
export function choleskySolve(f: CholeskyFactor, B: Float64Array, m: number): Float64Array {
  return backSolve(f, forwardSolve(f, B, m), m);
}

/** The inverse of an SPD matrix from its factor (n×n). */
export function choleskyInverse(f: CholeskyFactor): Float64Array {
  const I = new Float64Array(f.n * f.n);
  for (let i = 0; i < f.n; i++) I[i * f.n + i] = 1;
  return choleskySolve(f, I, f.n);
}

/** C = Aᵀ·B for A (n×p) and B (n×q). */
export function transposeTimes(A: Float64Array, B: Float64Array, n: number, p: number, q: number): Float64Array {
  const C = new Float64Array(p * q);
  for (let k = 0; k < n; k++) {
    for (let i = 0; i < p; i++) {
      const a = A[k * p + i];
      if (a === 0) continue;
      for (let j = 0; j < q; j++) C[i * q + j] += a * B[k * q + j];
    }
  }
  return C;
}

/** C = A·B for A (n×p) and B (p×q). */
export function times(A: Float64Array, B: Float64Array, n: number, p: number, q: number): Float64Array {
  const C = new Float64Array(n * q);
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < p; k++) {
      const a = A[i * p + k];
      if (a === 0) continue;
      for (let j = 0; j < q; j++) C[i * q + j] += a * B[k * q + j];
    }
  }
  return C;
}
