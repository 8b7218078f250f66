// The side sum of a screened L1 optimum over all rows, from what the screening pass and the small
// solve already hold: no further pass over the data.
//
// The vertex test (least-absolute-certificate.ts) needs g = Σ_{i∉B} sᵢ√wᵢxᵢ with sᵢ the residual
// signs at the optimum. When the band proof holds (least-absolute-proof.ts), every pinned row is on
// the side it was pinned to, so its part of g is the screening pass's pinned sum S; the kept rows
// carry the small problem's sides (0 for the basis, an assigned ±1 for a zero residual, which is
// a valid subgradient choice). A fit session keeps g to test the vertex after more readings; it
// cost a full pass (~26 ns a row at n = 10⁴) after every new vertex, more than the refit itself.
//
// Rounding: S is summed plainly in blocks of SCREEN_BLOCK rows and the blocks by TwoSum, so
// |S̃ⱼ − Sⱼ| ≤ γ_SCREEN_BLOCK·Σ|aᵢⱼ| + 2ε|Sⱼ| with Σ|aᵢⱼ| ≤ √(n·Σaᵢⱼ²) (Cauchy–Schwarz; the pass
// keeps Σaᵢⱼ²); the ~WARM_KEPT_ROWS·p kept terms are added plainly, γ_m·Σ_kept|aₖⱼ|; the final
// sum adds ε|gⱼ| (Higham, "Accuracy and Stability of Numerical Algorithms", §3.1, §4.2).
import { SCREEN_BLOCK, type FullScreen } from './least-absolute-screen.ts';

export interface VertexSides {
  /** g = Σ_{i∉B} sign(rᵢ)·√wᵢ·xᵢ over all n rows at the returned coefficients (raw columns). */
  g: Float64Array;
  /** Per column, a bound on |g̃ⱼ − gⱼ| from rounding (absolute, in g's units). */
  gErr: Float64Array;
}

/**
 * g and its rounding bound for a proven screened solve: `screen` the pass at the screening fit,
 * `sign` the small problem's sides of the kept rows (positions in screen.kept; 0 in the basis).
 */
export function vertexSides(screen: FullScreen, sign: Int8Array, n: number, p: number): VertexSides {
  const { keptX, keptS, keptCount, pinnedSum, colSq } = screen;
  const g = Float64Array.from(pinnedSum);
  const keptAbs = new Float64Array(p);
  for (let k = 0; k < keptCount; k++) {
    const s = sign[k] * keptS[k];
    for (let j = 0; j < p; j++) {
      g[j] += s * keptX[k * p + j];
      keptAbs[j] += Math.abs(keptS[k] * keptX[k * p + j]);
    }
  }
  const gErr = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    const pinnedErr = gammaK(SCREEN_BLOCK) * Math.sqrt(n * colSq[j]) + 2 * Number.EPSILON * Math.abs(pinnedSum[j]);
    gErr[j] = pinnedErr + gammaK(keptCount + 1) * (keptAbs[j] + Math.abs(pinnedSum[j])) + Number.EPSILON * Math.abs(g[j]);
  }
  return { g, gErr };
}

/** γ_k = kε/(1 − kε). */
function gammaK(k: number): number {
  return (k * Number.EPSILON) / (1 - k * Number.EPSILON);
}
