// M-estimation by iteratively reweighted least squares (Beaton & Tukey 1974; Holland & Welsch
// 1977), with the scale held fixed.
//
// Minimises Σ ρ(uᵢ), uᵢ = √wᵢ·rᵢ / s. Each step solves the weighted least-squares problem with
// weights wᵢ·ψ(uᵢ)/uᵢ, in correction form (weighted-normal.ts) so the fixed point satisfies
// Σ √wᵢ ψ(uᵢ) xᵢ = 0 to the accuracy of the residuals. The scale s is fixed for the whole
// iteration: options.scale, else the warm start's scale, else the MAD of the start's whitened
// residuals. (MASS::rlm instead re-estimates the scale each iteration as median|r|/0.6745; its
// answer is then the fixed-scale estimate at its final scale — what the reference tests compare.)
// Close to the solution the steps switch to Newton's method on the same estimating equations,
// each kept only if Σρ does not increase (otherwise IRLS resumes; NEWTON_SWITCH says why).
// Each iteration is one chunked pass over the data (residuals, ψ weights and normal equations
// together); buffers are allocated once per fit and an iteration allocates nothing n-sized.
import { InputError } from '../errors.ts';
import { defineCachedField } from './cached-field.ts';
import { interceptColumn, noSolution, residualsOf, residualsRange, validateProblem } from './problem.ts';
import { assertProblemShape } from './simplex-problem.ts';
import { factorLu, solveLu } from './linear-solve.ts';
import { madScale } from './robust-scale.ts';
import { fusedEvaluate, fusedPass, fusedPassApplies } from './irls-fused-pass.ts';
import { constantColumn, createHuberBand, HUBER_BAND_MIN_ROWS, settleHuberPartition, type HuberBand, type SettledPartition } from './huber-active-set.ts';
import type { RhoFunction, SweepState } from './rho-function.ts';
import { scratchFloat64 } from './scratch.ts';
import type { FitOptions, FitResult, LinearProblem } from './types.ts';
import { addRows, cloneNormalWorkspace, cofactorDiagonal, cofactorMatrix, createNormalWorkspace, factorNormal, resetNormal, solveCorrection, type NormalWorkspace } from './weighted-normal.ts';

export type { RhoFunction, SweepState } from './rho-function.ts';

/** Default relative tolerance on the coefficients (types.ts: 1e-12 for IRLS). */
export const IRLS_TOLERANCE = 1e-12;
/**
 * Iteration cap. IRLS converges linearly: without the Newton finish the reference sets needed up
 * to 27 steps (Tukey, n = 5: rate ≈ 0.36) to reach 1e-12; 500 steps reach it for any rate up to
 * 0.946 (= 1e-12^(1/500)), far slower than any data seen here.
 */
export const IRLS_MAX_ITERATIONS = 500;
/**
 * Smallest pivot ratio of the reweighted normal equations: cond ≲ 1/√(100ε) ≈ 7e6 keeps
 * cond²·ε ≤ 0.01, so the correction-form solve still contracts; below it the reweighted design
 * is treated as rank deficient (e.g. Tukey weights left fewer than p informative rows).
 */
export const IRLS_MIN_PIVOT = Math.sqrt(100 * Number.EPSILON);
/**
 * A correction is rounding once |δⱼ| ≤ IRLS_ROUNDING_FACTOR·ε·max|√wᵢyᵢ|·√Qⱼⱼ, Q = (XᵀVX)⁻¹:
 * the residuals carry an error of about ε|yᵢ|, and G⁻¹ZᵀV maps it into δ with at most that
 * standard deviation. Degree lengths of 1.1e5 m/deg with residuals of metres put this floor
 * near 1e-11 relative, above the 1e-12 tolerance for small coefficients; iterating further only
 * stirs rounding, so the fit is then converged. 4 covers the measured noise (≈ 0.2 of the bound).
 */
export const IRLS_ROUNDING_FACTOR = 4;
/**
 * Newton steps (matrix Σwψ′(u)xxᵀ instead of Σw(ψ(u)/u)xxᵀ, same right-hand side, same fixed
 * point) are tried once an IRLS step changed β by less than this relative amount: close enough
 * that Tukey's non-convex ρ is locally convex in the basin IRLS is heading for. IRLS converges
 * linearly (rate ≈ 0.1 on the reference sets), Newton quadratically — for Huber's piecewise
 * quadratic ρ in one step once the set |u| ≤ k is right — which is what makes a warm-started
 * refit after one more reading cheap.
 */
