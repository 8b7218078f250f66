// Exact minimax (Chebyshev, L∞) fit: minimise max_i √wᵢ |yᵢ − xᵢᵀβ| (weights wᵢ = 1/σᵢ², types.ts).
//
// The optimum levels the error on a reference of p + 1 rows with the signs of a dual-feasible
// basis (Chebyshev's equioscillation theorem on discrete data; for a Haar design such as
// (1, x, x²) on distinct latitudes the signs alternate in x). Method, an active-set form of the
// exchange algorithm (minimax-exchange.ts):
// 1. The active set starts as a systematic sample of MINIMAX_SAMPLE_ROWS rows (plus the previous
//    reference for a warm start); its exact minimax fit comes from the exchange algorithm on
//    those rows only, giving β and the level h, a lower bound on the full optimum (a
//    dual-feasible point of the subset is one of the whole problem).
// 2. One pass over all n rows (minimax-scan.ts) writes the residuals and finds the rows above
//    h; they join the active set, reduced to the worst row per sign in each bin along the
//    latitude axis; the exchange resumes from the current reference.
// 3. When no row exceeds h, the fit is optimal: max|ρ| over all rows equals the level, which is
//    a lower bound (de la Vallée Poussin). The reason states both numbers and their gap.
// Each round costs one pass; on the benchmark data two or three rounds suffice, against one
// pass per single exchange for the plain algorithm.
import { leastSquaresStart } from './least-absolute-subsample.ts';
import { factorLu, inverseFromLu } from './linear-solve.ts';
import { exchangeMinimax, LEVEL_EPS, LEVEL_REL, type CompactRows, type ExchangeStart } from './minimax-exchange.ts';
import { scanRows, VIOLATOR_BINS, type BinAxis } from './minimax-scan.ts';
import { buildFrame, gatherFrameRows, rawCoefficients, type ColumnFrame } from './simplex-frame.ts';
import { assertProblemShape, systematicSample, unsolved, vetWarmStart } from './simplex-problem.ts';
import { designRank } from './simplex-rank.ts';
import { madScaleOfResiduals } from './simplex-residual-scale.ts';
import { defineCachedField } from './cached-field.ts';
import type { FitOptions, FitResult, LinearProblem } from './types.ts';

/** Rows in the first active set (its fit's level is within a few per cent of the optimum's). */
export const MINIMAX_SAMPLE_ROWS = 1024;
/** Passes over the data before giving up (each adds ≥ 1 row, usually 2–3 suffice). */
export const MAX_ROUNDS = 64;
/** Accepted relative gap between max|ρ| over all rows and the dual lower bound (a tenth of the 1e-9 promised). */
export const GAP_TOL = 1e-10;
/** Ulps of the largest whitened reading allowed as absolute gap (rounding of the residual pass). */
export const ROUNDING_ULPS = 16;
/** Rows above h·(1 + this) + rounding count as violators (a few ulps of the residual pass). */
export const VIOLATION_REL = 64 * Number.EPSILON;
/** Exchanges allowed per active-set solve: each raises h; counts on the benchmark are ≲ 30. */
export function exchangeCap(m: number, p: number): number {
  return 100 + 20 * (p + 1) * Math.ceil(Math.log2(m + 2));
}

