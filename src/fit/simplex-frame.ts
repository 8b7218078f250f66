// The column frame shared by the two simplex-type exact estimators (least absolute deviations
// and minimax): an exact reparameterisation β = β_ref + L·γ in which the small dense systems are
// well scaled.
//
// Why: degree-length rows are (1, x, x²) with x = sin²φ in [0, 0.88] and y ≈ 1.1e5 m. Raw, the
// columns are nearly collinear (the cosine between 1 and x is ≈ 0.9) and every residual update
// y − xβ cancels about five digits. In the frame, row x becomes x̃ = x·L — every non-intercept
// column centred on its sample mean (relative to the intercept column, so the map is linear and
// valid for every row) and divided by its sample spread — and y becomes the residual of a
// reference fit, y − x·β_ref, which is small. Both maps are exact reparameterisations (x·β =
// x·β_ref + x̃·γ), so optimal bases and objectives are the same in either frame; only rounding
// differs. The final residuals and certificates are always recomputed on the raw rows.
import { dotRow } from './row-forms.ts';
import { InputError } from '../errors.ts';
import type { LinearProblem } from './types.ts';
import { smallFloat64 } from './small-array.ts';

/**
 * A non-intercept column whose sample spread is below this fraction of its magnitude varies only
 * in its last ~12 bits (2⁻⁴⁰ ≈ 9e-13): scaling it to unit spread would blow rounding noise up to
 * O(1), so it keeps its raw magnitude and the rank test decides what it is.
 */
export const CONSTANT_COLUMN_REL = 2 ** -40;

export interface ColumnFrame {
  readonly p: number;
  /** Row-major p×p map of rows: x̃ = x·L (x̃_k = Σ_j x_j L[j·p + k]); coefficients β = β_ref + L·γ. */
  readonly L: Float64Array;
  readonly betaRef: Float64Array;
  /** Column whose sample entries are all equal and non-zero (the intercept), or −1. */
  readonly intercept: number;
}

/**
 * Builds the frame from the rows `rows[0..count)` of the problem (a sample; any rows give an
 * exact reparameterisation, representative rows give a well-scaled one).
 */
export function buildFrame(problem: LinearProblem, rows: Int32Array, count: number, betaRef: ArrayLike<number>): ColumnFrame {
  const { p, X } = problem;
  const first = rows[0] * p;
  let intercept = -1;
  for (let j = 0; j < p && intercept < 0; j++) {
    const v = X[first + j];
    if (v === 0) continue;
    let constant = true;
    for (let r = 1; r < count && constant; r++) constant = X[rows[r] * p + j] === v;
    if (constant) intercept = j;
  }
  const L = smallFloat64(p * p);
  for (let j = 0; j < p; j++) {
    if (j === intercept) continue;
    // Shifted by the first row's value, so a column constant on the sample centres to exact zeros.
    const x0 = X[first + j];
    let sum = 0;
    let magnitude = 0;
    for (let r = 0; r < count; r++) {
      const x = X[rows[r] * p + j];
      sum += x - x0;
      magnitude = Math.max(magnitude, Math.abs(x));
    }
    const mean = intercept >= 0 ? x0 + sum / count : 0;
    let sq = 0;
    for (let r = 0; r < count; r++) {
      const d = X[rows[r] * p + j] - mean;
      sq += d * d;
    }
    const spread = Math.sqrt(sq / count);
    const scale = spread > CONSTANT_COLUMN_REL * magnitude ? spread : magnitude > 0 ? magnitude : 1;
    L[j * p + j] = 1 / scale;
    if (intercept >= 0) L[intercept * p + j] = -mean / (X[first + intercept] * scale);
  }
  if (intercept >= 0) L[intercept * p + intercept] = 1 / X[first + intercept];
  return { p, L, betaRef: Float64Array.from(betaRef), intercept };
}

