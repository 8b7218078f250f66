// Exact least absolute deviations: minimise Σ √wᵢ |yᵢ − xᵢᵀβ| (weights wᵢ = 1/σᵢ², types.ts).
//
// The optimum of this linear programme is attained at a vertex: p rows interpolated (Barrodale &
// Roberts 1973; check-values.md). The fit is exact in the LP sense: the returned vertex carries
// a dual certificate over all n rows bounding the relative optimality gap by GAP_TOL = 1e-10
// (least-absolute-certificate.ts, least-absolute-proof.ts), or the result says
// `converged: false` with the reason.
//
// Route, by size (constants tuned on the benchmark data of bench/quick-exact.ts):
// - n ≤ DIRECT_MAX_ROWS: all rows go to the vertex descent (least-absolute-descent.ts) in the
//   column frame (simplex-frame.ts), started from least squares; a final pass certifies.
// - larger n: the preprocessing of Portnoy & Koenker (Statistical Science 12 (1997) 279, §4).
//   A systematic subsample of (p·n)^(2/3) rows is fitted (least-absolute-subsample.ts, itself
//   screened when large); one streaming pass (least-absolute-screen.ts) keeps the rows inside a
//   leverage-shaped band around that fit (least-absolute-band.ts) and pins the rest to their
//   sides as a linear term; the kept rows are solved exactly from the subsample's vertex. The
//   answer is then proven without another accounting pass: the fit moved by D in the band's
//   metric, every pinned row's residual by at most its leverage times D, so D below the band
//   keeps every pinned side and the small problem's dual condition is the full one. If that
//   proof is missing (D too large), a full certification pass decides; if it fails, the band
//   is widened around the newer fit and the round repeats.
// - a warm start (a previous solution, e.g. before one more reading): no subsample; a small
//   sample (WARM_SAMPLE_ROWS) gives the frame and the band's shape, the band is sized to hold
//   ~WARM_KEPT_ROWS·p rows around the previous fit and the previous basis is the first vertex;
//   the residuals are left to their first read, so a refit after one more row costs one
//   screening pass plus a small solve when the band proof holds.
import { bandFromSubsample, bandHalfWidth, inverseGram, makeBand, widen, withRoundingFloor, type Band } from './least-absolute-band.ts';
import { certify, finalPass, ROW_ZERO_EPS, type Certificate, type FinalPass } from './least-absolute-certificate.ts';
import { descendLeastAbsolute, type CompactLeastAbsolute, type DescentResult, type DescentStart } from './least-absolute-descent.ts';
import { proveByBand, type BandProof } from './least-absolute-proof.ts';
import { vertexSides, type VertexSides } from './least-absolute-vertex-sides.ts';
import { screenRows, type FullScreen } from './least-absolute-screen.ts';
import { fitSubsample, leastSquaresStart, positionsIn, binarySearch, type SubsampleOptions } from './least-absolute-subsample.ts';
import { buildFrame, frameCoefficients, frameVector, gatherFrameRows, rawCoefficients, type ColumnFrame } from './simplex-frame.ts';
import { assertProblemShape, systematicSample, unsolved, vetWarmStart } from './simplex-problem.ts';
import { designRank } from './simplex-rank.ts';
import { factorLu, solveLu } from './linear-solve.ts';
import { madScaleInPlace, madScaleOfResiduals } from './simplex-residual-scale.ts';
import { defineCachedField } from './cached-field.ts';
import { residualsOf } from './problem.ts';
import type { FitOptions, FitResult, LinearProblem } from './types.ts';
import { smallFloat64 } from './small-array.ts';
import { dotRow } from './row-forms.ts';

/** Up to this many rows the whole problem goes to the descent directly (screening costs more). */
export const DIRECT_MAX_ROWS = 4096;
/**
 * Band multiplier κ (least-absolute-band.ts): the side proof holds unless χ²_p of the subsample
 * error exceeds κ² (P ≈ 1 % at p = 2, 3 % at p = 3 for κ = 3; the band then doubles and the rows
 * are screened once more). 3 rather than 4 keeps a quarter fewer rows (n = 10⁶: ~33 k against
 * ~45 k); over six seeds at n = 10⁶, p = 2 and 3, the fit moved 0.1–0.8 of the κ = 3 band and
 * every one was proved in one round; the fit took ~13 % less time (interleaved, geometric mean).
 */
