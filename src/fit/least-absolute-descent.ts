// Exact least absolute deviations on a compact row set: vertex descent with exact line searches.
//
// Minimises F(γ) = Σᵢ |bᵢ − aᵢγ| + cᵀγ over γ ∈ ℝᵖ for m compact rows (already whitened and in
// the column frame, see simplex-frame.ts). The linear term c carries the rows pinned above or
// below the fit by the screening step ("globs", Portnoy & Koenker, Statistical Science 12 (1997)
// 279, §4): their contribution Σ sᵢ(bᵢ − aᵢγ) is linear in γ while their signs hold.
//
// The method is the primal form of Barrodale & Roberts (SIAM J. Numer. Anal. 10 (1973) 839):
// - A vertex is p rows B with aᵢγ = bᵢ. Moving along d_k = A_B⁻¹e_k releases basis row k; with
//   g = c − Σ_{i∉B} sᵢaᵢ (sᵢ the residual signs) the one-sided derivatives are 1 ± z_k where
//   Aᵀ_B z = g. The vertex is optimal iff max|z_k| ≤ 1 — this is the subgradient (dual)
//   condition: λ_B = −z, λᵢ = sᵢ elsewhere is a dual-feasible point with zero gap.
// - Otherwise step along d = −sign(z_k)·d_k (slope 1 − |z_k| < 0) to the minimum on that edge:
//   the breakpoints are the rows whose residual reaches zero, and the minimiser is the first at
//   which the accumulated slope jumps 2|aᵢd| reach |z_k| − 1 (a weighted quantile, found in
//   expected O(m) by least-absolute-line-search.ts). The step passes several vertices at once,
//   which is what makes B–R fast; that row enters the basis, row k leaves with sign sign(z_k).
// - A start that is not a vertex (a coefficient guess) becomes one by p exact two-sided line
//   minimisations, each inside the null space of the rows already interpolated (phase 1); F never
//   increases.
// Zero-residual rows outside the basis (degenerate vertices: repeated rows, exact fits) keep an
// assigned side, as a non-basic variable at a bound in the simplex method; a step of length zero
// is then an ordinary degenerate pivot. Ties are broken by position, deterministically.
//
// Speed (m up to ~10⁵ rows per solve, tens of pivots): each pivot is one fused loop over the rows
// — apply the previous step to the residuals, form vᵢ = aᵢd, and compact the candidate
// breakpoints branch-free — plus a windowed selection; sides and g are updated only for the rows
// that crossed. Every REFRESH_EVERY pivots, and before optimality is declared, residuals, sides
// and g are recomputed from the vertex itself, so incremental drift never decides anything. The
// loops are top-level functions over one state object of arrays, not closures (V8 inlines a
// closure by its identity, so fresh closures on every call deoptimised the code each time), and
// scalars travel as arguments (a numeric field that holds 1 in one call and 1.5 in the next
// changes the object's hidden class and deoptimises every reader). Each loop runs in chunks of
// CHUNK rows through a small kernel: a kernel called many times is optimised whole, with type
// feedback for every line, whereas a function entered once per solve with one long loop is
// optimised on the fly inside the loop ("on-stack replacement") before its tail has ever run,
// and measured here to fall back to the interpreter at that tail on every call.
import { factorLu, orthonormalComplement, solveLu, solveLuTransposed, type LuFactors } from './linear-solve.ts';
import { createSelectScratch, selectBreakpoint, selectCumulative, type SelectScratch } from './least-absolute-line-search.ts';
import { scratchFloat64, scratchInt32, scratchInt8, scratchUint8 } from './scratch.ts';
import { smallFloat64 } from './small-array.ts';

export interface CompactLeastAbsolute {
  readonly m: number;
  readonly p: number;
  /** m×p whitened frame rows, row-major. */
  readonly A: Float64Array;
  readonly b: Float64Array;
  /** Linear term of the objective (pinned rows), zeros when none. */
  readonly c: Float64Array;
}

export interface DescentStart {
  /** A coefficient guess in the frame (zeros when absent). */
  gamma?: Float64Array;
  /** p compact rows to try as the first vertex (e.g. the optimal basis of a previous solve). */
  basis?: Int32Array;
  /**
   * Take the m-sized work arrays from scratch.ts instead of allocating them (for small, frequent
   * solves: the fit session's refit). The result's `sign` and `residuals` are then scratch views,
   * dead at the next descent that reuses: the caller must not keep them.
   */
  reuse?: boolean;
}

