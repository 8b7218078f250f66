// A fit session: the fitting layer's answer to "refit after one more reading" (bench issue 5).
//
// Why a session and not a warm start: a warm start is a hint about data the fitter has never
// seen, so the fitter must re-verify it against all n rows (types.ts). A session OWNS its rows
// (copied into growable typed arrays, changed only by `append`), so it knows exactly which rows
// every earlier fit saw and which are new; what it proved about the first n rows stays proved.
// Per estimator (each returns the answer of the plain fitter on the same rows):
// - least squares: the centred, scaled normal-equation sums of weighted-normal.ts are kept,
//   taken about a base β₀ (G = Σ w zzᵀ, b = Σ w z r₀, S = Σ w r₀², r₀ = y − Xβ₀); a new row adds
//   its terms, O(p²) per row. See `NormalSums` (fit-session-sums.ts) for why this is as accurate as the cold route.
// - minimax: a new row with √w|r| within the last exact level h leaves β optimal (below).
// - least absolute deviations: the last vertex is tested against the new rows by the dual
//   condition of least-absolute-certificate.ts, from a side sum g kept over the old rows
//   (fit-session-vertex.ts); O(p) per new row and one p×p solve. If the vertex fails, the plain
//   fitter warm-started from it.
// - Huber, Tukey: the cold recipe from the session's parts — its exact L1 fit (kept vertex or
//   warm refit), that fit's MAD scale (fit-session-scale.ts: from a sorted residual reference,
//   O(log n) plus the rows near the medians), and IRLS at that scale from the previous answer. Huber first
//   tries its kept partition sums (fit-session-huber.ts): exact with no pass over the data when
//   the readings near ±k keep their sides and a bound proves the others do.
// Results of the session's own paths compute their n-sized outputs (residuals, the minimax MAD
// scale) when first read (cached-field.ts), from the rows the fit saw.
import { InputError } from '../errors.ts';
import { defineCachedField } from './cached-field.ts';
import { fitHuber, HUBER_K, huberRho } from './huber.ts';
import { buildHuberKept, refitHuberKept, type HuberKept } from './fit-session-huber.ts';
import { fitLeastAbsoluteWithSides } from './least-absolute.ts';
import { fitLeastSquares, NORMAL_MIN_PIVOT } from './least-squares.ts';
import { fitMinimax, ROUNDING_ULPS, VIOLATION_REL } from './minimax.ts';
import { residualsOf, validateProblem } from './problem.ts';
import { madScaleOfResiduals } from './simplex-residual-scale.ts';
import { buildSums, cloneSums, foldRows, restoreSums, SUMS_REBUILD_GROWTH, sumsResult, type NormalSums } from './fit-session-sums.ts';
import { dualTest, extendVertex, vertexKept, vertexState, type L1Vertex } from './fit-session-vertex.ts';
import { madFromReference, madOfSorted, SCALE_REFERENCE_MAX_ADDED, SCALE_REFERENCE_MAX_ROWS, sortResiduals, type SortedResiduals } from './fit-session-scale.ts';
import { emptyBounds, reachBetween, widenBounds, type RowBounds } from './fit-session-bounds.ts';
import { refitFromReference } from './fit-session-l1-refit.ts';
import { fitTukey, TUKEY_C, tukeyRho } from './tukey.ts';
import { buildTukeyKept, refitTukeyKept, type TukeyKept } from './fit-session-tukey.ts';
import { ESTIMATORS, type Estimator, type FitOptions, type FitResult, type LinearProblem } from './types.ts';
import { factorNormal } from './weighted-normal.ts';

export { SUMS_REBUILD_GROWTH } from './fit-session-sums.ts';

/** One new reading: a design row of p values, the reading and optionally its weight 1/σ² (default 1). */
export interface SessionRow {
  x: ArrayLike<number>;
  y: number;
  weight?: number;
}