export const BAND_KAPPA = 3;
/** Floor of the subsample size, so that its quantiles and its fit mean something. */
export const MIN_SUBSAMPLE_ROWS = 512;
/** Subsample size = this × (p·n)^(2/3) (Portnoy & Koenker's order; the factor tuned on the benchmark). */
export const SUBSAMPLE_FACTOR = 1;
/**
 * A warm refit samples this many rows, for the frame, the band's shape (its Gram matrix) and the
 * band's width (their MAD). Any positive-definite shape keeps the side proof valid and the width
 * only sets how many rows are kept, so a small sample costs nothing in exactness; at n = 10⁴
 * gathering and factoring 1024 rows was half the warm refit.
 */
export const WARM_SAMPLE_ROWS = 256;
/** A warm refit keeps about this many rows per parameter around the previous fit. */
export const WARM_KEPT_ROWS = 32;
/** Screening rounds before giving up (the band doubles each time: 2¹² of the first width). */
export const MAX_SCREEN_ROUNDS = 12;
/** Beyond this fraction kept, screening does not pay: solve all rows directly. */
export const MAX_KEPT_FRACTION = 0.5;
/**
 * Rows the rounding bounds are scaled to: the largest sampled row magnitude times this. A row
 * more than 2¹⁰× larger than every sampled row, with a residual at rounding level, could be
 * given the side of its rounding — an error in the objective of the order of that rounding.
 */
export const ZERO_GUARD_FACTOR = 2 ** 10;
/**
 * Pivots allowed per descent: Barrodale–Roberts counts grow like a small multiple of p·log m; on
 * the benchmark data the worst seen (bench/quick-exact.ts prints them) is far below this.
 */
export function descentCap(m: number, p: number): number {
  return 64 + 16 * p * Math.ceil(Math.log2(m + 2));
}

/** √(π/2): a band ±δ holds a fraction δ·√(2/π)/σ of normal residuals near zero. */
const SQRT_HALF_PI = Math.sqrt(Math.PI / 2);

interface Context {
  problem: LinearProblem;
  iterations: number;
  cap: number | undefined;
  notes: string[];
  /** Whether the caller wants the vertex's side sum (fitLeastAbsoluteWithSides). */
  wantSides: boolean;
  sides: VertexSides | null;
}

interface Seed {
  beta: Float64Array;
  basis: Int32Array | null;
  band: Band;
  /** The expected fraction of rows inside the band (for the buffer sizes). */
  keepFraction: number;
  how: string;
}

export function fitLeastAbsolute(problem: LinearProblem, options: FitOptions = {}): FitResult {
  return solve(problem, options, false).result;
}

/**
 * The fit and, when the screened route proved it by the band (a warm refit at n > DIRECT_MAX_ROWS
 * nearly always), the side sum g of the returned vertex over all rows with its rounding bound
 * (least-absolute-vertex-sides.ts); null otherwise. For a fit session's vertex state: it saves
 * the pass that would recompute g.
 */
export function fitLeastAbsoluteWithSides(problem: LinearProblem, options: FitOptions = {}): { result: FitResult; sides: VertexSides | null } {
  return solve(problem, options, true);
}

function solve(problem: LinearProblem, options: FitOptions, wantSides: boolean): { result: FitResult; sides: VertexSides | null } {
  const ctx: Context = { problem, iterations: 0, cap: options.maxIterations, notes: [], wantSides, sides: null };
  const result = solveIn(ctx, options);
  return { result, sides: result.status === 'ok' ? ctx.sides : null };
}