export type DescentStatus = 'optimal' | 'unbounded' | 'degenerate-direction' | 'iteration-cap';

export interface DescentResult {
  status: DescentStatus;
  gamma: Float64Array;
  /** p compact row positions of the final vertex (valid when status is 'optimal' or 'iteration-cap'). */
  basis: Int32Array;
  /** Side of every compact row: +1 above, −1 below, 0 in the basis (assigned for zero residuals). */
  sign: Int8Array;
  residuals: Float64Array;
  /** Line searches done: phase-1 steps plus pivots. */
  iterations: number;
  /** max_k |z_k| at the last vertex; ≤ 1 + DESCENT_DUAL_TOL proves optimality of the compact problem. */
  maxDual: number;
  /** For 'degenerate-direction': a unit frame direction along which no compact row changes. */
  direction?: Float64Array;
}

/**
 * Stop pivoting once max|z_k| ≤ 1 + this. Below it a pivot would lower F by a relative amount of
 * at most this much (the dual point λ/(1 + e) is feasible, so the gap is ≤ e), far under the
 * 1e-9 the estimator promises, and comparable to the rounding in g for m ≈ 10⁵ rows.
 */
export const DESCENT_DUAL_TOL = 1e-11;
/**
 * A row moves along d only when |aᵢd| exceeds this fraction of max‖aᵢ‖·‖d‖: below it the change
 * is rounding noise of the product (p·ε relative), so the row is parallel to d.
 */
export const PARALLEL_REL = 64 * Number.EPSILON;
/** A residual within this many ε of the rows' magnitude scale (max|b| + max‖a‖·‖γ‖₁) is zero. */
export const ZERO_RESIDUAL_EPS = 64;
/** Pivots between exact recomputations of residuals, sides and g (bounds incremental drift to ~16 roundings). */
export const REFRESH_EVERY = 16;
/**
 * A warm basis whose smallest LU pivot is below this fraction of the largest is refused (the
 * start is re-derived by phase 1): at 1e-10 its vertex would already carry ~1e-6 relative error.
 */
export const WARM_BASIS_PIVOT_REL = 1e-10;