export const NEWTON_SWITCH = 1e-3;
/** After this many uphill Newton steps a fit continues by IRLS alone (no ping-pong). */
export const MAX_NEWTON_REJECTIONS = 3;
/** A Newton step is kept if Σρ did not grow by more than this relative amount (rounding of the sum). */
const OBJECTIVE_ROUNDING = 64 * Number.EPSILON;

export interface IrlsStart {
  coefficients: Float64Array;
  /** A warm start (the previous solution): Newton steps may begin at once. */
  warm: boolean;
  /** The scale to hold fixed (already chosen by the caller). */
  scale: number;
  /** How the start was obtained, for the reason text. */
  from: string;
}

/** Checks a tuning constant or returns the default. */
export function tuningOrDefault(options: FitOptions, fallback: number): number {
  const t = options.tuning ?? fallback;
  if (!Number.isFinite(t) || t <= 0) throw new InputError('options.tuning', options.tuning, 'must be finite and > 0');
  return t;
}

/** The MAD of the whitened residuals at β (the start's scale). */
export function startScale(problem: LinearProblem, beta: Float64Array): number {
  const r = residualsOf(problem, beta);
  const w = problem.weights;
  if (w) for (let i = 0; i < problem.n; i++) r[i] *= Math.sqrt(w[i]);
  return madScale(r);
}

/**
 * Rows per chunk of a pass. Each pass computes a chunk's residuals, its ψ weights and its share of
 * the normal equations while the chunk is in cache (4096·8 B = 32 KiB per buffer), so an
 * iteration reads the data once and keeps no n-sized residual or weight arrays.
 */
export const IRLS_CHUNK_ROWS = 4096;

/** Zero residuals for a chunk: XᵀWX alone (the right-hand side is not used). */
const ZERO_ROWS = new Float64Array(IRLS_CHUNK_ROWS);

/** An n-sized array a caller can lend to the fit (the L1 start's residuals, overwritten). */
export interface IrlsBuffers {
  residuals?: Float64Array;
  /** The lent residuals are y − Xβ at the start's coefficients (the L1 fit's own): the first pass reuses them. */
  residualsAtStart?: boolean;
}

/**
 * The vertex through the given rows (X_B β = y_B), or null when the rows are not p distinct rows
 * of this problem or their system is singular: the L1 start's coefficients from its basis alone.
 */
function vertexThrough(problem: LinearProblem, basis: Int32Array): { coefficients: Float64Array; basis: Int32Array } | null {
  const { n, p, X, y } = problem;
  if (basis.length !== p) return null;
  const seen = new Set<number>();
  const A = new Float64Array(p * p);
  const b = new Float64Array(p);
  for (let k = 0; k < p; k++) {
    const i = basis[k];
    if (!Number.isInteger(i) || i < 0 || i >= n || seen.has(i)) return null;
    seen.add(i);
    for (let j = 0; j < p; j++) A[k * p + j] = X[i * p + j];
    b[k] = y[i];
  }
  const lu = factorLu(A, p);
  if (lu.singular) return null;
  const coefficients = solveLu(lu, b);
  return Array.from(coefficients).every(Number.isFinite) ? { coefficients, basis: Int32Array.from(basis) } : null;
}

