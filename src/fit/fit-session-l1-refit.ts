// A fit session's exact L1 refit after its kept vertex failed the dual test (fit-session.ts),
// with no pass over the rows: the rows far from the fit are pinned by the sorted residual
// reference (fit-session-scale.ts), only the rows near it are solved.
//
// Why: one more reading moves the L1 optimum by a pivot or two, among the rows whose residuals
// are near zero; a screened refit (least-absolute.ts) still makes a pass over all n rows to find
// them and prove the rest, ~80 % of a refit at n = 10⁴. The reference holds every old row's
// whitened residual ρ̃ᵢ at β_ref in sorted order with running sums of (ρ̃ᵢ, aᵢ = √wᵢxᵢ), so:
// 1. Candidates: the old rows with |ρ̃ᵢ| ≤ W (one run of the sorted array, by binary search) and
//    every row added since the reference. W holds ~WINDOW_ROWS rows each side of zero, and at
//    least twice the reach of the previous answer (fit-session-bounds.ts).
// 2. The other rows are "pinned" to the side sᵢ = sign ρ̃ᵢ (Portnoy & Koenker, Statistical Science
//    12 (1997) 279, §4): while reach(β − β_ref) < min |ρ̃ᵢ| over them, none changes side, so their
//    part of the objective is linear in β: Σ sᵢρᵢ(β) = Σ|ρ̃ᵢ| − Pᵀ(β − β_ref), P = Σ sᵢaᵢ, both
//    differences of two rows of the running sums.
// 3. The small problem (candidates + linear term −Pᵀβ) is solved exactly by the vertex descent
//    (least-absolute-descent.ts) from the previous vertex, then refined on the raw rows.
// 4. Proof: the answer's reach from β_ref is below the pinned rows' smallest |ρ̃|, so every pin
//    holds; then the dual condition over all n rows, with g = P + Σ_{candidates ∉ B} sᵢaᵢ and
//    g's rounding bound, is the certificate's own test (fit-session-vertex.ts). Any failure: the
//    caller falls back to the plain fitter, so this path only ever saves time.
import { defineCachedField } from './cached-field.ts';
import { ROW_ZERO_EPS } from './least-absolute-certificate.ts';
import { descendLeastAbsolute, type CompactLeastAbsolute, type DescentStart } from './least-absolute-descent.ts';
import { descentCap, refineVertex } from './least-absolute.ts';
import { residualsOf } from './problem.ts';
import { buildFrame, frameVector, gatherFrameRows, rawCoefficients } from './simplex-frame.ts';
import { madScaleOfResiduals } from './simplex-residual-scale.ts';
import { scratchFloat64, scratchInt32 } from './scratch.ts';
import { reachBetween, type RowBounds } from './fit-session-bounds.ts';
import { bound, type SortedResiduals } from './fit-session-scale.ts';
import { dualTest, gamma, vertexState, type L1Vertex } from './fit-session-vertex.ts';
import type { FitResult, LinearProblem } from './types.ts';

/** Old rows each side of zero in the first window (a few pivots' worth of rows near the fit). */
export const WINDOW_ROWS = 48;
/** Beyond this many candidates the screened plain refit is as cheap: give up. */
export const MAX_CANDIDATES = 4096;

interface Window {
  /** Half-width: the old candidates are the rows with |ρ̃| ≤ W. */
  W: number;
  /** Sorted positions [lo, hi) of the old candidates. */
  lo: number;
  hi: number;
  /** Smallest |ρ̃| among the pinned old rows (Infinity when none). */
  margin: number;
}

/** The run of sorted values within [−W, W] and the pinned rows' smallest |ρ̃|. */
function windowOf(ref: SortedResiduals, W: number): Window {
  const v = ref.values;
  const lo = bound(v, -W, false);
  const hi = bound(v, W, true);
  const margin = Math.min(lo > 0 ? -v[lo - 1] : Infinity, hi < v.length ? v[hi] : Infinity);
  return { W, lo, hi, margin };
}