export interface FitSession {
  readonly n: number;
  readonly p: number;
  /** The current rows as a LinearProblem (views into the session's arrays: read, do not write). */
  readonly problem: LinearProblem;
  /** Validates every row first (InputError naming the field and value; nothing appended on error), then appends. */
  append(rows: readonly SessionRow[]): void;
  /** Same result contract as the plain fitters on `problem`. */
  fit(estimator: Estimator, options?: FitOptions): FitResult;
  /** Remembers the rows and every fit state now (one checkpoint per session; a new one replaces it). */
  checkpoint(): void;
  /** Back to the checkpoint: rows appended since are dropped, fit states are those of the checkpoint. */
  rollback(): void;
}

interface Kept {
  result: FitResult;
  /** Rows the result was computed on. */
  n: number;
  /** Minimax: the level of the last exact solve, the reference for the new-row test. */
  level?: number;
  /** Least absolute deviations: the vertex's dual state over the result's rows. */
  vertex?: L1Vertex;
  /** Least absolute deviations: a sorted residual reference for the M-estimators' scale (fit-session-scale.ts). */
  sorted?: SortedResiduals;
  /** Huber: the partition sums of its exact answer (fit-session-huber.ts). */
  huber?: HuberKept;
  /** Tukey: the moments of its inside set (fit-session-tukey.ts). */
  tukey?: TukeyKept;
}

interface Checkpoint {
  n: number;
  weighted: boolean;
  sums: NormalSums | null;
  kept: Map<Estimator, Kept>;
}

const INITIAL_CAPACITY = 64;

export function createFitSession(problem: LinearProblem): FitSession {
  validateProblem(problem);
  return new Session(problem);
}

class Session implements FitSession {
  readonly p: number;
  private rows: number;
  private X: Float64Array;
  private y: Float64Array;
  private w: Float64Array | null;
  private weighted: boolean;
  private sums: NormalSums | null = null;
  private kept = new Map<Estimator, Kept>();
  private saved: Checkpoint | null = null;
  /** Bounds over every row ever appended (a superset after a rollback, still a bound): max |xᵢⱼ| per column, max √wᵢ, max |yᵢ|. */
  private readonly bounds: RowBounds;

  constructor(problem: LinearProblem) {
    const { n, p } = problem;
    this.p = p;
    this.rows = n;
    const cap = Math.max(INITIAL_CAPACITY, n);
    this.X = new Float64Array(cap * p);
    this.X.set(problem.X);
    this.y = new Float64Array(cap);
    this.y.set(problem.y);
    this.weighted = problem.weights !== undefined;
    this.w = null;
    if (problem.weights) {
      this.w = new Float64Array(cap);
      this.w.set(problem.weights);
    }
    this.bounds = emptyBounds(p);
    widenBounds(this.bounds, this.problem, 0);
  }

  get n(): number {
    return this.rows;
  }

  get problem(): LinearProblem {
    const { rows: n, p } = this;
    const view: LinearProblem = { n, p, X: this.X.subarray(0, n * p), y: this.y.subarray(0, n) };
    if (this.weighted && this.w) view.weights = this.w.subarray(0, n);
    return view;
  }

  append(rows: readonly SessionRow[]): void {
    const { p } = this;
    // Tested on an `unknown` alias: Array.isArray narrows its own argument to any[], so `rows` keeps its type.
    const given: unknown = rows;
    if (!Array.isArray(given)) throw new InputError('rows', given, 'must be an array of { x, y, weight? }');
    rows.forEach((row, k) => checkRow(row, k, p));
    if (rows.length === 0) return;
    const n = this.rows + rows.length;
    this.reserve(n);
    const anyWeight = rows.some((r) => r.weight !== undefined);
    if (anyWeight && !this.weighted) {
      // Rows so far had the implicit weight 1.
      if (!this.w) this.w = new Float64Array(this.y.length);
      this.w.fill(1, 0, this.rows);
      this.weighted = true;
    }
    let i = this.rows;
    for (const row of rows) {
      for (let j = 0; j < p; j++) this.X[i * p + j] = row.x[j];
      this.y[i] = row.y;
      if (this.weighted && this.w) this.w[i] = row.weight ?? 1;
      i++;
    }
    const from = this.rows;
    this.rows = n;
    widenBounds(this.bounds, this.problem, from);
  }