/** Runs IRLS from `start` at the fixed scale `start.scale` (> 0, finite) on a validated problem with n ≥ p. */
export function irls(problem: LinearProblem, rho: RhoFunction, start: IrlsStart, options: FitOptions, lent: IrlsBuffers = {}): FitResult {
  const { n, p } = problem;
  const tol = options.tolerance ?? IRLS_TOLERANCE;
  const maxIterations = options.maxIterations ?? IRLS_MAX_ITERATIONS;
  if (!(tol > 0) || !Number.isFinite(tol)) throw new InputError('options.tolerance', options.tolerance, 'must be finite and > 0');
  if (!Number.isInteger(maxIterations) || maxIterations < 1) throw new InputError('options.maxIterations', options.maxIterations, 'must be a whole number >= 1');
  const s = start.scale;
  const beta = Float64Array.from(start.coefficients);
  const previous = new Float64Array(p);
  const fused = fusedPassApplies(problem, rho);
  // Huber on the fused path: the first pass lists the readings near ±k for the active-set finish.
  // The band's column ranges also tell which column is constant (min = max ≠ 0, on validated
  // data), which saves interceptColumn's own pass over X (~2 ms at n = 10⁶).
  let band: HuberBand | null = fused && rho.piecewiseQuadratic && n >= HUBER_BAND_MIN_ROWS ? createHuberBand(problem) : null;
  const intercept = band ? constantColumn(band) : interceptColumn(problem);
  const ws = createNormalWorkspace(problem, intercept);
  const wsNewton = cloneNormalWorkspace(ws);
  // floorⱼ = s/rmsⱼ: the change of βⱼ that moves the whitened fit by one scale unit on average;
  // relative change is measured against max(|βⱼ|, floorⱼ) so a coefficient near 0 can converge.
  const floor = new Float64Array(p);
  for (let j = 0; j < p; j++) floor[j] = s * Math.sqrt(n) * ws.scale[j];
  // The rounding level of the corrections (IRLS_ROUNDING_FACTOR), found when a step first needs it:
  // a pass over y (~2 ms at n = 10⁶) that Huber's active-set finish never reads.
  let rounding = Number.NaN;
  const out: PassOutput = {
    residuals: lent.residuals && lent.residuals.length === n ? lent.residuals : new Float64Array(n),
    robustWeights: new Float64Array(n),
    // The fused pass reads Huber's sides from the robust weights and keeps no side array.
    side: fused ? new Uint8Array(0) : new Uint8Array(n),
    objective: 0, changed: false, sumPsi2: 0, sumD: 0, sumD2: 0,
  };
  const chunk = new Chunk(problem);
  const delta = new Float64Array(p);
  const qdiag = new Float64Array(p);
  const stop: Stop = { iterations: 0, newtonSteps: 0, rejected: 0, converged: false, atRounding: false, exact: false, stepNotTaken: false, change: Infinity, tol };
  // Newton is tried once the iterate is close (a warm start is taken to be). Huber's ρ is convex
  // and piecewise quadratic, and its L1 start has nearly the final partition: every step is a
  // Newton step (the active-set iteration; an uphill one is undone as below), which saved one or
  // two passes on the benchmark data.
  let newtonAllowed = true;
  let lastChange = start.warm ? 0 : Infinity;
  let lastWasNewton = false;
  let objectiveBefore = Infinity;
  // The outputs of the last pass are those of β (no step taken since): the final pass is saved.
  let outputsCurrent = false;
  // The first pass at the L1 start can use the L1 fit's residuals (the same formula, bit for bit).
  let residualsReady = lent.residualsAtStart === true && out.residuals === lent.residuals;
  while (stop.iterations < maxIterations) {
    // One pass: Σρ and the side changes at β, the returned residuals and weights, and the normal
    // equations of the step to take (IRLS, or Newton when one is due).
    const planNewton = newtonAllowed && (lastChange < NEWTON_SWITCH || rho.piecewiseQuadratic);
    const listing = planNewton ? band : null;
    if (fused) fusedPass(problem, rho, beta, s, out.residuals, out.robustWeights, residualsReady, planNewton ? wsNewton : ws, planNewton, out, listing);
    else chunk.sweep(rho, beta, s, out, planNewton ? null : ws, planNewton ? wsNewton : null, residualsReady);
    residualsReady = false;
    outputsCurrent = true;
    const objective = out.objective;
    if (listing) {
      band = null;
      const settled = settleHuberPartition(rho.tuning, s, wsNewton, listing, out.sumD, IRLS_MIN_PIVOT);
      if (settled) {
        for (let j = 0; j < p; j++) beta[j] += settled.delta[j];
        // Only the outputs at β are read (a mismatch below starts a fresh pass): no normal equations.
        fusedEvaluate(problem, rho, beta, s, out.residuals, out.robustWeights, ws, out);
        stop.iterations++;
        stop.newtonSteps++;
        // The pass at β counts the readings inside ±k: it must be the settled partition's count
        // (a mismatch, from rounding at ±k, continues the plain iteration from this β).
        if (out.sumD === settled.inside) {
          stop.converged = true;
          stop.exact = true;
          stop.settled = settled;
          break;
        }
        lastChange = 0;
        lastWasNewton = false;
        objectiveBefore = Infinity;
        continue;
      }
    }
    if (lastWasNewton && rho.piecewiseQuadratic && !out.changed) {
      // Exact: the step solved the quadratic that holds on this partition, and it still holds.
      stop.converged = true;
      stop.exact = true;
      break;
    }
    if (lastWasNewton && objective > objectiveBefore + OBJECTIVE_ROUNDING * Math.abs(objectiveBefore)) {
      // The Newton step went uphill (the ψ′ partition changed under it): undo it and take IRLS
      // steps until they are small again; after MAX_NEWTON_REJECTIONS, IRLS only.
      beta.set(previous);
      outputsCurrent = false;
      stop.rejected++;
      newtonAllowed = stop.rejected < MAX_NEWTON_REJECTIONS;
      lastChange = Infinity;
      lastWasNewton = false;
      continue;
    }
    objectiveBefore = objective;
    let used = ws;
    lastWasNewton = false;
    if (planNewton) {
      if (!(factorNormal(wsNewton) >= IRLS_MIN_PIVOT)) {
        // ψ′ leaves too few informative rows for a Newton matrix: IRLS from here on (its normal
        // equations were not accumulated in this pass, so the pass is repeated at the same β).
        newtonAllowed = false;
        objectiveBefore = Infinity;
        continue;
      }
      used = wsNewton;
      lastWasNewton = true;
    }
    if (!lastWasNewton) {
      const ratio = factorNormal(ws);
      if (!(ratio >= IRLS_MIN_PIVOT)) {
        const failed = noSolution(rho.estimator, problem, 'rank-deficient',
          `after ${stop.iterations} steps the reweighted design is numerically rank deficient (pivot ratio ${ratio.toExponential(2)} < ${IRLS_MIN_PIVOT.toExponential(2)}): too few readings keep a weight`);
        failed.iterations = stop.iterations;
        return failed;
      }
    }
    solveCorrection(used, delta);
    cofactorDiagonal(used, qdiag);
    if (rounding !== rounding) rounding = roundingLevel(problem);
    previous.set(beta);
    let change = 0;
    let noise = true;
    for (let j = 0; j < p; j++) {
      change = Math.max(change, Math.abs(delta[j]) / Math.max(Math.abs(beta[j]), floor[j]));
      noise = noise && Math.abs(delta[j]) <= rounding * Math.sqrt(qdiag[j]);
      beta[j] += delta[j];
    }
    outputsCurrent = false;
    stop.iterations++;
    if (lastWasNewton) stop.newtonSteps++;
    stop.change = change;
    lastChange = change;
    if (change <= tol || noise) {
      // Converged. The iterate returned is the one just evaluated (β before this step), whose
      // residuals, weights and Σρ the pass produced: a pass to evaluate β + δ would cost a tenth
      // of a second at n = 10⁶ and move β by ≤ tol relative (or only by rounding noise).
      beta.set(previous);
      outputsCurrent = true;
      stop.converged = true;
      stop.atRounding = change > tol;
      stop.stepNotTaken = true;
      break;
    }
  }
  // The returned residuals, weights and Σρ belong to the returned β.
  if (!outputsCurrent) {
    if (fused) fusedEvaluate(problem, rho, beta, s, out.residuals, out.robustWeights, ws, out);
    else chunk.sweep(rho, beta, s, out, null, null, false);
  }
  return finish(problem, rho, start, beta, out, stop, intercept);
}