function solveIn(ctx: Context, options: FitOptions): FitResult {
  const { problem } = ctx;
  assertProblemShape(problem);
  const { n, p } = problem;
  if (n < p) return unsolved('least-absolute', problem, 'too-few-rows', `${n} rows for ${p} parameters: least absolute deviations needs n ≥ p`);
  const warm = vetWarmStart(problem, options.warmStart, p);
  if (warm.note) ctx.notes.push(warm.note);
  const screened = n > DIRECT_MAX_ROWS;
  const m0 = !screened ? n : warm.coefficients ? Math.min(n, WARM_SAMPLE_ROWS)
    : Math.min(n, Math.max(MIN_SUBSAMPLE_ROWS, Math.round(SUBSAMPLE_FACTOR * (p * n) ** (2 / 3))));
  const sample = systematicSample(n, m0);
  const base = buildFrame(problem, sample, m0, new Float64Array(p));
  // One gather of the sample: moving the frame's reference fit by Lγ only shifts b̃ by −Ãγ.
  const sub = gatherRows(problem, base, sample, m0, new Float64Array(p));
  let beta0: Float64Array;
  if (warm.coefficients) {
    beta0 = warm.coefficients;
    shiftReference(sub, frameCoefficients(base, beta0));
  } else {
    const gamma0 = leastSquaresStart(sub);
    beta0 = rawCoefficients(base, gamma0);
    shiftReference(sub, gamma0);
  }
  const frame = withReference(base, beta0);
  if (!screened) return direct(ctx, frame, sample, warm.basis, 'all rows to the vertex descent');

  const seeded = warm.coefficients ? warmSeed(problem, frame, sub, warm.coefficients, warm.basis, warm.scale) : subsampleSeed(ctx, frame, sub, sample);
  if ('status' in seeded) return seeded;
  let { beta, basis, band } = seeded;
  let keepFraction = seeded.keepFraction;
  const magnitude = rowMagnitude(problem, sample, beta);
  band = withRoundingFloor(band, 8 * (p + 1) * Number.EPSILON * ZERO_GUARD_FACTOR * magnitude);

  for (let round = 1; round <= MAX_SCREEN_ROUNDS; round++) {
    const roundFrame = withReference(frame, beta);
    const screen = screenRows(problem, beta, band, Math.ceil(1.5 * n * Math.min(1, keepFraction)) + 64);
    if (screen.keptCount > MAX_KEPT_FRACTION * n) return direct(ctx, frame, sample, basis, `band kept ${screen.keptCount} of ${n} rows`);
    const cp = keptCompact(roundFrame, screen);
    const start: DescentStart = { gamma: new Float64Array(p) };
    const startBasis = basis ? positionsIn(basis, screen.kept, screen.keptCount) : null;
    if (startBasis) start.basis = startBasis;
    const res = descendLeastAbsolute(cp, start, ctx.cap ?? descentCap(cp.m, p));
    ctx.iterations += res.iterations;
    if (res.status === 'degenerate-direction') return rankOrDirect(ctx, frame, sample, 'the kept rows span fewer than p directions');
    if (res.status === 'unbounded') {
      // Pinned rows on the wrong side left the small problem without a minimum: widen.
      band = widen(band);
      keepFraction *= 2;
      continue;
    }
    const basisRows = res.basis.map((k) => screen.kept[k]);
    const betaStar = refineVertex(problem, roundFrame, rawCoefficients(roundFrame, res.gamma), basisRows);
    const detail = `${seeded.how}; band ±${bandHalfWidth(band, p).toPrecision(3)} (at an average row) kept ${screen.keptCount} rows, ` +
      `pinned ${screen.above} above and ${screen.below} below` + (round > 1 ? `; ${round} rounds` : '');
    const proof = proveByBand(problem, roundFrame, band, cp, res, screen);
    if (proof.ok || res.status === 'iteration-cap') {
      if (proof.ok && ctx.wantSides) ctx.sides = vertexSides(screen, res.sign, n, p);
      return finishProven(ctx, problem, betaStar, basisRows, beta, screen, res, proof,
        res.status === 'iteration-cap' ? `descent stopped at its iteration cap; ${detail}` : detail, warm.coefficients !== null);
    }
    // No proof from the band: certify on all rows (slower, conclusive).
    const cand = evaluate(ctx, betaStar, basisRows, sample, sideInScreen(problem, beta, screen, res.sign));
    if (cand.cert.ok) return finish(ctx, cand, `${detail}; ${proof.reason}, so certified by a full pass`);
    beta = betaStar;
    basis = basisRows;
    band = widen(band);
    keepFraction *= 2;
  }
  return direct(ctx, frame, sample, basis, `no certificate after ${MAX_SCREEN_ROUNDS} screening rounds`);
}

