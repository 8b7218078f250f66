// The final pass and optimality certificate of the exact least-absolute-deviations fit.
//
// One pass over all n rows at the candidate β computes the raw residuals (returned), the
// objective Σ|ρᵢ| on the whitened problem, the MAD-scale windows (simplex-residual-scale.ts) and
// G = Σ_{i∉B} sᵢaᵢ with sᵢ the side of row i. The vertex is optimal iff z = A_B⁻ᵀG has
// max|z_k| ≤ 1 (subgradient condition; equivalently λ_B = −z, λᵢ = sᵢ is dual feasible for
// max Σλᵢbᵢ s.t. Σλᵢaᵢ = 0, |λᵢ| ≤ 1, with zero gap). When max|z_k| = 1 + e with e > 0, λ/(1+e)
// is feasible, so the relative gap of the objective is at most e: `gapBound` reports it, plus
// the rounding of G. Rows whose residual is zero to rounding keep the side the solver assigned
// them (any side in [−1, 1] is a valid subgradient for them), so degenerate vertices certify.
//
// Rounding: G sums n terms that cancel to O(p). Rows are summed plainly within blocks of
// SUM_BLOCK (the loop stays as fast as a plain sum) and the block sums are combined with TwoSum
// (Knuth; Ogita, Rump & Oishi, SIAM J. Sci. Comput. 26 (2005) 1955), so |error| ≤
// γ_SUM_BLOCK·Σ|aᵢⱼ| + 2ε|Gⱼ| (Higham, "Accuracy and Stability of Numerical Algorithms", 2nd ed.,
// §4.2), with Σ|aᵢⱼ| ≤ √(n·Σaᵢⱼ²). Carried through A_B⁻ᵀ this bounds the error of z; the bound
// (~1e-6 at n = 10⁶) only matters when max|z| is that close to 1, and then `certify` asks for a
// second pass with every term compensated (`compensatedSideSum`, error ≤ ε|G| + γ²_{n}Σ|aᵢⱼ|).
// The objective, a sum of positive terms, is summed in the same blocks (error ≤ (SUM_BLOCK +
// n/SUM_BLOCK)·ε relative).
import { factorLu, matrixNorm1, inverseFromLu, solveLuTransposed } from './linear-solve.ts';
import { nonFiniteRow } from './simplex-frame.ts';
import type { LinearProblem } from './types.ts';
import { smallFloat64 } from './small-array.ts';

export const SUM_BLOCK = 1024;
/** The certificate is accepted when the relative optimality gap bound is at most this (a tenth of the 1e-9 the estimator promises). */
export const GAP_TOL = 1e-10;
/** A row's residual is zero when within this many ε of its magnitude √wᵢ(|yᵢ| + Σ|xᵢⱼβⱼ|) (a few roundings of a p-term dot product, with margin). */
export const ROW_ZERO_EPS = 64;
/** Basis rows may sit this many times the zero tolerance off exact interpolation (β comes from the frame, not from these raw rows). */
export const BASIS_SLACK = 16;

export interface FinalPass {
  residuals: Float64Array;
  objective: number;
  G: Float64Array;
  /** Σ aᵢⱼ² per column (whitened), for the rank proof and the rounding bound. */
  colSq: Float64Array;
  /** Rows with |ρᵢ| ≤ zeroGuard: their side is settled after the pass. */
  zeroRows: Int32Array;
  zeroCount: number;
  zeroGuard: number;
  /** G was summed with every term compensated (second pass), so the tight bound applies. */
  compensated: boolean;
}

/**
 * The final pass at raw coefficients β. `zeroGuard` must exceed every row's zero tolerance.
 * Written for speed, because at n = 10⁶ it is a third of the fit:
 * - branch-free on the residual's sign (s = 1 − 2·[ρ < 0]; `+(bool)` compiles to a set-on-
 *   condition, a ternary to a branch): the signs are random, and a branch on them mispredicts
 *   half the time, which costs ~8 ns a row, six times the pass itself;
 * - only the rare zero residuals branch;
 * - no closures over the loop's variables (they would live in a heap context).
 */