/** β = β_ref + L·γ. */
export function rawCoefficients(frame: ColumnFrame, gamma: ArrayLike<number>, out = new Float64Array(frame.p)): Float64Array {
  const { p, L, betaRef } = frame;
  for (let j = 0; j < p; j++) {
    let s = 0;
    for (let k = 0; k < p; k++) s += L[j * p + k] * gamma[k];
    out[j] = betaRef[j] + s;
  }
  return out;
}

/** γ with β = β_ref + L·γ for a given raw β (solves the triangular-by-construction L by LU-free substitution via the inverse map). */
export function frameCoefficients(frame: ColumnFrame, beta: ArrayLike<number>, out = new Float64Array(frame.p)): Float64Array {
  const { p, L, betaRef, intercept } = frame;
  // L is diagonal except for the intercept row, so L·γ = δ solves column by column.
  const delta = new Float64Array(p);
  for (let j = 0; j < p; j++) delta[j] = beta[j] - betaRef[j];
  for (let k = 0; k < p; k++) if (k !== intercept) out[k] = delta[k] / L[k * p + k];
  if (intercept >= 0) {
    let s = delta[intercept];
    for (let k = 0; k < p; k++) if (k !== intercept) s -= L[intercept * p + k] * out[k];
    out[intercept] = s / L[intercept * p + intercept];
  }
  return out;
}

/** A raw row-space vector g (e.g. Σ ±aᵢ) in the frame: Lᵀg. */
export function frameVector(frame: ColumnFrame, g: ArrayLike<number>, out = new Float64Array(frame.p)): Float64Array {
  const { p, L } = frame;
  for (let k = 0; k < p; k++) {
    let s = 0;
    for (let j = 0; j < p; j++) s += g[j] * L[j * p + k];
    out[k] = s;
  }
  return out;
}

/**
 * Whitened frame rows ãᵢ = √wᵢ·xᵢL and b̃ᵢ = √wᵢ(yᵢ − xᵢβ_ref) of rows[0..count) into A (count×p)
 * and b. Throws InputError naming the element when a value is not finite or a weight not > 0.
 */
export function gatherFrameRows(
  problem: LinearProblem, frame: ColumnFrame, rows: Int32Array, count: number, A: Float64Array, b: Float64Array,
): void {
  const { p, X, y, weights } = problem;
  const { L, betaRef } = frame;
  // L's columns as vectors, so each entry of xᵢL is one written-out dot product (row-forms.ts).
  const columns: Float64Array[] = [];
  for (let k = 0; k < p; k++) {
    const c = new Float64Array(p);
    for (let j = 0; j < p; j++) c[j] = L[j * p + k];
    columns.push(c);
  }
  for (let r = 0; r < count; r++) {
    const i = rows[r];
    const o = i * p;
    let s = 1;
    if (weights) {
      const w = weights[i];
      if (!(w > 0 && w < Infinity)) throw new InputError(`weights[${i}]`, w, 'weights are 1/σ² and must be finite and > 0');
      s = Math.sqrt(w);
    }
    const bi = s * (y[i] - dotRow(X, o, betaRef, p));
    if (!Number.isFinite(bi)) throw nonFiniteRow(problem, i);
    b[r] = bi;
    for (let k = 0; k < p; k++) A[r * p + k] = s * dotRow(X, o, columns[k], p);
  }
}

/** The InputError for row i, naming its first non-finite element (or its weight). */
export function nonFiniteRow(problem: LinearProblem, i: number): InputError {
  const { p, X, y, weights } = problem;
  for (let j = 0; j < p; j++) {
    const v = X[i * p + j];
    if (!Number.isFinite(v)) return new InputError(`X[${i}, ${j}]`, v, 'design values must be finite');
  }
  if (!Number.isFinite(y[i])) return new InputError(`y[${i}]`, y[i], 'readings must be finite');
  if (weights) {
    const w = weights[i];
    if (!(w > 0 && w < Infinity)) return new InputError(`weights[${i}]`, w, 'weights are 1/σ² and must be finite and > 0');
  }
  return new InputError(`y[${i}]`, y[i], 'the residual of this row overflows: the readings or design values are too large to fit');
}
