// The optimality proof of a screened least-absolute-deviations solve, without a second
// accounting pass over the data.
//
// The small problem's optimum γ* (kept rows exact, pinned rows as the linear term c) is optimal
// for all n rows when every pinned row is still on its side at γ*: then the full subgradient
// condition is the small one. That is proven from the band alone. The band kept row i unless
// rᵢ² ≥ (1+η)·scale·xᵢQxᵢᵀ + (1+1/η)·τ², so a pinned row has |rᵢ(β_s)| ≥ √(scale·xᵢQxᵢᵀ) + τ
// (least-absolute-band.ts, τ the rounding of rᵢ). Its residual moves by
// |xᵢ(β* − β_s)| ≤ √(xᵢQxᵢᵀ)·√((β* − β_s)ᵀQ⁻¹(β* − β_s)) (Cauchy–Schwarz in the Q metric), and
// in the frame (β* − β_s)ᵀQ⁻¹(β* − β_s) = γ*ᵀGγ* = D² with G = (G⁻¹)⁻¹ the band's Gram matrix.
// So D < √scale keeps every pinned residual strictly on its side, for every row at once.
//
// The dual condition is then re-checked on the small problem with g summed compensated, and
// the rounding of c (accumulated over ~n rows by the screening pass in blocks) carried through
// A_B⁻ᵀ: the relative gap is ≤ max(0, max|z| + error − 1) (see least-absolute-certificate.ts
// for the scaling argument). Full rank is proven from the basis as in `certify`.
import { GAP_TOL } from './least-absolute-certificate.ts';
import { provenScale, type Band } from './least-absolute-band.ts';
import type { CompactLeastAbsolute, DescentResult } from './least-absolute-descent.ts';
import { SCREEN_BLOCK, type FullScreen } from './least-absolute-screen.ts';
import { factorLu, matrixNorm1, inverseFromLu, solveLuTransposed } from './linear-solve.ts';
import type { ColumnFrame } from './simplex-frame.ts';
import type { LinearProblem } from './types.ts';

export interface BandProof {
  ok: boolean;
  /** D = √(γ*ᵀGγ*): every row's raw residual moved by at most √(xᵢQxᵢᵀ)·D. */
  move: number;
  maxDual: number;
  gapBound: number;
  fullRankProved: boolean;
  reason: string;
}