export function descendLeastAbsolute(cp: CompactLeastAbsolute, start: DescentStart, maxIterations: number): DescentResult {
  const st = createState(cp, start);
  const { m, p, A, b, c, rho, sign, V, keys, weights, ids, scratch, g, d, inBasis, basis } = st;
  const [bMax, aMax] = magnitudes(st);
  let iterations = 0;

  // ---- First vertex: the given basis when its rows are independent.
  let k0 = 0;
  if (start.basis && start.basis.length === p) {
    const AB = smallFloat64(p * p);
    for (let r = 0; r < p; r++) for (let j = 0; j < p; j++) AB[r * p + j] = A[start.basis[r] * p + j];
    const f = factorLu(AB, p);
    if (wellConditioned(f, p)) {
      const bB = new Float64Array(p);
      for (let r = 0; r < p; r++) bB[r] = b[start.basis[r]];
      st.gamma = solveLu(f, bB);
      basis.set(start.basis);
      k0 = p;
    }
  }
  computeResiduals(st);

  // ---- Phase 1: p exact line minimisations inside the null space of the rows fixed so far.
  for (let r = 0; r < k0; r++) inBasis[basis[r]] = 1;
  while (k0 < p) {
    const fixed = new Float64Array(k0 * p);
    for (let r = 0; r < k0; r++) for (let j = 0; j < p; j++) fixed[r * p + j] = A[basis[r] * p + j];
    const comp = orthonormalComplement(fixed, k0, p);
    const q = comp.length / p;
    // Steepest-descent direction of F at γ, projected on the complement (zero residuals add 0).
    subgradient(st, zeroTol(st, bMax, aMax));
    d.fill(0);
    for (let t = 0; t < q; t++) {
      let proj = 0;
      for (let j = 0; j < p; j++) proj += comp[t * p + j] * g[j];
      for (let j = 0; j < p; j++) d[j] -= proj * comp[t * p + j];
    }
    let dn = 0;
    for (let j = 0; j < p; j++) dn += d[j] * d[j];
    dn = Math.sqrt(dn);
    if (!(dn > 0)) for (let j = 0; j < p; j++) d[j] = comp[j];
    else for (let j = 0; j < p; j++) d[j] /= dn;
    // Two-sided exact minimisation of Σ|vᵢ|·|t − ρᵢ/vᵢ| + t·cᵀd.
    const count = lineCandidates(st, PARALLEL_REL * aMax);
    const W = st.sums[0];
    let h = 0;
    for (let j = 0; j < p; j++) h += c[j] * d[j];
    if (count === 0) return finish(st, 'degenerate-direction', iterations, Infinity, Float64Array.from(d));
    if (Math.abs(h) >= W) return finish(st, 'unbounded', iterations, Infinity);
    const pick = selectBreakpoint(keys, weights, ids, count, W, (W - h) / 2, false, scratch);
    const t = pick.key;
    for (let j = 0; j < p; j++) st.gamma[j] += t * d[j];
    for (let i = 0; i < m; i++) rho[i] -= t * V[i];
    rho[pick.id] = 0;
    basis[k0++] = pick.id;
    inBasis[pick.id] = 1;
    iterations++;
  }

  // ---- Phase 2: pivot while some edge descends.
  let lu = factorBasis(st);
  if (lu.singular) return finish(st, 'degenerate-direction', iterations, Infinity, Float64Array.from(d));
  st.gamma = solveLu(lu, st.bB);
  refresh(st, zeroTol(st, bMax, aMax));
  let pendingStep = 0; // the last step, applied to ρ in the next pass over the rows
  const z = new Float64Array(p);
  const unit = new Float64Array(p);
  let sinceRefresh = 0;
  for (;;) {
    solveLuTransposed(lu, g, z);
    let k = argMaxAbs(z);
    let zk = Math.abs(z[k]);
    if (zk <= 1 + DESCENT_DUAL_TOL || iterations >= maxIterations || sinceRefresh >= REFRESH_EVERY) {
      // Decide only on exact residuals, sides and g.
      refresh(st, zeroTol(st, bMax, aMax));
      pendingStep = 0;
      sinceRefresh = 0;
      solveLuTransposed(lu, g, z);
      k = argMaxAbs(z);
      zk = Math.abs(z[k]);
      if (zk <= 1 + DESCENT_DUAL_TOL) return finish(st, 'optimal', iterations, zk);
      if (iterations >= maxIterations) return finish(st, 'iteration-cap', iterations, zk);
    }
    const sz = z[k] > 0 ? 1 : -1;
    unit.fill(0);
    unit[k] = 1;
    solveLu(lu, unit, d);
    for (let j = 0; j < p; j++) d[j] = -sz * d[j];
    let dn = 0;
    for (let j = 0; j < p; j++) dn += d[j] * d[j];
    const vTol = PARALLEL_REL * aMax * Math.sqrt(dn);
    const target = zk - 1;
    // Only keys up to `hi` are kept by the pass: a pre-sample of the rows says where the
    // answer lies (the window is checked by weight, and the pass repeats without it if short).
    const hi = edgeWindow(st, vTol, pendingStep, target);
    let count = edgeCandidates(st, vTol, pendingStep, hi);
    const W = st.sums[0];
    if (W < target) return finish(st, 'unbounded', iterations, zk);
    if (st.sums[1] < target) count = edgeCandidates(st, vTol, 0, Infinity);
    pendingStep = 0;
    const pick = selectBreakpoint(keys, weights, ids, count, st.sums[1], target, true, scratch);
    const crossedIds = pick.inScratch ? scratch.ids : ids;
    for (let q = 0; q < pick.position; q++) {
      const i = crossedIds[q];
      const s = sign[i];
      for (let j = 0; j < p; j++) g[j] += 2 * s * A[i * p + j];
      sign[i] = -s;
    }
    const enter = pick.id;
    const leave = basis[k];
    const se = sign[enter];
    for (let j = 0; j < p; j++) g[j] += se * A[enter * p + j] - sz * A[leave * p + j];
    inBasis[leave] = 0;
    sign[leave] = sz;
    inBasis[enter] = 1;
    sign[enter] = 0;
    basis[k] = enter;
    pendingStep = pick.key;
    st.dPrev.set(d);
    iterations++;
    sinceRefresh++;
    lu = factorBasis(st);
    if (lu.singular) return finish(st, 'degenerate-direction', iterations, Infinity, Float64Array.from(d));
    st.gamma = solveLu(lu, st.bB);
  }
}