  fit(estimator: Estimator, options: FitOptions = {}): FitResult {
    if (!(ESTIMATORS as readonly string[]).includes(estimator)) {
      throw new InputError('estimator', estimator, `must be one of ${ESTIMATORS.join(', ')}`);
    }
    const problem = this.problem;
    const prev = this.kept.get(estimator);
    let kept: Kept;
    if (estimator === 'least-squares') kept = { result: this.leastSquares(problem), n: problem.n };
    else if (estimator === 'minimax') kept = this.minimax(problem, prev, options);
    else if (estimator === 'least-absolute') kept = leastAbsolute(problem, prev, options, this.bounds);
    else kept = this.mEstimate(estimator, problem, prev, options);
    this.kept.set(estimator, kept);
    return kept.result;
  }

  checkpoint(): void {
    this.saved = { n: this.rows, weighted: this.weighted, sums: this.sums && cloneSums(this.sums), kept: new Map(this.kept) };
  }

  rollback(): void {
    const cp = this.saved;
    if (!cp) throw new InputError('checkpoint', undefined, 'rollback needs a checkpoint() first');
    // Rows before cp.n were never written since (appends only write past the row count).
    this.rows = cp.n;
    this.weighted = cp.weighted;
    this.sums = cp.sums && restoreSums(this.sums, cp.sums);
    this.kept = new Map(cp.kept);
  }

  private reserve(n: number): void {
    if (n <= this.y.length) return;
    const cap = Math.max(n, Math.ceil(this.y.length * 1.5));
    const X = new Float64Array(cap * this.p);
    X.set(this.X.subarray(0, this.rows * this.p));
    const y = new Float64Array(cap);
    y.set(this.y.subarray(0, this.rows));
    // Results already returned keep views of the old arrays, whose first rows never change.
    this.X = X;
    this.y = y;
    if (this.w) {
      const w = new Float64Array(cap);
      w.set(this.w.subarray(0, this.rows));
      this.w = w;
    }
  }

  private leastSquares(problem: LinearProblem): FitResult {
    const { n, p } = problem;
    if (n < p) return fitLeastSquares(problem);
    let sums = this.sums;
    if (sums && (sums.rows - sums.baseRows > SUMS_REBUILD_GROWTH * sums.baseRows || !foldRows(sums, problem))) sums = null;
    const rebuilt = sums === null;
    sums ??= buildSums(problem);
    const ratio = sums ? factorNormal(sums.ws) : 0;
    if (!sums || !(ratio >= NORMAL_MIN_PIVOT)) {
      // Conditioning beyond the normal route's guard (or rank deficiency): QR decides, as cold.
      this.sums = null;
      return fitLeastSquares(problem);
    }
    this.sums = sums;
    return sumsResult(problem, sums, ratio, rebuilt);
  }