export function proveByBand(problem: LinearProblem, frame: ColumnFrame, band: Band, cp: CompactLeastAbsolute, res: DescentResult, screen: FullScreen): BandProof {
  const { n, p } = problem;
  const { m, A, c } = cp;
  const gamma = res.gamma;
  // D² = γᵀGγ with G the inverse of the band's G⁻¹.
  const fq = factorLu(band.frameQ, p);
  const G = fq.singular ? null : inverseFromLu(fq);
  let D2 = Infinity;
  if (G) {
    D2 = 0;
    for (let j = 0; j < p; j++) for (let k = 0; k < p; k++) D2 += gamma[j] * G[j * p + k] * gamma[k];
  }
  const move = Math.sqrt(Math.max(0, D2));
  const limit = Math.sqrt(provenScale(band));
  // A relative 1e-9 below the limit covers the rounding of D itself.
  const sidesProved = move < limit * (1 - 1e-9);

  // g = c − Σ_{kept ∉ B} sᵢãᵢ, compensated (Sum2), and z = Ã_B⁻ᵀ g. A column at a time, its sum
  // and compensation in locals (row by row they lived in memory: ~2 stores and reloads per term).
  const g = Float64Array.from(c);
  const sign = res.sign;
  for (let j = 0; j < p; j++) {
    let gj = g[j];
    let comp = 0;
    for (let i = 0; i < m; i++) {
      const s = sign[i];
      if (s === 0) continue;
      const v = -s * A[i * p + j];
      const t = gj + v;
      const w = t - gj;
      comp += gj - (t - w) + (v - w);
      gj = t;
    }
    g[j] = gj + comp;
  }
  const AB = new Float64Array(p * p);
  for (let r = 0; r < p; r++) for (let j = 0; j < p; j++) AB[r * p + j] = A[res.basis[r] * p + j];
  const lu = factorLu(AB, p);
  if (lu.singular) {
    return { ok: false, move, maxDual: Infinity, gapBound: Infinity, fullRankProved: false, reason: 'the basis rows are linearly dependent' };
  }
  const z = solveLuTransposed(lu, g);
  let maxDual = 0;
  for (let k = 0; k < p; k++) maxDual = Math.max(maxDual, Math.abs(z[k]));
  // Rounding of c: the screening pass's pinned sums err by ≤ γ_B·Σ|aᵢⱼ| + 2ε|Sⱼ| (Σ|aᵢⱼ| ≤ √(n·Σaᵢⱼ²)),
  // then c̃ = −LᵀS adds p·ε relative; g's own compensated sum is exact to ε|g|.
  const { L } = frame;
  const S = screen.pinnedSum;
  let cErr = 0;
  for (let k = 0; k < p; k++) {
    let e = 0;
    for (let j = 0; j < p; j++) {
      const dS = gamma_(SCREEN_BLOCK) * Math.sqrt(n * screen.colSq[j]) + 2 * Number.EPSILON * Math.abs(S[j]);
      e += Math.abs(L[j * p + k]) * (dS + p * Number.EPSILON * Math.abs(S[j]));
    }
    cErr = Math.max(cErr, e + Number.EPSILON * Math.abs(g[k]));
  }
  const invNorm = matrixNorm1(inverseFromLu(lu), p);
  const zErr = invNorm * cErr + 2 * p * Number.EPSILON * maxDual;
  const gapBound = Math.max(0, maxDual + zErr - 1);
  const dualProved = gapBound <= GAP_TOL;

  // Full rank from the raw basis rows: σ_min(X·D) ≥ 1/‖(A_B·D)⁻¹‖_F, D = diag(1/‖X e_j‖).
  const raw = new Float64Array(p * p);
  for (let r = 0; r < p; r++) {
    const k = res.basis[r];
    for (let j = 0; j < p; j++) raw[r * p + j] = screen.keptS[k] * screen.keptX[k * p + j];
  }
  const fr = factorLu(raw, p);
  let fullRankProved = false;
  if (!fr.singular) {
    const rinv = inverseFromLu(fr);
    let frob = 0;
    for (let j = 0; j < p; j++) {
      const norm = Math.sqrt(screen.colSq[j]);
      for (let k = 0; k < p; k++) frob += (rinv[j * p + k] * norm) ** 2;
    }
    fullRankProved = 1 / Math.sqrt(frob) > Math.max(n, p) * Number.EPSILON * Math.sqrt(p);
  }
  const ok = sidesProved && dualProved;
  const reason = !sidesProved
    ? `the fit moved ${move.toPrecision(3)} in the band's metric, beyond the band's ${limit.toPrecision(3)}`
    : dualProved
      ? `dual condition max|z| = ${maxDual.toPrecision(6)} ≤ 1 at the basis rows, relative gap ≤ ${gapBound.toExponential(1)}; ` +
        `the ${screen.above + screen.below} pinned rows provably kept their sides (the fit moved ${move.toPrecision(3)} < ${limit.toPrecision(3)} in the band's metric)`
      : `dual condition fails: max|z| = ${maxDual.toPrecision(6)} (relative gap bound ${gapBound.toExponential(1)})`;
  return { ok, move, maxDual, gapBound, fullRankProved, reason };
}

/** γ_k = kε/(1 − kε) (Higham, "Accuracy and Stability of Numerical Algorithms", §3.1). */
function gamma_(k: number): number {
  return (k * Number.EPSILON) / (1 - k * Number.EPSILON);
}