interface State {
  m: number;
  p: number;
  A: Float64Array;
  b: Float64Array;
  c: Float64Array;
  rho: Float64Array;
  sign: Int8Array;
  /** vᵢ = aᵢd of the last phase-1 direction. */
  V: Float64Array;
  /** The last phase-2 direction: its step is applied to ρ in the next pass (recomputing aᵢ·d costs less than storing it). */
  dPrev: Float64Array;
  keys: Float64Array;
  weights: Float64Array;
  ids: Int32Array;
  scratch: SelectScratch;
  g: Float64Array;
  d: Float64Array;
  gamma: Float64Array;
  inBasis: Uint8Array;
  basis: Int32Array;
  AB: Float64Array;
  bB: Float64Array;
  /** Scalar results of the passes (the candidates' total weight, the magnitudes). */
  sums: Float64Array;
}

function createState(cp: CompactLeastAbsolute, start: DescentStart): State {
  const { m, p, A, b, c } = cp;
  const reuse = start.reuse === true;
  // Reused slots are cleared to what a fresh array holds, so both routes start alike.
  return {
    m, p, A, b, c,
    rho: reuse ? scratchFloat64('descent.rho', m).fill(0) : new Float64Array(m),
    sign: (reuse ? scratchInt8('descent.sign', m) : new Int8Array(m)).fill(1),
    V: reuse ? scratchFloat64('descent.V', m).fill(0) : new Float64Array(m),
    keys: reuse ? scratchFloat64('descent.keys', m).fill(0) : new Float64Array(m),
    weights: reuse ? scratchFloat64('descent.weights', m).fill(0) : new Float64Array(m),
    ids: reuse ? scratchInt32('descent.ids', m).fill(0) : new Int32Array(m),
    scratch: createSelectScratch(m, reuse),
    g: new Float64Array(p), d: new Float64Array(p), dPrev: new Float64Array(p),
    gamma: start.gamma ? Float64Array.from(start.gamma) : new Float64Array(p),
    inBasis: reuse ? scratchUint8('descent.inBasis', m).fill(0) : new Uint8Array(m), basis: new Int32Array(p), AB: smallFloat64(p * p), bB: new Float64Array(p),
    sums: new Float64Array(2),
  };
}

/** [max|bᵢ|, max‖aᵢ‖]: the magnitude scale of the zero tests. */
function magnitudes(st: State): [number, number] {
  const { m, p, A, b, sums } = st;
  sums[0] = 0;
  sums[1] = 0;
  for (let from = 0; from < m; from += CHUNK) magnitudesChunk(A, b, p, from, Math.min(m, from + CHUNK), sums);
  return [sums[0], Math.sqrt(sums[1])];
}

function magnitudesChunk(A: Float64Array, b: Float64Array, p: number, from: number, to: number, out: Float64Array): void {
  let bMax = out[0];
  let aMax = out[1];
  for (let i = from; i < to; i++) {
    bMax = Math.max(bMax, Math.abs(b[i]));
    let s = 0;
    for (let j = 0; j < p; j++) s += A[i * p + j] * A[i * p + j];
    aMax = Math.max(aMax, s);
  }
  out[0] = bMax;
  out[1] = aMax;
}

function finish(st: State, status: DescentStatus, iterations: number, maxDual: number, direction?: Float64Array): DescentResult {
  const out: DescentResult = { status, gamma: st.gamma, basis: st.basis, sign: st.sign, residuals: st.rho, iterations, maxDual };
  if (direction) out.direction = direction;
  return out;
}

function zeroTol(st: State, bMax: number, aMax: number): number {
  let n1 = 0;
  for (let j = 0; j < st.p; j++) n1 += Math.abs(st.gamma[j]);
  return ZERO_RESIDUAL_EPS * Number.EPSILON * (bMax + aMax * n1);
}