/** The subsample fit, its vertex and the band around it. */
function subsampleSeed(ctx: Context, frame: ColumnFrame, sub: CompactLeastAbsolute, sample: Int32Array): Seed | FitResult {
  const { p } = ctx.problem;
  const fit = fitSubsample(sub, frame, subsampleOptions(ctx));
  ctx.iterations += fit.iterations;
  const res = fit.result;
  if (res.status === 'degenerate-direction') return rankOrDirect(ctx, frame, sample, 'the subsample spans fewer than p directions');
  if (res.status !== 'optimal') return direct(ctx, frame, sample, null, `subsample descent ended ${res.status}`);
  return {
    beta: rawCoefficients(frame, res.gamma),
    basis: res.basis.map((k) => sample[k]),
    band: bandFromSubsample(frame, sub.A, res.residuals, sub.m, Math.min(1, BAND_KAPPA * Math.sqrt(p / sub.m))),
    keepFraction: Math.min(1, BAND_KAPPA * Math.sqrt(p / sub.m)),
    how: `subsample of ${sub.m} rows`,
  };
}

/** The previous fit and basis, with a band holding ~WARM_KEPT_ROWS·p rows around it. */
function warmSeed(problem: LinearProblem, frame: ColumnFrame, sub: CompactLeastAbsolute, beta: Float64Array, basis: Int32Array | null, scale: number | null): Seed {
  const { n, p } = problem;
  const q = Math.min(1, (WARM_KEPT_ROWS * p) / n);
  const rho = residualsAt(sub, frameCoefficients(frame, beta));
  const Q = inverseGram(sub.A, sub.m, p);
  const sigma = scale ?? madScaleInPlace(Float64Array.from(rho), sub.m);
  const band = Q && sigma > 0 ? makeBand(frame, Q, sigma * SQRT_HALF_PI * q) : bandFromSubsample(frame, sub.A, rho, sub.m, q);
  return { beta, basis, band, keepFraction: q, how: 'warm start' };
}

/**
 * One step of iterative refinement of the vertex on the raw basis rows: δγ solves Ã_B δγ = r_B
 * (the raw residuals of the basis rows, whitened) in the frame, β += L·δγ. The frame's reference
 * fit can be far from the optimum (least squares pulled by a gross outlier), and then the
 * vertex solved in the frame carries an absolute error of ε times that distance; one step
 * brings the basis rows to interpolation at the rounding of their own magnitude (GVL §3.5.3).
 */
export function refineVertex(problem: LinearProblem, frame: ColumnFrame, beta: Float64Array, basis: Int32Array): Float64Array {
  const { p, X, y, weights } = problem;
  const { L } = frame;
  const AB = smallFloat64(p * p);
  const r = new Float64Array(p);
  for (let k = 0; k < p; k++) {
    const i = basis[k];
    const s = weights ? Math.sqrt(weights[i]) : 1;
    let f = 0;
    for (let j = 0; j < p; j++) f += X[i * p + j] * beta[j];
    r[k] = s * (y[i] - f);
    for (let c = 0; c < p; c++) {
      let t = 0;
      for (let j = 0; j < p; j++) t += X[i * p + j] * L[j * p + c];
      AB[k * p + c] = s * t;
    }
  }
  const lu = factorLu(AB, p);
  if (lu.singular) return beta;
  const dg = solveLu(lu, r);
  const out = Float64Array.from(beta);
  for (let j = 0; j < p; j++) {
    let t = 0;
    for (let c = 0; c < p; c++) t += L[j * p + c] * dg[c];
    out[j] += t;
  }
  for (let j = 0; j < p; j++) if (!Number.isFinite(out[j])) return beta;
  return out;
}