/** IRLS_ROUNDING_FACTOR·ε·max|√wᵢyᵢ|: a correction below it (scaled by √Qⱼⱼ) is rounding. */
function roundingLevel(problem: LinearProblem): number {
  const { n, y, weights } = problem;
  let yMax = 0;
  if (weights) for (let i = 0; i < n; i++) yMax = Math.max(yMax, Math.abs(Math.sqrt(weights[i]) * y[i]));
  else for (let i = 0; i < n; i++) yMax = Math.max(yMax, Math.abs(y[i]));
  return IRLS_ROUNDING_FACTOR * Number.EPSILON * yMax;
}

/** What a pass leaves: the n-sized outputs at its β and the sums over all rows. */
interface PassOutput {
  residuals: Float64Array;
  /** ψ(u)/u per row. */
  robustWeights: Float64Array;
  /** [ψ′(uᵢ) > 0] per row (the ψ′ partition). */
  side: Uint8Array;
  objective: number;
  /** Whether any row changed side since the previous pass. */
  changed: boolean;
  sumPsi2: number;
  sumD: number;
  sumD2: number;
}

/** Cache-sized buffers for the chunked passes, and the pass itself. */
class Chunk {
  // Reused across fits (scratch.ts): a refit of 10⁴ readings is otherwise dominated by these.
  readonly v = scratchFloat64('irls-v', IRLS_CHUNK_ROWS);
  readonly h = scratchFloat64('irls-h', IRLS_CHUNK_ROWS);
  /** √wᵢ of the chunk (prior weights only). */
  readonly sw = scratchFloat64('irls-sw', IRLS_CHUNK_ROWS);
  readonly state: SweepState = { changed: false, sumPsi2: 0, sumD: 0, sumD2: 0 };
  constructor(readonly problem: LinearProblem) {}