/** Rows per kernel call (see the header: whole-function optimisation instead of on-stack replacement). */
export const CHUNK = 2048;

function computeResiduals(st: State): void {
  const { m, p, A, b, rho, gamma } = st;
  // p = 3 with γ in locals, as the edge pass (same products, same order).
  const chunk = p === 3 ? residualsChunk3 : residualsChunk;
  for (let from = 0; from < m; from += CHUNK) chunk(A, b, p, gamma, rho, from, Math.min(m, from + CHUNK));
}

function residualsChunk3(A: Float64Array, b: Float64Array, _p: number, gamma: Float64Array, rho: Float64Array, from: number, to: number): void {
  const c0 = gamma[0], c1 = gamma[1], c2 = gamma[2];
  for (let i = from; i < to; i++) rho[i] = b[i] - (A[3 * i] * c0 + A[3 * i + 1] * c1 + A[3 * i + 2] * c2);
}

function residualsChunk(A: Float64Array, b: Float64Array, p: number, gamma: Float64Array, rho: Float64Array, from: number, to: number): void {
  for (let i = from; i < to; i++) {
    let f = 0;
    for (let j = 0; j < p; j++) f += A[i * p + j] * gamma[j];
    rho[i] = b[i] - f;
  }
}

/** g = c − Σ sign(ρᵢ)·aᵢ over non-basis rows, zero residuals contributing nothing (phase 1). */
function subgradient(st: State, tol: number): void {
  const { m, p, A, rho, inBasis, g, c } = st;
  g.set(c);
  for (let from = 0; from < m; from += CHUNK) subgradientChunk(A, p, rho, inBasis, g, tol, from, Math.min(m, from + CHUNK));
}

function subgradientChunk(A: Float64Array, p: number, rho: Float64Array, inBasis: Uint8Array, g: Float64Array, tol: number, from: number, to: number): void {
  for (let i = from; i < to; i++) {
    const r = rho[i];
    const s = (+(r > tol) - +(r < -tol)) * (1 - inBasis[i]);
    for (let j = 0; j < p; j++) g[j] -= s * A[i * p + j];
  }
}

/** Phase-1 candidates: every non-basis row not parallel to d, key ρᵢ/vᵢ, weight |vᵢ| (total in sums[0]). */
function lineCandidates(st: State, vTol: number): number {
  const { m, p, A, d, rho, V, keys, weights, ids, inBasis, sums } = st;
  sums[0] = 0;
  let count = 0;
  for (let from = 0; from < m; from += CHUNK) {
    count = lineChunk(A, p, d, rho, V, keys, weights, ids, inBasis, vTol, from, Math.min(m, from + CHUNK), count, sums);
  }
  return count;
}

function lineChunk(
  A: Float64Array, p: number, d: Float64Array, rho: Float64Array, V: Float64Array, keys: Float64Array, weights: Float64Array,
  ids: Int32Array, inBasis: Uint8Array, vTol: number, from: number, to: number, count: number, sums: Float64Array,
): number {
  let W = 0;
  for (let i = from; i < to; i++) {
    let v = 0;
    for (let j = 0; j < p; j++) v += A[i * p + j] * d[j];
    V[i] = v;
    const av = Math.abs(v);
    const take = +(av > vTol) * (1 - inBasis[i]);
    keys[count] = rho[i] / v;
    weights[count] = av;
    ids[count] = i;
    W += take * av;
    count += take;
  }
  sums[0] += W;
  return count;
}

/**
 * Phase-2 pass: the previous step (t0) into ρ, vᵢ = aᵢd, and the rows whose residual moves
 * toward zero from their side, with key ≤ hi, compacted branch-free (the test is a coin flip per
 * row; a branch on it would mispredict half the time). Basis rows have side 0 and never
 * qualify. sums[0] = weight of all candidates, sums[1] = weight of those kept.
 */