export function finalPass(problem: LinearProblem, beta: Float64Array, zeroGuard: number): FinalPass {
  const { n, p, X, y, weights } = problem;
  const residuals = new Float64Array(n);
  let zeroRows: Int32Array = new Int32Array(64);
  let zeroCount = 0;
  const G = new Float64Array(p);
  const comp = new Float64Array(p);
  const blockG = new Float64Array(p);
  const colSq = new Float64Array(p);
  let objective = 0;
  if (p === 2 && !weights) {
    // The degree model without weights, unrolled: the bulk of every large fit.
    const b0 = beta[0];
    const b1 = beta[1];
    let q0 = 0;
    let q1 = 0;
    for (let start = 0; start < n; start += SUM_BLOCK) {
      const end = Math.min(n, start + SUM_BLOCK);
      let block = 0;
      let g0 = 0;
      let g1 = 0;
      for (let i = start; i < end; i++) {
        const x0 = X[2 * i];
        const x1 = X[2 * i + 1];
        // The operation order of residualsRange (problem.ts): the M-estimators reuse these bit for bit.
        const r = y[i] - (x0 * b0 + x1 * b1);
        residuals[i] = r;
        const a = Math.abs(r);
        block += a;
        q0 += x0 * x0;
        q1 += x1 * x1;
        const sg = 1 - 2 * +(r < 0);
        g0 += sg * x0;
        g1 += sg * x1;
        if (!(a > zeroGuard)) {
          // A zero residual (rare): its side is settled by `certify`, so take it back out.
          if (!(a === a)) throw nonFiniteRow(problem, i);
          g0 -= sg * x0;
          g1 -= sg * x1;
          if (zeroCount === zeroRows.length) zeroRows = grow(zeroRows);
          zeroRows[zeroCount++] = i;
        }
      }
      if (!Number.isFinite(block)) throw nonFiniteIn(problem, residuals, start, end);
      objective += block;
      [G[0], comp[0]] = twoSum(G[0], g0, comp[0]);
      [G[1], comp[1]] = twoSum(G[1], g1, comp[1]);
    }
    colSq[0] = q0;
    colSq[1] = q1;
  } else {
    for (let start = 0; start < n; start += SUM_BLOCK) {
      const end = Math.min(n, start + SUM_BLOCK);
      let block = 0;
      for (let i = start; i < end; i++) {
        const o = i * p;
        let s = 1;
        if (weights) {
          const w = weights[i];
          if (!(w > 0 && w < Infinity)) throw nonFiniteRow(problem, i);
          s = Math.sqrt(w);
        }
        let f = 0;
        for (let j = 0; j < p; j++) f += X[o + j] * beta[j];
        const r = y[i] - f;
        residuals[i] = r;
        const rho = s * r;
        const a = Math.abs(rho);
        block += a;
        const sg = s * (1 - 2 * +(rho < 0));
        for (let j = 0; j < p; j++) {
          const v = s * X[o + j];
          colSq[j] += v * v;
          blockG[j] += sg * X[o + j];
        }
        if (!(a > zeroGuard)) {
          if (!(a === a)) throw nonFiniteRow(problem, i);
          for (let j = 0; j < p; j++) blockG[j] -= sg * X[o + j];
          if (zeroCount === zeroRows.length) zeroRows = grow(zeroRows);
          zeroRows[zeroCount++] = i;
        }
      }
      if (!Number.isFinite(block)) throw nonFiniteIn(problem, residuals, start, end);
      objective += block;
      for (let j = 0; j < p; j++) {
        [G[j], comp[j]] = twoSum(G[j], blockG[j], comp[j]);
        blockG[j] = 0;
      }
    }
  }
  for (let j = 0; j < p; j++) G[j] += comp[j];
  return { residuals, objective, G, colSq, zeroRows, zeroCount, zeroGuard, compensated: false };
}

export interface Certificate {
  ok: boolean;
  /** max_k |z_k| over the basis. */
  maxDual: number;
  /** Bound on (objective − optimum)/objective. */
  gapBound: number;
  /** The basis rows' reciprocal-condition proof of full rank held (σ_min of the unit-column basis > max(n,p)·ε·√p). */
  fullRankProved: boolean;
  /** Largest |residual|/tolerance over basis rows (≤ BASIS_SLACK required). */
  basisOffset: number;
  reason: string;
}

/**
 * Settles the zero-residual rows (their side from `assignedSide(row)`, ±1; basis rows excluded),
 * completes G, and checks the dual condition at the basis rows `basis` (raw indices).
 */