/** Largest √wᵢ(|yᵢ| + Σ|xᵢⱼβⱼ|) over the sample: the scale of the rounding bounds. */
function rowMagnitude(problem: LinearProblem, rows: Int32Array, beta: Float64Array): number {
  const { p, X, y, weights } = problem;
  let magnitude = 0;
  for (let k = 0; k < rows.length; k++) {
    const i = rows[k];
    const m = absTerms(Math.abs(y[i]), X, i * p, beta, p);
    magnitude = Math.max(magnitude, m * (weights ? Math.sqrt(weights[i]) : 1));
  }
  return magnitude;
}

/** start + Σⱼ |xⱼβⱼ| of one row, left to right (p = 3 written out, as in row-forms.ts). */
function absTerms(start: number, X: Float64Array, o: number, beta: Float64Array, p: number): number {
  if (p === 3) return start + Math.abs(X[o] * beta[0]) + Math.abs(X[o + 1] * beta[1]) + Math.abs(X[o + 2] * beta[2]);
  let m = start;
  for (let j = 0; j < p; j++) m += Math.abs(X[o + j] * beta[j]);
  return m;
}

/** The result once the band proof (or the iteration cap) ended the screened solve. */
function finishProven(
  ctx: Context, problem: LinearProblem, beta: Float64Array, basis: Int32Array, betaScreen: Float64Array, screen: FullScreen,
  res: DescentResult, proof: BandProof, how: string, lazyResiduals: boolean,
): FitResult {
  const { p } = problem;
  // A warm refit (a fit session's refit after one more reading) leaves the n residuals to their
  // first read, like the session's own results: the proof needs none, and at n = 10⁴ the pass was
  // a sixth of the refit. They are then computed from the problem's arrays at that moment.
  const residuals = lazyResiduals ? new Float64Array(0) : residualsOf(problem, beta);
  // Pinned rows kept their sides: Σ sᵢρᵢ(β*) = Σ|ρᵢ(β_s)| − (Σ sᵢaᵢ)·(β* − β_s), linear in β*.
  let objective = screen.pinnedAbs;
  for (let j = 0; j < p; j++) objective -= screen.pinnedSum[j] * (beta[j] - betaScreen[j]);
  for (let k = 0; k < res.residuals.length; k++) objective += Math.abs(res.residuals[k]);
  if (!proof.fullRankProved) {
    const rank = designRank(problem);
    if (rank.deficient) return rankDeficient(ctx, rank.column, rank.pivots[rank.column], rank.threshold);
  }
  const notes = ctx.notes.length ? `; ${ctx.notes.join('; ')}` : '';
  const rows = Array.from(basis).join(', ');
  const result: FitResult = {
    estimator: 'least-absolute',
    status: proof.ok ? 'ok' : 'not-converged',
    coefficients: beta,
    residuals,
    objective,
    scale: NaN,
    iterations: ctx.iterations,
    converged: proof.ok,
    reason: proof.ok ? `exact: the vertex through rows ${rows} is optimal (${proof.reason}); ${how}${notes}`
      : `not proven optimal: ${proof.reason}; ${how}${notes}`,
    basis,
  };
  if (lazyResiduals) defineCachedField(result, 'residuals', () => residualsOf(problem, beta));
  return withLazyScale(problem, result);
}

/** All rows to the descent (small n, or a fallback from screening). */
function direct(ctx: Context, frame: ColumnFrame, sample: Int32Array, basis: Int32Array | null, how: string): FitResult {
  const { problem } = ctx;
  const { n, p } = problem;
  const all = new Int32Array(n);
  for (let i = 0; i < n; i++) all[i] = i;
  const start: DescentStart = { gamma: new Float64Array(p) };
  if (basis) start.basis = basis;
  const cp = gatherRows(problem, frame, all, n, new Float64Array(p));
  const res = descendLeastAbsolute(cp, start, ctx.cap ?? descentCap(n, p));
  ctx.iterations += res.iterations;
  if (res.status === 'degenerate-direction' || res.status === 'unbounded') {
    const rank = designRank(problem);
    if (rank.deficient) return rankDeficient(ctx, rank.column, rank.pivots[rank.column], rank.threshold);
    return unsolved('least-absolute', problem, 'not-converged', `descent on all rows ended '${res.status}' on a full-rank design`, ctx.iterations);
  }
  const sign = res.sign;
  const beta = refineVertex(problem, frame, rawCoefficients(frame, res.gamma), res.basis);
  const cand = evaluate(ctx, beta, res.basis, sample, (i) => (sign[i] === 0 ? 1 : sign[i]));
  return finish(ctx, cand, res.status === 'iteration-cap' ? `descent stopped at its iteration cap; ${how}` : how);
}