  /**
   * At β, chunk by chunk: residuals and robust weights into `out`, Σρ, side changes and the
   * covariance sums; IRLS normal equations into ws and Newton's into wsNewton when given.
   */
  sweep(rho: RhoFunction, beta: Float64Array, s: number, out: PassOutput, ws: NormalWorkspace | null, wsNewton: NormalWorkspace | null,
    residualsReady: boolean): void {
    const { problem, v, h, sw, state } = this;
    const { n, weights } = problem;
    if (ws) resetNormal(ws);
    if (wsNewton) resetNormal(wsNewton);
    let objective = 0;
    let changed = false;
    state.sumPsi2 = 0;
    state.sumD = 0;
    state.sumD2 = 0;
    const invScale = 1 / s;
    const { residuals, robustWeights, side } = out;
    for (let start = 0; start < n; start += IRLS_CHUNK_ROWS) {
      const m = Math.min(IRLS_CHUNK_ROWS, n - start);
      if (weights) for (let i = 0; i < m; i++) sw[i] = Math.sqrt(weights[start + i]);
      const r = residuals.subarray(start, start + m);
      if (!residualsReady) residualsRange(problem, beta, start, m, r);
      objective += rho.sweep(r, weights ? sw : null, invScale, v, h, side.subarray(start, start + m), robustWeights.subarray(start, start + m), state);
      changed = changed || state.changed;
      if (ws) addRows(ws, problem, start, m, r, v);
      // Same right-hand side Σ√wψ(u)s·z as IRLS (IRLS weights in b); ψ′ weights in the matrix.
      if (wsNewton) addRows(wsNewton, problem, start, m, r, h, v);
    }
    out.objective = objective;
    out.changed = changed;
    out.sumPsi2 = state.sumPsi2;
    out.sumD = state.sumD;
    out.sumD2 = state.sumD2;
  }
}

interface Stop {
  iterations: number;
  newtonSteps: number;
  rejected: number;
  converged: boolean;
  atRounding: boolean;
  /** A Newton step on a piecewise quadratic ρ that kept every reading's side: exact. */
  exact: boolean;
  /** Converged on a step ≤ tol (or at rounding) that was not applied: the evaluated iterate is returned. */
  stepNotTaken: boolean;
  /** Huber's active-set finish after the first pass (huber-active-set.ts), when it proved the partition. */
  settled?: SettledPartition;
  change: number;
  tol: number;
}