export function certify(
  problem: LinearProblem, beta: Float64Array, basis: Int32Array, pass: FinalPass, assignedSide: (row: number) => number,
): Certificate {
  const { n, p, X, y, weights } = problem;
  const G = Float64Array.from(pass.G);
  const inBasis = new Set<number>(basis);
  const rowTol = (i: number): number => {
    const s = weights ? Math.sqrt(weights[i]) : 1;
    let m = Math.abs(y[i]);
    for (let j = 0; j < p; j++) m += Math.abs(X[i * p + j] * beta[j]);
    return ROW_ZERO_EPS * Number.EPSILON * s * m;
  };
  let basisOffset = 0;
  const settleZeros = (): void => {
    for (let k = 0; k < pass.zeroCount; k++) {
      const i = pass.zeroRows[k];
      if (inBasis.has(i)) continue;
      const s = weights ? Math.sqrt(weights[i]) : 1;
      const rho = s * pass.residuals[i];
      const side = Math.abs(rho) > rowTol(i) ? (rho > 0 ? 1 : -1) : assignedSide(i);
      for (let j = 0; j < p; j++) G[j] += side * s * X[i * p + j];
    }
  };
  settleZeros();
  const AB = smallFloat64(p * p);
  for (let r = 0; r < p; r++) {
    const i = basis[r];
    const s = weights ? Math.sqrt(weights[i]) : 1;
    for (let j = 0; j < p; j++) AB[r * p + j] = s * X[i * p + j];
    const tol = rowTol(i);
    const off = Math.abs(s * pass.residuals[i]) / (tol > 0 ? tol : Number.MIN_VALUE);
    basisOffset = Math.max(basisOffset, off);
  }
  const lu = factorLu(AB, p);
  if (lu.singular) {
    return { ok: false, maxDual: Infinity, gapBound: Infinity, fullRankProved: false, basisOffset, reason: 'the basis rows are linearly dependent' };
  }
  // |δz_k| ≤ Σ_j |A_B⁻¹[j, k]|·max_j|δG_j|.
  const inv = inverseFromLu(lu);
  const invNorm = matrixNorm1(inv, p);
  const dual = (): [number, number] => {
    const z = solveLuTransposed(lu, G);
    let maxDual = 0;
    for (let k = 0; k < p; k++) maxDual = Math.max(maxDual, Math.abs(z[k]));
    let gErr = 0;
    for (let j = 0; j < p; j++) {
      const absSum = Math.sqrt(n * pass.colSq[j]);
      gErr = Math.max(gErr, pass.compensated
        ? Number.EPSILON * Math.abs(G[j]) + gamma(n) ** 2 * absSum
        : gamma(SUM_BLOCK) * absSum + 2 * Number.EPSILON * Math.abs(G[j]));
    }
    return [maxDual, invNorm * gErr + 2 * p * Number.EPSILON * maxDual];
  };
  let [maxDual, zErr] = dual();
  if (!pass.compensated && maxDual <= 1 + GAP_TOL && maxDual + zErr > 1 + GAP_TOL) {
    // Too close to 1 for the blocked sum's bound: sum G again with every term compensated.
    pass.G = compensatedSideSum(problem, pass);
    pass.compensated = true;
    G.set(pass.G);
    settleZeros();
    [maxDual, zErr] = dual();
  }
  // The dual point (λ_B = −z, λᵢ = sᵢ) scaled by 1/max(1, max|z|) is feasible: gap ≤ max|z| − 1.
  const gapBound = Math.max(0, maxDual + zErr - 1);
  // Full rank: σ_min(X·D) ≥ σ_min(A_B·D) ≥ 1/‖(A_B·D)⁻¹‖_F with D = diag(1/‖X e_j‖); the layer's
  // QR rule calls the design deficient only below max(n, p)·ε·max|R_ii| ≤ max(n, p)·ε·√p.
  let frob = 0;
  for (let j = 0; j < p; j++) {
    const norm = Math.sqrt(pass.colSq[j]);
    for (let k = 0; k < p; k++) frob += (inv[j * p + k] * norm) ** 2;
  }
  const sigmaMinBound = 1 / Math.sqrt(frob);
  const fullRankProved = sigmaMinBound > Math.max(n, p) * Number.EPSILON * Math.sqrt(p);
  const ok = gapBound <= GAP_TOL && basisOffset <= BASIS_SLACK;
  const reason = ok
    ? `dual condition max|z| = ${maxDual.toPrecision(6)} ≤ 1 at the basis rows, relative gap ≤ ${gapBound.toExponential(1)}`
    : basisOffset > BASIS_SLACK
      ? `basis rows are ${basisOffset.toExponential(1)}× their zero tolerance off interpolation`
      : `dual condition fails: max|z| = ${maxDual.toPrecision(6)} > 1 (relative gap bound ${gapBound.toExponential(1)})`;
  return { ok, maxDual, gapBound, fullRankProved, basisOffset, reason };
}

/** The InputError for the first row of [from, to) with a non-finite residual (Σ|r| of the block was not finite). */
function nonFiniteIn(problem: LinearProblem, residuals: Float64Array, from: number, to: number): Error {
  for (let i = from; i < to; i++) if (!Number.isFinite(residuals[i])) return nonFiniteRow(problem, i);
  return nonFiniteRow(problem, from);
}

/**
 * G again at the final residuals, every term through TwoSum (Sum2 of Ogita, Rump & Oishi): the
 * slow, tight route for a dual value within the blocked sum's rounding bound of 1.
 */
export function compensatedSideSum(problem: LinearProblem, pass: FinalPass): Float64Array {
  const { n, p, X, weights } = problem;
  const G = new Float64Array(p);
  const comp = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    const s = weights ? Math.sqrt(weights[i]) : 1;
    const rho = s * pass.residuals[i];
    if (!(Math.abs(rho) > pass.zeroGuard)) continue;
    const sg = rho > 0 ? s : -s;
    for (let j = 0; j < p; j++) [G[j], comp[j]] = twoSum(G[j], sg * X[i * p + j], comp[j]);
  }
  for (let j = 0; j < p; j++) G[j] += comp[j];
  return G;
}

/** γ_k = kε/(1 − kε) (Higham §3.1). */
function gamma(k: number): number {
  return (k * Number.EPSILON) / (1 - k * Number.EPSILON);
}

/** TwoSum (Knuth): g + v = t + e exactly; returns [t, comp + e]. */
function twoSum(g: number, v: number, comp: number): [number, number] {
  const t = g + v;
  const w = t - g;
  return [t, comp + (g - (t - w)) + (v - w)];
}

function grow(buf: Int32Array): Int32Array {
  const next = new Int32Array(buf.length * 2);
  next.set(buf);
  return next;
}