function rankOrDirect(ctx: Context, frame: ColumnFrame, sample: Int32Array, why: string): FitResult {
  const rank = designRank(ctx.problem);
  if (rank.deficient) return rankDeficient(ctx, rank.column, rank.pivots[rank.column], rank.threshold);
  return direct(ctx, frame, sample, null, `${why}; all rows to the vertex descent`);
}

function rankDeficient(ctx: Context, column: number, pivot: number, threshold: number): FitResult {
  return unsolved('least-absolute', ctx.problem, 'rank-deficient',
    `column ${column} is a combination of the others (scaled QR pivot ${pivot.toExponential(2)} ≤ max(n, p)·ε·max pivot = ${threshold.toExponential(2)})`,
    ctx.iterations);
}

interface Candidate {
  beta: Float64Array;
  basis: Int32Array;
  pass: FinalPass;
  cert: Certificate;
}

/** Full final pass + certificate at β with basis rows (raw indices). */
function evaluate(ctx: Context, beta: Float64Array, basis: Int32Array, sample: Int32Array, side: (row: number) => number): Candidate {
  const { problem } = ctx;
  const magnitude = Math.max(rowMagnitude(problem, sample, beta), rowMagnitude(problem, basis, beta));
  const zeroGuard = ZERO_GUARD_FACTOR * ROW_ZERO_EPS * Number.EPSILON * magnitude;
  const pass = finalPass(problem, beta, zeroGuard);
  const cert = certify(problem, beta, basis, pass, side);
  return { beta, basis, pass, cert };
}

function finish(ctx: Context, cand: Candidate, how: string): FitResult {
  const { problem } = ctx;
  const { cert, pass } = cand;
  if (!cert.fullRankProved) {
    const rank = designRank(problem);
    if (rank.deficient) return rankDeficient(ctx, rank.column, rank.pivots[rank.column], rank.threshold);
  }
  const rows = Array.from(cand.basis).join(', ');
  const notes = ctx.notes.length ? `; ${ctx.notes.join('; ')}` : '';
  return withLazyScale(problem, {
    estimator: 'least-absolute',
    status: cert.ok ? 'ok' : 'not-converged',
    coefficients: cand.beta,
    residuals: pass.residuals,
    objective: pass.objective,
    scale: NaN,
    iterations: ctx.iterations,
    converged: cert.ok,
    reason: cert.ok ? `exact: the vertex through rows ${rows} is optimal (${cert.reason}); ${how}${notes}`
      : `not proven optimal: ${cert.reason}; ${how}${notes}`,
    basis: cand.basis,
  });
}

/**
 * The MAD scale of the whitened residuals, computed when first read (cached-field.ts): the exact
 * L1 fit does not need it, and at n = 10⁶ counting its windows is a fifth of the fit. The
 * M-estimators read it for their start, the report and diagnostics when they show it.
 */
function withLazyScale(problem: LinearProblem, result: FitResult): FitResult {
  defineCachedField(result, 'scale', () => madScaleOfResiduals(result.residuals, problem.weights));
  return result;
}

/** The side a row was given: its compact side when kept, else its side at the screening fit. */
function sideInScreen(problem: LinearProblem, beta: Float64Array, screen: FullScreen, sign: Int8Array): (row: number) => number {
  return (row) => {
    const at = binarySearch(screen.kept, screen.keptCount, row);
    if (at >= 0) return sign[at] === 0 ? 1 : sign[at];
    const { p, X, y } = problem;
    let f = 0;
    for (let j = 0; j < p; j++) f += X[row * p + j] * beta[j];
    return y[row] - f >= 0 ? 1 : -1;
  };
}