  /**
   * Huber, Tukey: the cold fitter's recipe with the session's parts. The exact L1 fit of these
   * rows comes from the session (its vertex kept when still optimal), its MAD scale from the
   * session's sorted residual reference (fit-session-scale.ts), and IRLS at that
   * fixed scale starts from this estimator's previous answer (Newton at once, irls.ts). Huber's ρ
   * is convex, so the start does not change its fixed-scale optimum; Tukey's is not, and a start
   * one reading away from the answer is at least as close to the cold fit's basin as the L1 start.
   * A caller's own warm start or scale, a failed L1 fit or a zero scale: the plain fitter decides.
   */
  private mEstimate(estimator: 'huber' | 'tukey', problem: LinearProblem, prev: Kept | undefined, options: FitOptions): Kept {
    const { n } = problem;
    const plain = (): Kept => ({ result: warmFit(estimator, problem, prev?.result, options), n });
    if (options.warmStart || options.scale !== undefined || n < problem.p) return plain();
    const l1Prev = this.kept.get('least-absolute');
    const l1 = leastAbsolute(problem, l1Prev, {}, this.bounds);
    this.kept.set('least-absolute', l1);
    if (l1.result.status !== 'ok') return plain();
    const { scale, how } = sessionScale(problem, l1, l1Prev, this.bounds);
    if (!(scale > 0) || !Number.isFinite(scale)) return plain();
    const note = (result: FitResult, start: string): void => {
      result.reason += `; fit session: ${start}, the scale the MAD of its exact L1 fit of these ${n} rows (${how})`;
    };
    if (estimator === 'huber' && prev?.huber && (options.tuning ?? HUBER_K) === prev.huber.k) {
      const kept = refitHuberKept(problem, prev.huber, scale, huberRho(prev.huber.k), l1.result.basis);
      if (kept) {
        note(kept.result, 'the partition kept from the previous huber fit');
        return { result: kept.result, n, huber: kept.kept };
      }
    }
    if (estimator === 'tukey' && prev?.tukey && (options.tuning ?? TUKEY_C) === prev.tukey.c) {
      const kept = refitTukeyKept(problem, prev.tukey, scale, tukeyRho(prev.tukey.c), l1.result.basis);
      if (kept) {
        note(kept.result, 'the inside set and moments kept from the previous tukey fit');
        return { result: kept.result, n, tukey: kept.kept };
      }
    }
    const start = prev && prev.result.status === 'ok' ? prev.result.coefficients : l1.result.coefficients;
    const fitOptions: FitOptions = { ...options, scale, warmStart: { coefficients: start } };
    const result = estimator === 'huber' ? fitHuber(problem, fitOptions) : fitTukey(problem, fitOptions);
    if (l1.result.basis) result.basis = l1.result.basis;
    note(result, `the start is ${start === l1.result.coefficients ? 'its exact L1 fit' : `the previous ${estimator} fit`}`);
    // The plain answer becomes the base of the kept sums or moments (one pass over the rows).
    const done = result.status === 'ok' && result.converged;
    if (done && estimator === 'huber') return { result, n, huber: buildHuberKept(problem, result.coefficients, scale, options.tuning ?? HUBER_K) };
    const tukey = done && estimator === 'tukey' ? buildTukeyKept(problem, result.coefficients, scale, options.tuning ?? TUKEY_C) : null;
    return tukey ? { result, n, tukey } : { result, n };
  }

  private minimax(problem: LinearProblem, prev: Kept | undefined, options: FitOptions): Kept {
    const { n, p, X, y, weights } = problem;
    if (prev && prev.level !== undefined && prev.result.status === 'ok' && prev.result.basis && prev.n <= n) {
      // β attains max √w|r| ≤ h' over all rows; the optimum over a superset of rows is ≥ the
      // subset's optimum, ≥ its dual bound (within the cold fit's gap of h): so β is optimal to
      // the cold fit's own tolerance. The test is against the last EXACT level, so a chain of
      // accepted rows never drifts by more than one tolerance.
      const beta = prev.result.coefficients;
      const h = prev.level;
      let worst = prev.result.objective;
      let fits = true;
      for (let i = prev.n; i < n && fits; i++) {
        let f = 0;
        for (let j = 0; j < p; j++) f += X[i * p + j] * beta[j];
        const sw = weights ? Math.sqrt(weights[i]) : 1;
        const a = sw * Math.abs(y[i] - f);
        fits = a <= h * (1 + VIOLATION_REL) + ROUNDING_ULPS * (p + 1) * Number.EPSILON * Math.abs(sw * y[i]);
        worst = Math.max(worst, a);
      }
      if (fits) return { result: minimaxKept(problem, prev.result, worst, n - prev.n), n, level: h };
    }
    const warmStart: NonNullable<FitOptions['warmStart']> | undefined = prev && { coefficients: prev.result.coefficients };
    if (warmStart && prev?.result.basis) warmStart.basis = prev.result.basis;
    const result = fitMinimax(problem, { ...options, warmStart: options.warmStart ?? warmStart });
    return { result, n, level: result.status === 'ok' ? result.objective : undefined };
  }
}