/**
 * The pinned rows' sums for a window: column 0 is Σ sᵢρ̃ᵢ = Σ|ρ̃ᵢ|, columns 1…p are P = Σ sᵢaᵢ
 * (above minus below), each with a rounding bound: the running sums are compensated (error
 * ≤ γ²ₙ·Σ|·| each, Ogita, Rump & Oishi, SIAM J. Sci. Comput. 26 (2005) 1955, Prop. 4.5) and three
 * of them are combined in 4 roundings of at most their magnitudes.
 */
function pinnedSums(ref: SortedResiduals, w: Window, q: number): { sum: Float64Array; err: Float64Array } {
  const { prefix: H, prefixLo: Lo, rows, absTotal } = ref;
  const sum = new Float64Array(q);
  const err = new Float64Array(q);
  const g2 = gamma(rows) ** 2;
  for (let j = 0; j < q; j++) {
    const T = H[rows * q + j];
    const A = H[w.hi * q + j];
    const B = H[w.lo * q + j];
    sum[j] = T - A - B + (Lo[rows * q + j] - Lo[w.hi * q + j] - Lo[w.lo * q + j]);
    err[j] = 4 * Number.EPSILON * (Math.abs(T) + Math.abs(A) + Math.abs(B) + Math.abs(sum[j])) + 3 * g2 * absTotal[j];
  }
  return { sum, err };
}

export interface L1Refit {
  result: FitResult;
  vertex: L1Vertex;
}

/**
 * The exact L1 fit of all rows from the reference, or null when a window would be too wide or a
 * proof fails (the caller then runs the plain fitter). `prev` is the previous answer (start), its
 * reach from β_ref sets the first window.
 */
export function refitFromReference(problem: LinearProblem, prev: FitResult, ref: SortedResiduals, bounds: RowBounds, cap?: number): L1Refit | null {
  const { n } = problem;
  if (ref.rows > n || ref.rows === 0 || !prev.basis || prev.basis.length !== problem.p) return null;
  const v = ref.values;
  const zero = bound(v, 0, false);
  const near = Math.max(zero > WINDOW_ROWS ? -v[zero - WINDOW_ROWS] : 0, zero + WINDOW_ROWS - 1 < v.length ? v[zero + WINDOW_ROWS - 1] : 0);
  let W = Math.max(near, 2 * reachBetween(bounds, prev.coefficients, ref.beta, ref.frame));
  // A second window when the answer moved past the first one's pins.
  for (let attempt = 0; attempt < 2; attempt++) {
    const win = windowOf(ref, W);
    if (win.hi - win.lo + (n - ref.rows) > MAX_CANDIDATES) return null;
    const out = solveWindow(problem, prev, ref, bounds, win, cap);
    if (out === null) return null;
    if ('result' in out) return out;
    W = 2 * out.reach;
  }
  return null;
}