function edgeCandidates(st: State, vTol: number, t0: number, hi: number): number {
  const { m, p, A, d, dPrev, rho, keys, weights, ids, sign, sums } = st;
  sums[0] = 0;
  sums[1] = 0;
  let count = 0;
  // p = 3 has its own loop with d and dPrev in locals (the generic j-loop reloads them for every
  // row): the pass is most of a large fit's descent. At p = 2 the gain was within the noise.
  const edge = p === 3 ? edgeChunk3 : edgeChunk;
  for (let from = 0; from < m; from += CHUNK) {
    count = edge(A, p, d, dPrev, rho, keys, weights, ids, sign, vTol, t0, hi, from, Math.min(m, from + CHUNK), count, sums);
  }
  return count;
}

/** edgeChunk for p = 3. */
function edgeChunk3(
  A: Float64Array, _p: number, d: Float64Array, dPrev: Float64Array, rho: Float64Array, keys: Float64Array, weights: Float64Array,
  ids: Int32Array, sign: Int8Array, vTol: number, t0: number, hi: number, from: number, to: number, count: number, sums: Float64Array,
): number {
  const d0 = d[0], d1 = d[1], d2 = d[2], e0 = dPrev[0], e1 = dPrev[1], e2 = dPrev[2];
  let W = 0;
  let Wk = 0;
  for (let i = from; i < to; i++) {
    const a0 = A[3 * i], a1 = A[3 * i + 1], a2 = A[3 * i + 2];
    const v = a0 * d0 + a1 * d1 + a2 * d2;
    const vp = a0 * e0 + a1 * e1 + a2 * e2;
    const r = rho[i] - t0 * vp;
    rho[i] = r;
    const take = +(sign[i] * v > vTol);
    const q = r / v;
    const key = 0.5 * (q + Math.abs(q));
    const w = 2 * Math.abs(v);
    const keep = take & +(key <= hi);
    keys[count] = key;
    weights[count] = w;
    ids[count] = i;
    W += take * w;
    Wk += keep * w;
    count += keep;
  }
  sums[0] += W;
  sums[1] += Wk;
  return count;
}

function edgeChunk(
  A: Float64Array, p: number, d: Float64Array, dPrev: Float64Array, rho: Float64Array, keys: Float64Array, weights: Float64Array,
  ids: Int32Array, sign: Int8Array, vTol: number, t0: number, hi: number, from: number, to: number, count: number, sums: Float64Array,
): number {
  let W = 0;
  let Wk = 0;
  for (let i = from; i < to; i++) {
    let v = 0;
    let vp = 0;
    for (let j = 0; j < p; j++) {
      const a = A[i * p + j];
      v += a * d[j];
      vp += a * dPrev[j];
    }
    const r = rho[i] - t0 * vp;
    rho[i] = r;
    const take = +(sign[i] * v > vTol);
    // max(0, r/v) as (x + |x|)/2: Math.max branches on the (random) sign, 7× slower here.
    const q = r / v;
    const key = 0.5 * (q + Math.abs(q));
    const w = 2 * Math.abs(v);
    const keep = take & +(key <= hi);
    keys[count] = key;
    weights[count] = w;
    ids[count] = i;
    W += take * w;
    Wk += keep * w;
    count += keep;
  }
  sums[0] += W;
  sums[1] += Wk;
  return count;
}

/** Rows sampled to place the pass's window (the rank error of the window edge is ≈ 0.5/√this). */
export const EDGE_SAMPLE = 512;
/** Window half-width in the sample's rank standard deviations, plus the weight estimate's error. */
export const EDGE_WINDOW_Z = 5;

/**
 * The key below which the wanted breakpoint lies with high probability: the weighted sample
 * quantile, at the target's share of the estimated total candidate weight plus a margin, of the
 * keys of EDGE_SAMPLE rows at a constant stride (ρ with the pending step applied, not stored).
 * +∞ (keep every candidate) for small problems or when the share is not small.
 */