function checkRow(row: SessionRow, k: number, p: number): void {
  if (typeof row !== 'object' || row === null) throw new InputError(`rows[${k}]`, row, 'must be { x, y, weight? }');
  const { x, y, weight } = row;
  if (x === null || typeof x !== 'object' || typeof x.length !== 'number') throw new InputError(`rows[${k}].x`, x, `must be ${p} numbers`);
  if (x.length !== p) throw new InputError(`rows[${k}].x`, x.length, `has ${x.length} values, the session's rows have ${p}`);
  for (let j = 0; j < p; j++) {
    if (typeof x[j] !== 'number' || !Number.isFinite(x[j])) throw new InputError(`rows[${k}].x[${j}]`, x[j], 'design values must be finite numbers');
  }
  if (typeof y !== 'number' || !Number.isFinite(y)) throw new InputError(`rows[${k}].y`, y, 'readings must be finite numbers');
  if (weight !== undefined && (typeof weight !== 'number' || !Number.isFinite(weight) || weight <= 0)) {
    throw new InputError(`rows[${k}].weight`, weight, 'weights are 1/σ² and must be finite and > 0');
  }
}

/**
 * L1: the kept vertex when the new rows leave it optimal; else the refit from the sorted
 * reference (fit-session-l1-refit.ts: only the rows near the fit solved, no pass); else the warm
 * plain fitter, and a new vertex state from its answer. The reference is (re)built after a plain
 * fit when there is none or it is stale (an O(n log n) sort, once per SCALE_REFERENCE_MAX_ADDED rows).
 */
function leastAbsolute(problem: LinearProblem, prev: Kept | undefined, options: FitOptions, bounds: RowBounds): Kept {
  const { n } = problem;
  const v = prev?.vertex;
  let refFailed = false;
  if (prev && v && prev.n <= n && !options.warmStart) {
    const next = extendVertex(v, problem, prev.n);
    const test = dualTest(next, n);
    if (test.ok) return withReference({ result: vertexKept(problem, prev.result, next, test.maxDual, n - prev.n), n, vertex: next }, prev);
    const ref = prev.sorted;
    if (ref && ref.rows <= n && n - ref.rows <= SCALE_REFERENCE_MAX_ADDED && prev.result.status === 'ok') {
      const refit = refitFromReference(problem, prev.result, ref, bounds, options.maxIterations);
      if (refit) return withReference({ result: refit.result, n, vertex: refit.vertex }, prev);
      refFailed = true;
    }
  }
  // The fitter hands back its vertex's side sum when its band proof holds: no pass to rebuild g.
  const { result, sides } = fitLeastAbsoluteWithSides(problem, { ...options, warmStart: options.warmStart ?? l1WarmStart(prev?.result) });
  const vertex = result.status === 'ok' && result.basis ? vertexState(problem, result.coefficients, result.basis, sides) : undefined;
  const kept = withReference(vertex ? { result, n, vertex } : { result, n }, prev);
  // A failed refit from the reference: usually the fit has moved far from β_ref, re-sort at the new fit.
  const stale = refFailed || !kept.sorted || n - kept.sorted.rows > SCALE_REFERENCE_MAX_ADDED || kept.sorted.rows > n;
  if (stale && result.status === 'ok' && n <= SCALE_REFERENCE_MAX_ROWS) kept.sorted = sortResiduals(problem, result.coefficients);
  return kept;
}