function solveWindow(
  problem: LinearProblem, prev: FitResult, ref: SortedResiduals, bounds: RowBounds, win: Window, cap: number | undefined,
): L1Refit | { reach: number } | null {
  const { n, p, X, y, weights } = problem;
  const q = p + 1;
  const oldCount = win.hi - win.lo;
  const m = oldCount + (n - ref.rows);
  // Scratch (scratch.ts): allocating these few-hundred-entry arrays costs more than solving on them.
  const rows = scratchInt32('l1-refit.rows', m);
  rows.set(ref.order.subarray(win.lo, win.hi));
  for (let i = ref.rows; i < n; i++) rows[oldCount + i - ref.rows] = i;

  const pinned = pinnedSums(ref, win, q);
  const P = pinned.sum.subarray(1);
  const frame = buildFrame(problem, rows, m, prev.coefficients);
  const A = scratchFloat64('l1-refit.A', m * p);
  const b = scratchFloat64('l1-refit.b', m);
  gatherFrameRows(problem, frame, rows, m, A, b);
  const c = frameVector(frame, P).map((t) => -t);
  const cp: CompactLeastAbsolute = { m, p, A, b, c };
  const start: DescentStart = { gamma: new Float64Array(p), reuse: true };
  const at = positionsOf(prev.basis as Int32Array, rows);
  if (at) start.basis = at;
  const res = descendLeastAbsolute(cp, start, cap ?? descentCap(m, p));
  if (res.status !== 'optimal') return null;
  const basis = res.basis.map((k) => rows[k]);
  const beta = refineVertex(problem, frame, rawCoefficients(frame, res.gamma), basis);

  // The pins hold: every pinned row's residual moved less than its distance from zero.
  const reach = reachBetween(bounds, beta, ref.beta, ref.frame);
  if (!(reach < win.margin)) return { reach };

  // g over all rows at the new vertex, the candidates' sides from their raw residuals (the
  // rounding rule of fit-session-vertex.ts: a zero to rounding takes side 0, a valid subgradient).
  const g = Float64Array.from(P);
  const candAbs = new Float64Array(p);
  const inBasis = new Set<number>(basis);
  const zeroEps = ROW_ZERO_EPS * Number.EPSILON;
  let candObjective = 0;
  for (let k = 0; k < m; k++) {
    const i = rows[k];
    const sw = weights ? Math.sqrt(weights[i]) : 1;
    let f = 0;
    let size = Math.abs(y[i]);
    for (let j = 0; j < p; j++) {
      const t = X[i * p + j] * beta[j];
      f += t;
      size += Math.abs(t);
      candAbs[j] += Math.abs(sw * X[i * p + j]);
    }
    const rho = sw * (y[i] - f);
    candObjective += Math.abs(rho);
    if (inBasis.has(i) || !(Math.abs(rho) > zeroEps * sw * size)) continue;
    const side = rho > 0 ? sw : -sw;
    for (let j = 0; j < p; j++) g[j] += side * X[i * p + j];
  }
  const gErr = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    gErr[j] = pinned.err[j + 1] + gamma(m + 1) * (candAbs[j] + Math.abs(P[j])) + Number.EPSILON * Math.abs(g[j]);
  }
  const vertex = vertexState(problem, beta, basis, { g, gErr });
  if (!vertex) return null;
  const test = dualTest(vertex, n);
  if (!test.ok) return null;

  // Objective: the candidates' Σ√w|r| plus the pinned rows' Σ sᵢρᵢ(β) = Σ|ρ̃ᵢ| − Pᵀ(β − β_ref).
  let objective = candObjective + pinned.sum[0];
  for (let j = 0; j < p; j++) objective -= P[j] * (beta[j] - ref.beta[j]);
  const result: FitResult = {
    estimator: 'least-absolute',
    status: 'ok',
    coefficients: beta,
    residuals: new Float64Array(0),
    objective,
    scale: NaN,
    iterations: res.iterations,
    converged: true,
    reason: `exact: the vertex through rows ${Array.from(basis).join(', ')} is optimal (dual condition max|z| = ${test.maxDual.toPrecision(6)} ≤ 1 ` +
      `over all ${n} rows); fit session: solved on the ${m} rows within ±${win.W.toPrecision(3)} of its sorted residual reference ` +
      `and since it, the other ${n - m} pinned to their sides (they move by at most ${reach.toPrecision(3)})`,
    basis,
  };
  defineCachedField(result, 'residuals', () => residualsOf(problem, beta));
  defineCachedField(result, 'scale', () => madScaleOfResiduals(result.residuals, problem.weights));
  return { result, vertex };
}

/** Positions of the basis rows among the candidates, or null when one is not a candidate. */
function positionsOf(basis: Int32Array, rows: Int32Array): Int32Array | null {
  const out = new Int32Array(basis.length);
  for (let k = 0; k < basis.length; k++) {
    const at = rows.indexOf(basis[k]);
    if (at < 0) return null;
    out[k] = at;
  }
  return out;
}
