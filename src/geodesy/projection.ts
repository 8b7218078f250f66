// Weighted least-squares projection of x^power on the basis [1, x, …, x^(size−1)] over given
// abscissae: the part of an omitted power that a linear fit on that basis absorbs into its
// coefficients (used by the second-order degree-coefficient inversion).
//
// Solved by Householder QR of the √w-scaled design, not normal equations: for a narrow latitude
// span the columns 1, x, x² are nearly parallel and forming XᵀX would square the condition number
// (Golub & Van Loan, "Matrix Computations", §5.3). Rank is judged against RANK_TOLERANCE times the
// column norm, never against an exact zero.
import { InputError } from '../errors.ts';

/** A column whose remaining norm after orthogonalisation is below this fraction of its original is dependent. */
export const RANK_TOLERANCE = 1e-10;

/** Coefficients p with x^power ≈ Σ_j p_j x^j (j < size) in weighted least squares over xs. */
export function projectPowerOnBasis(xs: readonly number[], power: number, size: number, weights?: readonly number[]): number[] {
  if (weights !== undefined && weights.length !== xs.length) {
    throw new InputError('weights', weights.length, `there must be one weight per latitude (${xs.length})`);
  }
  const rows = xs.length;
  const sqrtW = xs.map((_, i) => {
    const w = weights === undefined ? 1 : weights[i];
    if (typeof w !== 'number' || !Number.isFinite(w) || w <= 0) {
      throw new InputError(`weights[${i}]`, w, 'a weight must be a finite number above 0');
    }
    return Math.sqrt(w);
  });
  // Columns of the scaled design, and the scaled right-hand side.
  const cols: number[][] = [];
  for (let j = 0; j < size; j++) cols.push(xs.map((x, i) => sqrtW[i] * x ** j));
  const cols0 = cols.map((col) => col.slice());
  const rhs = xs.map((x, i) => sqrtW[i] * x ** power);
  const r: number[][] = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let j = 0; j < size; j++) {
    const col = cols[j];
    const originalNorm = norm2(cols0[j]);
    let norm = 0;
    for (let i = j; i < rows; i++) norm = Math.hypot(norm, col[i]);
    if (rows <= j || norm <= RANK_TOLERANCE * originalNorm) {
      throw new InputError('latitudesDeg', xs.length,
        `the fitted latitudes must include at least ${size} distinct values of sin²φ to separate the ${size} model terms`);
    }
    const alpha = col[j] > 0 ? -norm : norm;
    // Householder vector v = col[j:] − alpha·e₁, applied to the later columns and the rhs.
    const v = col.slice(j);
    v[0] -= alpha;
    const vv = v.reduce((s, t) => s + t * t, 0);
    const apply = (target: number[]): void => {
      let dot = 0;
      for (let i = j; i < rows; i++) dot += v[i - j] * target[i];
      const scale = (2 * dot) / vv;
      for (let i = j; i < rows; i++) target[i] -= scale * v[i - j];
    };
    for (let l = j + 1; l < size; l++) apply(cols[l]);
    apply(rhs);
    r[j][j] = alpha;
    for (let l = j + 1; l < size; l++) r[j][l] = cols[l][j];
  }
  const p = new Array<number>(size).fill(0);
  for (let j = size - 1; j >= 0; j--) {
    let s = rhs[j];
    for (let l = j + 1; l < size; l++) s -= r[j][l] * p[l];
    p[j] = s / r[j][j];
  }
  return p;
}

function norm2(v: readonly number[]): number {
  let norm = 0;
  for (const t of v) norm = Math.hypot(norm, t);
  return norm;
}