export function fitMinimax(problem: LinearProblem, options: FitOptions = {}): FitResult {
  assertProblemShape(problem);
  const { n, p } = problem;
  if (n < p + 1) {
    return unsolved('minimax', problem, 'too-few-rows', `minimax needs a reference of p + 1 = ${p + 1} rows, got ${n}`);
  }
  const warm = vetWarmStart(problem, options.warmStart, p + 1);
  const notes: string[] = warm.note ? [warm.note] : [];
  const sample = systematicSample(n, Math.min(n, MINIMAX_SAMPLE_ROWS));
  const base = buildFrame(problem, sample, sample.length, new Float64Array(p));
  const beta0 = warm.coefficients ?? rawCoefficients(base, leastSquaresStart({ ...gather(problem, base, sample), c: new Float64Array(p) }));
  const frame: ColumnFrame = { ...base, betaRef: Float64Array.from(beta0) };
  const axis = leadingAxis(problem, frame, sample);
  let active = union(sample, warm.basis ?? new Int32Array(0));
  let start: ExchangeStart = {};
  if (warm.basis) start = warmReference(problem, beta0, warm.basis, active);

  const residuals = new Float64Array(n);
  let iterations = 0;
  let colSq: Float64Array = new Float64Array(p);
  for (let round = 1; round <= MAX_ROUNDS; round++) {
    const rows = gather(problem, frame, active);
    const ex = exchangeMinimax(rows, start, options.maxIterations ?? exchangeCap(rows.m, p));
    iterations += ex.iterations;
    if (ex.status === 'no-reference' || ex.status === 'singular') {
      const rank = designRank(problem);
      if (rank.deficient) {
        return unsolved('minimax', problem, 'rank-deficient',
          `column ${rank.column} is a combination of the others (scaled QR pivot ${rank.pivots[rank.column].toExponential(2)} ≤ max(n, p)·ε·max pivot = ${rank.threshold.toExponential(2)})`,
          iterations);
      }
      return unsolved('minimax', problem, 'not-converged', `the exchange met a ${ex.status === 'singular' ? 'singular reference' : 'set without a reference'} on a full-rank design`, iterations);
    }
    const beta = rawCoefficients(frame, ex.gamma);
    const level = ex.level;
    // The exchange's own optimality slack (minimax-exchange.ts), so that a row it accepted is
    // not reported again as a violator.
    const threshold = level * (1 + Math.max(VIOLATION_REL, LEVEL_REL)) + LEVEL_EPS * Number.EPSILON * magnitude(rows, ex.gamma);
    const scan = scanRows(problem, beta, threshold, residuals, axis);
    colSq = scan.colSq;
    const refRows = ex.reference.map((k) => active[k]);
    if (scan.violators === 0 || ex.status === 'iteration-cap') {
      return finish(problem, axis, beta, residuals, scan.maxAbs, ex.lambda, ex.signs, refRows, colSq, iterations,
        ex.status === 'iteration-cap' ? 'the exchange stopped at its iteration cap' : `${round} pass${round > 1 ? 'es' : ''} over the ${n} rows, active set ${active.length} rows`, notes);
    }
    const grown = union(active, scan.rows);
    if (grown.length === active.length) {
      // Every violator is already active: the exchange accepted them within its slack.
      return finish(problem, axis, beta, residuals, scan.maxAbs, ex.lambda, ex.signs, refRows, colSq, iterations,
        `${round} passes over the ${n} rows, active set ${active.length} rows`, notes);
    }
    start = { reference: positionsOf(refRows, grown), signs: ex.signs };
    active = grown;
  }
  return unsolved('minimax', problem, 'not-converged', `rows still above the level after ${MAX_ROUNDS} passes`, iterations);
}