/** The sorted residual reference stays valid for any β (its reach grows with the distance): carried on. */
function withReference(kept: Kept, prev: Kept | undefined): Kept {
  if (prev?.sorted) kept.sorted = prev.sorted;
  return kept;
}

/**
 * The L1 fit's MAD scale over all rows, from the sorted reference the session keeps
 * (fit-session-scale.ts): residuals of its rows at β_ref, each having moved by at most
 * the reach of β − β_ref since (0 while the vertex holds: the smaller of the box of its rows in
 * the reference's whitening frame and √w_max·Σⱼ max|xⱼ|·|βⱼ − β_refⱼ|), plus rounding (fit-session-bounds.ts). Without a usable reference a new one is sorted (O(n log n), not above
 * SCALE_REFERENCE_MAX_ROWS); beyond that the L1 result's own scale, a selection.
 */
function sessionScale(problem: LinearProblem, l1: Kept, l1Prev: Kept | undefined, bounds: RowBounds): { scale: number; how: string } {
  const beta = l1.result.coefficients;
  const ref = l1.sorted ?? l1Prev?.sorted;
  if (ref && ref.rows <= problem.n) {
    const reach = reachBetween(bounds, beta, ref.beta, ref.frame);
    const scale = madFromReference(problem, beta, ref, reach);
    if (scale !== null) {
      l1.sorted = ref;
      return { scale, how: `from its reference of ${ref.rows} sorted residuals, ${problem.n - ref.rows} rows since, windows ±${reach.toPrecision(2)}` };
    }
  }
  if (problem.n <= SCALE_REFERENCE_MAX_ROWS) {
    l1.sorted = sortResiduals(problem, beta);
    return { scale: madOfSorted(l1.sorted.values), how: 'its residuals sorted as the reference for later refits' };
  }
  return { scale: l1.result.scale, how: 'by selection' };
}

/** The previous L1 answer as a warm start (coefficients and vertex). */
function l1WarmStart(prev: FitResult | undefined): FitOptions['warmStart'] {
  if (!prev || prev.status !== 'ok') return undefined;
  return prev.basis ? { coefficients: prev.coefficients, basis: prev.basis } : { coefficients: prev.coefficients };
}

/** The plain Huber/Tukey fitter, warm-started from this estimator's previous session result (a start only). */
function warmFit(estimator: 'huber' | 'tukey', problem: LinearProblem, prev: FitResult | undefined, options: FitOptions): FitResult {
  let warmStart = options.warmStart;
  if (!warmStart && prev && prev.status === 'ok') {
    warmStart = { coefficients: prev.coefficients };
    // A scale without the L1 vertex would be HELD (irls.ts); with the vertex the refit re-derives
    // the start and its MAD on the new rows, i.e. the cold answer.
    if (prev.basis) {
      warmStart.basis = prev.basis;
      warmStart.scale = prev.scale;
    }
  }
  const opts = { ...options, warmStart };
  return estimator === 'huber' ? fitHuber(problem, opts) : fitTukey(problem, opts);
}

function minimaxKept(problem: LinearProblem, prev: FitResult, worst: number, added: number): FitResult {
  const beta = Float64Array.from(prev.coefficients);
  const basis = Int32Array.from(prev.basis ?? []);
  const result: FitResult = {
    estimator: 'minimax',
    status: 'ok',
    coefficients: beta,
    residuals: new Float64Array(0),
    objective: worst,
    scale: NaN,
    iterations: 0,
    converged: true,
    reason: `exact: the previous optimum (reference rows ${Array.from(basis).join(', ')}) holds; the ${added} row${added === 1 ? '' : 's'} ` +
      `added since lie within its level, so max |r| over all ${problem.n} rows is ${worst.toPrecision(12)} (fit session)`,
    basis,
  };
  defineCachedField(result, 'residuals', () => residualsOf(problem, beta));
  defineCachedField(result, 'scale', () => madScaleOfResiduals(result.residuals, problem.weights));
  return result;
}