/** The kept rows (copied raw by the screening pass) in the round's frame, with the pinned rows' linear term. */
function keptCompact(frame: ColumnFrame, screen: FullScreen): CompactLeastAbsolute {
  const { p, L, betaRef } = frame;
  const m = screen.keptCount;
  const { keptX, keptY, keptS } = screen;
  const A = new Float64Array(m * p);
  const b = new Float64Array(m);
  if (p === 3) compactRows3(keptX, keptY, keptS, m, L, betaRef, A, b);
  else for (let r = 0; r < m; r++) {
    const s = keptS[r];
    let f = 0;
    for (let j = 0; j < p; j++) f += keptX[r * p + j] * betaRef[j];
    b[r] = s * (keptY[r] - f);
    for (let k = 0; k < p; k++) {
      let t = 0;
      for (let j = 0; j < p; j++) t += keptX[r * p + j] * L[j * p + k];
      A[r * p + k] = s * t;
    }
  }
  const c = frameVector(frame, screen.pinnedSum).map((v) => -v);
  return { m, p, A, b, c };
}

/**
 * keptCompact's rows for p = 3 with L and β_ref in locals (the generic loops reload them for every
 * row); the same products in the same order. Measured at n = 10⁶: ~1 ms off the fit (at p = 2 the
 * same change was within the noise, so p = 2 keeps the generic loop).
 */
function compactRows3(X: Float64Array, y: Float64Array, S: Float64Array, m: number, L: Float64Array, beta: Float64Array, A: Float64Array, b: Float64Array): void {
  const c0 = beta[0], c1 = beta[1], c2 = beta[2];
  const l00 = L[0], l01 = L[1], l02 = L[2], l10 = L[3], l11 = L[4], l12 = L[5], l20 = L[6], l21 = L[7], l22 = L[8];
  for (let r = 0; r < m; r++) {
    const s = S[r];
    const x0 = X[3 * r], x1 = X[3 * r + 1], x2 = X[3 * r + 2];
    b[r] = s * (y[r] - (x0 * c0 + x1 * c1 + x2 * c2));
    A[3 * r] = s * (x0 * l00 + x1 * l10 + x2 * l20);
    A[3 * r + 1] = s * (x0 * l01 + x1 * l11 + x2 * l21);
    A[3 * r + 2] = s * (x0 * l02 + x1 * l12 + x2 * l22);
  }
}

function gatherRows(problem: LinearProblem, frame: ColumnFrame, rows: Int32Array, count: number, c: Float64Array): CompactLeastAbsolute {
  const { p } = problem;
  const A = new Float64Array(count * p);
  const b = new Float64Array(count);
  gatherFrameRows(problem, frame, rows, count, A, b);
  return { m: count, p, A, b, c };
}

function subsampleOptions(ctx: Context): SubsampleOptions {
  const fixed = ctx.cap;
  return { directMaxRows: DIRECT_MAX_ROWS, kappa: BAND_KAPPA, minRows: MIN_SUBSAMPLE_ROWS, cap: (m, p) => fixed ?? descentCap(m, p) };
}

function residualsAt(cp: CompactLeastAbsolute, gamma: Float64Array): Float64Array {
  const { m, p, A, b } = cp;
  const out = new Float64Array(m);
  for (let i = 0; i < m; i++) out[i] = b[i] - dotRow(A, i * p, gamma, p);
  return out;
}

/** b̃ ← b̃ − Ãγ: the compact rows re-referenced to β_ref + Lγ. */
function shiftReference(cp: CompactLeastAbsolute, gamma: Float64Array): void {
  const { m, p, A, b } = cp;
  for (let i = 0; i < m; i++) b[i] -= dotRow(A, i * p, gamma, p);
}

function withReference(frame: ColumnFrame, beta: Float64Array): ColumnFrame {
  return { p: frame.p, L: frame.L, betaRef: Float64Array.from(beta), intercept: frame.intercept };
}