function finish(
  problem: LinearProblem, axis: BinAxis, beta: Float64Array, residuals: Float64Array, maxAbs: number, lambda: Float64Array, signs: Int8Array,
  reference: Int32Array, colSq: Float64Array, iterations: number, how: string, notes: string[],
): FitResult {
  const { p, weights } = problem;
  const sw = (i: number): number => (weights ? Math.sqrt(weights[i]) : 1);
  // Dual lower bound on all rows at once: Σλ_kσ_kρ_k(β) ≤ max|ρ(β')| for every β' (λ ≥ 0, Σλ = 1,
  // Σλσa = 0), evaluated on the raw residuals of the reference rows.
  let lower = 0;
  for (let k = 0; k <= p; k++) lower += lambda[k] * signs[k] * sw(reference[k]) * residuals[reference[k]];
  const gap = maxAbs > 0 ? Math.max(0, maxAbs - lower) / maxAbs : 0;
  // A residual yᵢ − xᵢᵀβ carries rounding of a few ulps of |√wᵢ yᵢ|, not of |rᵢ|: on near-exact
  // data (degree lengths ~1e5 with a level of millimetres) the relative gap alone can never close.
  const yScale = maxAbsWhitened(problem.y, weights);
  const roundingSlack = ROUNDING_ULPS * (p + 1) * Number.EPSILON * yScale;
  const converged = gap <= GAP_TOL || maxAbs - lower <= roundingSlack;
  if (!rankProved(problem, reference, colSq)) {
    const rank = designRank(problem);
    if (rank.deficient) {
      return unsolved('minimax', problem, 'rank-deficient',
        `column ${rank.column} is a combination of the others (scaled QR pivot ${rank.pivots[rank.column].toExponential(2)} ≤ max(n, p)·ε·max pivot = ${rank.threshold.toExponential(2)})`,
        iterations);
    }
  }
  // The reference in row order; its signs listed along the latitude axis, where a Haar design alternates.
  const basis = Int32Array.from(reference).sort();
  const along = Array.from(reference.keys()).sort((a, b) => axisValue(problem, axis, reference[a]) - axisValue(problem, axis, reference[b]));
  const signText = along.map((k) => (signs[k] > 0 ? '+' : '−')).join('');
  const notesText = notes.length ? `; ${notes.join('; ')}` : '';
  const reason = converged
    ? `exact: equioscillation at rows ${Array.from(basis).join(', ')} (signs ${signText}) with level ${lower.toPrecision(12)}, ` +
      `a dual lower bound; max |r| over all rows ${maxAbs.toPrecision(12)}, relative gap ${gap.toExponential(1)}; ${how}${notesText}`
    : `not proven optimal: max |r| ${maxAbs.toPrecision(12)} exceeds the dual bound ${lower.toPrecision(12)} by ${gap.toExponential(1)} relative; ${how}${notesText}`;
  const result: FitResult = {
    estimator: 'minimax',
    status: converged ? 'ok' : 'not-converged',
    coefficients: beta,
    residuals,
    objective: maxAbs,
    scale: NaN,
    iterations,
    converged,
    reason,
    basis,
  };
  // The MAD of the residuals is a by-product the minimax answer does not need (two selections
  // over n values, a fifth of the fit at n = 10⁶): computed when first read, as the L1 fit's.
  defineCachedField(result, 'scale', () => madScaleOfResiduals(residuals, weights));
  return result;
}

/** max ᵢ √wᵢ|yᵢ| in four independent chains (one pass; a single chain waits on each max). */
function maxAbsWhitened(y: Float64Array, weights: Float64Array | undefined): number {
  const n = y.length;
  if (weights) {
    let m = 0;
    for (let i = 0; i < n; i++) m = Math.max(m, Math.abs(y[i]) * Math.sqrt(weights[i]));
    return m;
  }
  let m0 = 0;
  let m1 = 0;
  let m2 = 0;
  let m3 = 0;
  const n4 = n - (n % 4);
  for (let i = 0; i < n4; i += 4) {
    m0 = Math.max(m0, Math.abs(y[i]));
    m1 = Math.max(m1, Math.abs(y[i + 1]));
    m2 = Math.max(m2, Math.abs(y[i + 2]));
    m3 = Math.max(m3, Math.abs(y[i + 3]));
  }
  for (let i = n4; i < n; i++) m0 = Math.max(m0, Math.abs(y[i]));
  return Math.max(m0, m1, m2, m3);
}

/**
 * Full rank from the reference: some p of its rows, scaled by the design's column norms, have
 * σ_min ≥ 1/‖(A_B·D)⁻¹‖_F above the layer's QR threshold max(n, p)·ε·√p (as in
 * least-absolute-certificate.ts); otherwise the caller runs the rank test.
 */
function rankProved(problem: LinearProblem, reference: Int32Array, colSq: Float64Array): boolean {
  const { n, p, X, weights } = problem;
  for (let drop = 0; drop <= p; drop++) {
    const AB = new Float64Array(p * p);
    let r = 0;
    for (let k = 0; k <= p; k++) {
      if (k === drop) continue;
      const i = reference[k];
      const s = weights ? Math.sqrt(weights[i]) : 1;
      for (let j = 0; j < p; j++) AB[r * p + j] = s * X[i * p + j];
      r++;
    }
    const f = factorLu(AB, p);
    if (f.singular) continue;
    const inv = inverseFromLu(f);
    let frob = 0;
    for (let j = 0; j < p; j++) for (let k = 0; k < p; k++) frob += (inv[j * p + k] * Math.sqrt(colSq[j])) ** 2;
    if (1 / Math.sqrt(frob) > Math.max(n, p) * Number.EPSILON * Math.sqrt(p)) return true;
  }
  return false;
}

