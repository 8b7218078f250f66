// A fit session: the fitting layer's answer to "refit after one more reading" (bench issue 5).
//
// Why a session and not a warm start: a warm start is a hint about data the fitter has never
// seen, so the fitter must re-verify it against all n rows (types.ts). A session OWNS its rows
// (copied into growable typed arrays, changed only by `append`), so it knows exactly which rows
// every earlier fit saw and which are new; what it proved about the first n rows stays proved.
// Per estimator (each returns the answer of the plain fitter on the same rows):
// - least squares: the centred, scaled normal-equation sums of weighted-normal.ts are kept,
//   taken about a base β₀ (G = Σ w zzᵀ, b = Σ w z r₀, S = Σ w r₀², r₀ = y − Xβ₀); a new row adds
//   its terms, O(p²) per row. See `NormalSums` for why this is as accurate as the cold route.
// - minimax: a new row with √w|r| within the last exact level h leaves β optimal (below).
// - least absolute deviations, Huber, Tukey: the plain fitter with warmStart = the previous
//   result. An exact M-estimate (and its MAD scale from the L1 start) after one more reading
//   needs at least one pass over the data; the L1 vertex test is not done here yet.
// Results of the session's own paths compute their n-sized outputs (residuals, the minimax MAD
// scale) when first read (cached-field.ts), from the rows the fit saw.
import { InputError } from '../errors.ts';
import { defineCachedField } from './cached-field.ts';
import { fitHuber } from './huber.ts';
import { fitLeastAbsolute } from './least-absolute.ts';
import { fitLeastSquares, NORMAL_MIN_PIVOT } from './least-squares.ts';
import { fitMinimax, ROUNDING_ULPS, VIOLATION_REL } from './minimax.ts';
import { interceptColumn, residualsOf, residualsRange, validateProblem } from './problem.ts';
import { scratchFloat64 } from './scratch.ts';
import { madScaleOfResiduals } from './simplex-residual-scale.ts';
import { fitTukey } from './tukey.ts';
import { ESTIMATORS, type Estimator, type FitOptions, type FitResult, type LinearProblem } from './types.ts';
import {
  accumulateNormal, accumulateResidualRhs, addRows, cloneNormalWorkspace, cofactorMatrix, createNormalWorkspace, factorNormal, solveCorrection,
  type NormalWorkspace,
} from './weighted-normal.ts';

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

/**
 * Rows folded into the sums since the last full pass, relative to the rows of that pass, before
 * the next fit rebuilds them: rebuilding when the rows have doubled keeps the O(n) pass amortised
 * O(1) per row, and keeps β₀ near β and the sample shift and scale representative.
 */
export const SUMS_REBUILD_GROWTH = 1;

/**
 * Least-squares state. Cold route (`buildSums`), as fitLeastSquares' normal route with its one
 * refinement step: a first solve from y gives β₀, then b = Σ w z (y − xᵀβ₀) and β = β₀ + G⁻¹b,
 * the refinement's correction. The session keeps G, b and S at that β₀ and adds each new row's
 * terms: the sums over n + k rows are the sums a cold pass at β₀ would form (up to summation
 * order), so the answer is the cold refinement from β₀ on all rows. Accuracy: b is summed from
 * residuals about β₀ (metres, not the 1e5 m/degree readings), exactly what the refinement step
 * buys; G⁻¹'s error (cond²·ε ≤ 2e-8 under the pivot guard) multiplies the small correction
 * only. The objective Σw(r₀ − zᵀθ)² = S − bᵀG⁻¹b at Gθ = b carries rounding of order ε·S.
 */
interface NormalSums {
  ws: NormalWorkspace;
  base: Float64Array;
  s: number;
  rows: number;
  baseRows: number;
}