function edgeWindow(st: State, vTol: number, t0: number, target: number): number {
  const { m, p, A, d, dPrev, rho, sign, scratch } = st;
  if (m <= 8 * EDGE_SAMPLE) return Infinity;
  const { sampleKeys, sampleWeights, sampleIds } = scratch;
  const stride = m / EDGE_SAMPLE;
  let count = 0;
  let W = 0;
  for (let k = 0; k < EDGE_SAMPLE; k++) {
    const i = Math.floor(k * stride);
    let v = 0;
    let vp = 0;
    for (let j = 0; j < p; j++) {
      v += A[i * p + j] * d[j];
      vp += A[i * p + j] * dPrev[j];
    }
    if (!(sign[i] * v > vTol)) continue;
    const q = (rho[i] - t0 * vp) / v;
    sampleKeys[count] = q > 0 ? q : 0;
    sampleWeights[count] = 2 * Math.abs(v);
    sampleIds[count] = i;
    W += 2 * Math.abs(v);
    count++;
  }
  if (count < 16) return Infinity;
  const share = target / (W * stride);
  const half = EDGE_WINDOW_Z * 0.5 / Math.sqrt(count) + 2 / count;
  if (!(share + half < 0.5)) return Infinity;
  const at = selectCumulative(sampleKeys, sampleWeights, sampleIds, count, (share + half) * W, { weight: 0 });
  return sampleKeys[at];
}

/** Residuals from the vertex itself, then the sides (assigned ones kept for zero residuals) and g. */
function refresh(st: State, tol: number): void {
  computeResiduals(st);
  const { m, p, A, rho, sign, inBasis, g, c } = st;
  g.set(c);
  for (let from = 0; from < m; from += CHUNK) {
    if (p === 3) refreshChunk3(A, rho, sign, inBasis, g, tol, from, Math.min(m, from + CHUNK));
    else refreshChunk(A, p, rho, sign, inBasis, g, tol, from, Math.min(m, from + CHUNK));
  }
}

/** refreshChunk for p = 3 with g in locals (the generic loop stores and reloads g[j] per row); same order of terms. */
function refreshChunk3(A: Float64Array, rho: Float64Array, sign: Int8Array, inBasis: Uint8Array, g: Float64Array, tol: number, from: number, to: number): void {
  let g0 = g[0], g1 = g[1], g2 = g[2];
  for (let i = from; i < to; i++) {
    if (inBasis[i]) {
      sign[i] = 0;
      rho[i] = 0;
      continue;
    }
    const r = rho[i];
    const decided = +(Math.abs(r) > tol);
    const kept = sign[i] === 0 ? 1 : sign[i];
    const s = decided * (1 - 2 * +(r < 0)) + (1 - decided) * kept;
    sign[i] = s;
    g0 -= s * A[3 * i];
    g1 -= s * A[3 * i + 1];
    g2 -= s * A[3 * i + 2];
  }
  g[0] = g0;
  g[1] = g1;
  g[2] = g2;
}

function refreshChunk(A: Float64Array, p: number, rho: Float64Array, sign: Int8Array, inBasis: Uint8Array, g: Float64Array, tol: number, from: number, to: number): void {
  for (let i = from; i < to; i++) {
    if (inBasis[i]) {
      sign[i] = 0;
      rho[i] = 0;
      continue;
    }
    const r = rho[i];
    // Branch-free where the residual decides (the common, random case).
    const decided = +(Math.abs(r) > tol);
    const kept = sign[i] === 0 ? 1 : sign[i];
    const s = decided * (1 - 2 * +(r < 0)) + (1 - decided) * kept;
    sign[i] = s;
    for (let j = 0; j < p; j++) g[j] -= s * A[i * p + j];
  }
}

function factorBasis(st: State): LuFactors {
  const { p, A, b, basis, AB, bB } = st;
  for (let r = 0; r < p; r++) {
    for (let j = 0; j < p; j++) AB[r * p + j] = A[basis[r] * p + j];
    bB[r] = b[basis[r]];
  }
  return factorLu(AB, p);
}

function argMaxAbs(z: Float64Array): number {
  let k = 0;
  for (let j = 1; j < z.length; j++) if (Math.abs(z[j]) > Math.abs(z[k])) k = j;
  return k;
}

/** Guard for a warm basis: reject nearly dependent rows (smallest LU pivot against the largest). */
function wellConditioned(f: LuFactors, p: number): boolean {
  if (f.singular) return false;
  let maxU = 0;
  let minU = Infinity;
  for (let j = 0; j < p; j++) {
    const u = Math.abs(f.lu[j * p + j]);
    maxU = Math.max(maxU, u);
    minU = Math.min(minU, u);
  }
  return minU > WARM_BASIS_PIVOT_REL * maxU;
}