/** Whitened frame rows of the given rows. */
function gather(problem: LinearProblem, frame: ColumnFrame, rows: Int32Array): CompactRows {
  const { p } = problem;
  const m = rows.length;
  const A = new Float64Array(m * p);
  const b = new Float64Array(m);
  gatherFrameRows(problem, frame, rows, m, A, b);
  return { m, p, A, b };
}

/** max|bᵢ| + max|aᵢⱼ|·‖γ‖₁ of compact rows: the scale of the residuals' rounding, as in the exchange. */
function magnitude(rows: CompactRows, gamma: Float64Array): number {
  let bMax = 0;
  let aMax = 0;
  for (let i = 0; i < rows.m; i++) {
    bMax = Math.max(bMax, Math.abs(rows.b[i]));
    for (let j = 0; j < rows.p; j++) aMax = Math.max(aMax, Math.abs(rows.A[i * rows.p + j]));
  }
  let gn = 0;
  for (let j = 0; j < rows.p; j++) gn += Math.abs(gamma[j]);
  return bMax + aMax * gn;
}

/**
 * The binning axis: the frame's first non-intercept column (x̃ = x·L, so the coefficients are a
 * column of L), its range over the sample widened by a bin on each side; rows outside fall in
 * the end bins.
 */
function leadingAxis(problem: LinearProblem, frame: ColumnFrame, sample: Int32Array): BinAxis {
  const { p, X } = problem;
  let lead = 0;
  for (let j = 0; j < p; j++) if (j !== frame.intercept) { lead = j; break; }
  const coef = new Float64Array(p);
  for (let j = 0; j < p; j++) coef[j] = frame.L[j * p + lead];
  let lo = Infinity;
  let hi = -Infinity;
  for (const i of sample) {
    let t = 0;
    for (let j = 0; j < p; j++) t += X[i * p + j] * coef[j];
    lo = Math.min(lo, t);
    hi = Math.max(hi, t);
  }
  const width = hi > lo ? (hi - lo) / (VIOLATOR_BINS - 2) : 1;
  return { coef, lo: lo - width, width };
}

function axisValue(problem: LinearProblem, axis: BinAxis, i: number): number {
  let t = 0;
  for (let j = 0; j < problem.p; j++) t += problem.X[i * problem.p + j] * axis.coef[j];
  return t;
}

/** The previous reference as a start: positions in the active set, signs of the residuals at the warm β. */
function warmReference(problem: LinearProblem, beta: Float64Array, basis: Int32Array, active: Int32Array): ExchangeStart {
  const { p, X, y } = problem;
  const signs = new Int8Array(basis.length);
  for (let k = 0; k < basis.length; k++) {
    const i = basis[k];
    let f = 0;
    for (let j = 0; j < p; j++) f += X[i * p + j] * beta[j];
    signs[k] = y[i] - f >= 0 ? 1 : -1;
  }
  return { reference: positionsOf(basis, active), signs };
}

/** Sorted union of two sorted (or any) index sets, without repeats. */
function union(a: Int32Array, b: Int32Array): Int32Array {
  const out = new Int32Array(a.length + b.length);
  out.set(a);
  out.set(b, a.length);
  out.sort();
  let m = 0;
  for (let k = 0; k < out.length; k++) if (k === 0 || out[k] !== out[m - 1]) out[m++] = out[k];
  return out.slice(0, m);
}

function positionsOf(rows: Int32Array, sorted: Int32Array): Int32Array {
  return rows.map((r) => {
    let lo = 0;
    let hi = sorted.length - 1;
    while (lo <= hi) {
      const mid = (lo + hi) >>> 1;
      if (sorted[mid] < r) lo = mid + 1;
      else if (sorted[mid] > r) hi = mid - 1;
      else return mid;
    }
    return -1;
  });
}