interface Kept {
  result: FitResult;
  /** Rows the result was computed on. */
  n: number;
  /** Minimax: the level of the last exact solve, the reference for the new-row test. */
  level?: number;
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
    this.rows = n;
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
    else kept = { result: warmFit(estimator, problem, prev?.result, options), n: problem.n };
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
    this.sums = cp.sums && cloneSums(cp.sums);
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

/** The plain fitter, warm-started from this estimator's previous session result (a start only). */
function warmFit(estimator: Exclude<Estimator, 'least-squares' | 'minimax'>, problem: LinearProblem, prev: FitResult | undefined, options: FitOptions): FitResult {
  let warmStart = options.warmStart;
  if (!warmStart && prev && prev.status === 'ok') {
    warmStart = { coefficients: prev.coefficients };
    // A scale without the L1 vertex would be HELD by Huber/Tukey (irls.ts); with the vertex the
    // refit re-derives the start and its MAD on the new rows, i.e. the cold answer.
    if (prev.basis) {
      warmStart.basis = prev.basis;
      if (estimator !== 'least-absolute') warmStart.scale = prev.scale;
    }
  }
  const opts = { ...options, warmStart };
  if (estimator === 'least-absolute') return fitLeastAbsolute(problem, opts);
  return estimator === 'huber' ? fitHuber(problem, opts) : fitTukey(problem, opts);
}

/** The full pass: the cold normal route's first solve and refinement right-hand side; null when the guard fails. */
function buildSums(problem: LinearProblem): NormalSums | null {
  const { n, p, weights } = problem;
  const ws = createNormalWorkspace(problem, interceptColumn(problem));
  accumulateNormal(ws, problem, problem.y, undefined);
  if (!(factorNormal(ws) >= NORMAL_MIN_PIVOT)) return null;
  const base = new Float64Array(p);
  solveCorrection(ws, base);
  const r = scratchFloat64('fit-session-residuals', n);
  accumulateResidualRhs(ws, problem, base, r);
  let s = 0;
  for (let i = 0; i < n; i++) s += (weights ? weights[i] : 1) * r[i] * r[i];
  return { ws, base, s, rows: n, baseRows: n };
}

/** Chunk of new rows folded at a time (the residual buffer stays in cache). */
const FOLD_CHUNK = 1024;

/** Adds rows sums.rows … n−1 to G, b and S; false when a row breaks the intercept column the centring relies on. */
function foldRows(sums: NormalSums, problem: LinearProblem): boolean {
  const { ws } = sums;
  const { n, p, X, weights } = problem;
  if (ws.intercept >= 0) {
    for (let i = sums.rows; i < n; i++) if (X[i * p + ws.intercept] !== ws.interceptValue) return false;
  }
  const r = new Float64Array(Math.min(FOLD_CHUNK, n - sums.rows));
  for (let start = sums.rows; start < n; start += FOLD_CHUNK) {
    const m = Math.min(FOLD_CHUNK, n - start);
    residualsRange(problem, sums.base, start, m, r);
    for (let i = 0; i < m; i++) sums.s += (weights ? weights[start + i] : 1) * r[i] * r[i];
    addRows(ws, problem, start, m, r, weights?.subarray(start, start + m));
  }
  sums.rows = n;
  return true;
}

function cloneSums(sums: NormalSums): NormalSums {
  const ws = cloneNormalWorkspace(sums.ws);
  ws.gram.set(sums.ws.gram);
  ws.rhs.set(sums.ws.rhs);
  return { ws, base: Float64Array.from(sums.base), s: sums.s, rows: sums.rows, baseRows: sums.baseRows };
}

/** bᵀG⁻¹b = ‖L⁻¹Pb‖² from the last factorisation (the chol is in the workspace's order). */
function explainedSquares(ws: NormalWorkspace): number {
  const { p, order, chol, rhs } = ws;
  const u = new Float64Array(p);
  let sum = 0;
  for (let a = 0; a < p; a++) {
    let t = rhs[order[a]];
    for (let c = 0; c < a; c++) t -= chol[a * p + c] * u[c];
    u[a] = t / chol[a * p + a];
    sum += u[a] * u[a];
  }
  return sum;
}

function sumsResult(problem: LinearProblem, sums: NormalSums, ratio: number, rebuilt: boolean): FitResult {
  const { n, p } = problem;
  const beta = new Float64Array(p);
  solveCorrection(sums.ws, beta);
  for (let j = 0; j < p; j++) beta[j] += sums.base[j];
  const objective = Math.max(0, sums.s - explainedSquares(sums.ws));
  const dof = n - p;
  const how = rebuilt
    ? `normal equations on centred columns, 1 refinement step, pivot ratio ${ratio.toExponential(2)} (fit session, full pass over ${n} rows)`
    : `normal equations on centred columns kept by the fit session: ${n - sums.baseRows} rows added to the sums of ${sums.baseRows} at the ` +
      `refinement's base β, pivot ratio ${ratio.toExponential(2)}`;
  const result: FitResult = {
    estimator: 'least-squares',
    status: 'ok',
    coefficients: beta,
    residuals: new Float64Array(0),
    objective,
    scale: dof > 0 ? Math.sqrt(objective / dof) : NaN,
    iterations: 0,
    converged: true,
    reason: dof > 0 ? how : `${how}; n = p: an exact fit with no redundancy, σ₀ and covariance undefined`,
  };
  if (dof > 0) {
    const s2 = objective / dof;
    result.covariance = cofactorMatrix(sums.ws).map((c) => c * s2);
  }
  defineCachedField(result, 'residuals', () => residualsOf(problem, beta));
  return result;
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