function finish(problem: LinearProblem, rho: RhoFunction, start: IrlsStart, beta: Float64Array, out: PassOutput, stop: Stop,
  intercept: number): FitResult {
  const { iterations, converged, atRounding, exact, change, tol, newtonSteps, rejected } = stop;
  const { n, p } = problem;
  const s = start.scale;
  const { residuals, robustWeights, objective, sumPsi2, sumD, sumD2 } = out;
  const steps = newtonSteps > 0 ? ` (${newtonSteps} of them Newton steps${rejected ? `, ${rejected} rejected` : ''})` : '';
  const kept = stop.stepNotTaken ? '; the coefficients are the iterate before that last step (the one whose residuals were evaluated)' : '';
  const what = `${rho.estimator} (tuning ${rho.tuning}) by IRLS from ${start.from}, scale ${s.toPrecision(6)} held fixed`;
  const reason = !converged
    ? `${what}: did not converge in ${iterations} iterations (last relative change ${change.toExponential(1)} > ${tol.toExponential(0)})`
    : stop.settled
      ? `${what}: exact — one Newton pass, then the sides of the ${stop.settled.listed} readings within ±${stop.settled.margin.toPrecision(2)} of ±${rho.tuning} ` +
        `settled by ${stop.settled.resolves} re-solves (${stop.settled.moved} moved); every other reading provably kept its side (|Δu| ≤ ` +
        `${stop.settled.bound.toExponential(1)} < ${stop.settled.margin.toPrecision(2)})`
    : exact
      ? `${what}: exact after ${iterations} iterations${steps} — the last Newton step left every reading on its side of ±${rho.tuning}`
    : atRounding
      ? `${what}: the correction reached the rounding level of the readings (relative change ${change.toExponential(1)}) after ${iterations} iterations${steps}${kept}`
      : `${what}: relative change ${change.toExponential(1)} ≤ ${tol.toExponential(0)} after ${iterations} iterations${steps}${kept}`;
  const result: FitResult = {
    estimator: rho.estimator,
    status: converged ? 'ok' : 'not-converged',
    coefficients: beta,
    residuals,
    objective,
    scale: s,
    iterations,
    converged,
    reason,
    robustWeights,
  };
  // Huber's asymptotic covariance with his small-sample correction (Huber, "Robust Statistics",
  // 1981, §7.6; statsmodels "H1", MASS summary.rlm):
  //   K²·[Σψ²/(n − p)]/m²·s²·(XᵀWX)⁻¹,  m = mean ψ′,  K = 1 + (p/n)·var(ψ′)/m².
  // It needs m > 0 (Tukey's ψ′ can make it ≤ 0) and n > p.
  const m = sumD / n;
  if (n > p && m > 0) {
    const varD = Math.max(0, sumD2 / n - m * m);
    const K = 1 + ((p / n) * varD) / (m * m);
    const factor = ((K * K * (sumPsi2 / (n - p))) / (m * m)) * s * s;
    // Computed when first read (one pass over X for XᵀWX), as MASS (summary.rlm) and statsmodels
    // (RLMResults.bcov, a cached property) do: a refit on every save needs the coefficients and
    // the flags at once, the covariance only when a report or the figure's sigmas are drawn.
    defineCachedField(result, 'covariance', () => {
      const wsPrior = priorNormal(problem, intercept);
      return factorNormal(wsPrior) > 0 ? cofactorMatrix(wsPrior).map((c) => c * factor) : undefined;
    });
  }
  return result;
}

/** XᵀWX with the prior weights (centred and scaled as in weighted-normal.ts), in one chunked pass. */
function priorNormal(problem: LinearProblem, intercept: number): NormalWorkspace {
  const { n, weights } = problem;
  const ws = createNormalWorkspace(problem, intercept);
  resetNormal(ws);
  for (let start = 0; start < n; start += IRLS_CHUNK_ROWS) {
    const m = Math.min(IRLS_CHUNK_ROWS, n - start);
    addRows(ws, problem, start, m, ZERO_ROWS, weights ? weights.subarray(start, start + m) : undefined);
  }
  return ws;
}

/** The robust start: the exact L1 fit (injected to keep this file free of it), cold or warm. */
export type RobustStart = (problem: LinearProblem, options?: FitOptions) => FitResult;

/**
 * The shared M-estimator driver: checks, chooses the start and the fixed scale, runs IRLS.
 * Start: a usable warm start (right length, finite), else the L1 fit. Scale, in order:
 * 1. options.scale;
 * 2. no warm start, or a warm start carrying the L1 vertex (`basis`, as every Huber/Tukey result
 *    does): the MAD of the whitened residuals of the exact L1 fit of THIS data — warm, the L1 is
 *    refitted from that vertex (about two passes), so a warm refit returns the cold answer;
 * 3. a warm start with a scale but no vertex: that scale (the M-estimate at the previous scale);
 * 4. a warm start with coefficients only: the MAD of its own whitened residuals.
 */
