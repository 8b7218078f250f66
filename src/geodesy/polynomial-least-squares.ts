// Weighted least squares in the monomial basis [1, x, …, x^(size−1)] over given abscissae — the
// small fits the degree-coefficient inversions need to see a model the way the campaign fit sees it:
// the projection of an omitted power x^P (second-order inversion), and the coefficients a fit would
// return for exact arcs (inversion by arcs).
//
// Solved by Householder QR of the √w-scaled design, not normal equations: for a narrow latitude
// span the columns 1, x, x² are nearly parallel and forming XᵀX would square the condition number
// (Golub & Van Loan, "Matrix Computations", §5.3). Rank is judged against RANK_TOLERANCE times the
// column norm, never against an exact zero.
import { InputError } from '../errors.ts';

/** A column whose remaining norm after orthogonalisation is below this fraction of its original is dependent. */
export const RANK_TOLERANCE = 1e-10;

function norm2(v: readonly number[]): number {
  let norm = 0;
  for (const t of v) norm = Math.hypot(norm, t);
  return norm;
}

function sqrtWeights(count: number, weights: readonly number[] | undefined): number[] {
  if (weights !== undefined && weights.length !== count) {
    throw new InputError('weights', weights.length, `there must be one weight per row (${count})`);
  }
  return Array.from({ length: count }, (_, i) => {
    const w = weights === undefined ? 1 : weights[i];
    if (typeof w !== 'number' || !Number.isFinite(w) || w <= 0) {
      throw new InputError(`weights[${i}]`, w, 'a weight must be a finite number above 0');
    }
    return Math.sqrt(w);
  });
}

/** Coefficients β (length `size`) minimising Σ wᵢ (yᵢ − Σ_j β_j xᵢ^j)². */
export function fitPolynomialInX(xs: readonly number[], ys: readonly number[], size: number, weights?: readonly number[],
  field = 'latitudesDeg'): number[] {
  const rows = xs.length;
  if (ys.length !== rows) throw new InputError('ys', ys.length, `there must be one value per abscissa (${rows})`);
  const sw = sqrtWeights(rows, weights);
  const cols: number[][] = [];
  for (let j = 0; j < size; j++) cols.push(xs.map((x, i) => sw[i] * x ** j));
  const originalNorms = cols.map(norm2);
  const rhs = ys.map((y, i) => sw[i] * y);
  const r: number[][] = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let j = 0; j < size; j++) {
    const col = cols[j];
    let norm = 0;
    for (let i = j; i < rows; i++) norm = Math.hypot(norm, col[i]);
    if (rows <= j || norm <= RANK_TOLERANCE * originalNorms[j]) {
      throw new InputError(field, rows,
        `the fitted latitudes must include at least ${size} distinct values of sin²φ to separate the ${size} model terms`);
    }
    const alpha = col[j] > 0 ? -norm : norm;
    // Householder vector v = col[j:] − alpha·e₁, applied to the later columns and the rhs.
    const v = col.slice(j);
    v[0] -= alpha;
    let vv = 0;
    for (const t of v) vv += t * t;
    const reflect = (target: number[]): void => {
      let dot = 0;
      for (let i = j; i < rows; i++) dot += v[i - j] * target[i];
      const scale = (2 * dot) / vv;
      for (let i = j; i < rows; i++) target[i] -= scale * v[i - j];
    };
    for (let l = j + 1; l < size; l++) reflect(cols[l]);
    reflect(rhs);
    r[j][j] = alpha;
    for (let l = j + 1; l < size; l++) r[j][l] = cols[l][j];
  }
  const beta = new Array<number>(size).fill(0);
  for (let j = size - 1; j >= 0; j--) {
    let s = rhs[j];
    for (let l = j + 1; l < size; l++) s -= r[j][l] * beta[l];
    beta[j] = s / r[j][j];
  }
  return beta;
}

/** Coefficients p with x^power ≈ Σ_j p_j x^j (j < size) in weighted least squares over xs. */
export function projectPowerOnBasis(xs: readonly number[], power: number, size: number, weights?: readonly number[]): number[] {
  return fitPolynomialInX(xs, xs.map((x) => x ** power), size, weights);
}