export function mEstimate(problem: LinearProblem, rho: RhoFunction, options: FitOptions, robustStart: RobustStart): FitResult {
  assertProblemShape(problem);
  const { n, p } = problem;
  if (n < p) return noSolution(rho.estimator, problem, 'too-few-rows', `${n} rows for ${p} parameters`);
  if (options.scale !== undefined && (!Number.isFinite(options.scale) || options.scale <= 0)) {
    throw new InputError('options.scale', options.scale, 'a fixed scale must be finite and > 0');
  }
  const warm = options.warmStart;
  let coefficients: Float64Array | null = null;
  let from = '';
  let warmNote = '';
  if (warm) {
    const c = warm.coefficients;
    if (c.length === p && Array.from(c).every(Number.isFinite)) {
      coefficients = Float64Array.from(c);
      from = 'the warm start';
    } else {
      warmNote = ` (warm start ignored: ${c.length} coefficients for ${p} parameters or a non-finite value)`;
    }
  }
  const vertex = coefficients && warm?.basis ? vertexThrough(problem, warm.basis) : null;
  let scale = options.scale;
  const lent: IrlsBuffers = {};
  let l1: FitResult | null = null;
  if (!coefficients || (scale === undefined && vertex)) {
    // Cold, or warm with the L1 vertex: the exact L1 fit of this data, for the start and/or the scale.
    const l1Options: FitOptions = vertex ? { warmStart: { coefficients: vertex.coefficients, basis: vertex.basis, ...(warm?.scale !== undefined ? { scale: warm.scale } : {}) } } : {};
    l1 = robustStart(problem, l1Options);
    if (l1.status !== 'ok') {
      return noSolution(rho.estimator, problem, l1.status, `the robust start (least absolute deviations) failed: ${l1.reason}`);
    }
    if (!coefficients) {
      coefficients = Float64Array.from(l1.coefficients);
      from = 'the least-absolute-deviations fit';
    } else {
      from += ', scale from the least-absolute-deviations refit';
    }
    // The L1 fit's residual array is handed on: the M-fit returns its own residuals in it, so
    // the robust start costs no n-sized array of its own.
    lent.residuals = l1.residuals;
    const l1Coefficients = l1.coefficients;
    lent.residualsAtStart = coefficients.every((c, j) => c === l1Coefficients[j]);
    // The L1 fit reports exactly the scale wanted (the MAD of its whitened residuals, computed by
    // simplex-residual-scale.ts without two full selections).
    if (scale === undefined && Number.isFinite(l1.scale) && l1.scale >= 0) scale = l1.scale;
  }
  // Without the L1 fit, which checks every value it reads (simplex-problem.ts), a full scan does.
  if (!l1) validateProblem(problem);
  if (scale === undefined && coefficients && !l1 && warm?.scale !== undefined && Number.isFinite(warm.scale) && warm.scale > 0) scale = warm.scale;
  from += warmNote;
  if (scale === undefined) scale = startScale(problem, coefficients);
  if (scale === 0) {
    // More than half the whitened residuals of the start are exactly zero: the start fits the
    // majority exactly and every ψ-weighting of the rest would divide by zero. Report the limit
    // s → 0: exact rows keep weight 1 and ρ(0) = 0, the others have u = ∞.
    const residuals = residualsOf(problem, coefficients);
    const robustWeights = new Float64Array(n);
    let objective = 0;
    for (let i = 0; i < n; i++) {
      const u = residuals[i] === 0 ? 0 : Infinity;
      robustWeights[i] = rho.weight(u);
      objective += rho.rho(u);
    }
    return {
      estimator: rho.estimator, status: 'ok', coefficients, residuals, objective, scale: 0, iterations: 0, converged: true,
      reason: `scale 0 at the start (${from}): more than half the readings fit it exactly, so it is the estimate`,
      robustWeights,
    };
  }
  const fit = irls(problem, rho, { coefficients, scale, from, warm: from.startsWith('the warm start') }, options, lent);
  if (l1?.basis) fit.basis = l1.basis;
  return fit;
}
