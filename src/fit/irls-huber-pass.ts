// Huber's fused IRLS/Newton pass (irls-fused-pass.ts), one loop per degree model p = 2, 3.
//
// ρ(u) = u²/2 inside |u| ≤ k, k|u| − k²/2 outside (Huber 1964). Written branch-free on
// m = min(|u|, k): ρ = m·(m/2) + k·(|u| − m), ψ² = m², IRLS weight v = k/max(|u|, k) (exactly 1
// inside, k/|u| outside, as before) and ψ′ = h = [|u| ≤ k] as a 0/1 number. min and max are
// formed from h (m = |u|·h + k·(1 − h), max = |u|·(1 − h) + k·h: one term is an exact 0, so the
// values are bit for bit Math.min's and Math.max's for finite u): V8's Math.min/max handle NaN
// and −0 with extra compares and branches, and cost 12.0 against 9.9 ns/row in the evaluation
// pass at n = 10⁶ (same process, interleaved). Why: the side of ±k is
// unpredictable for ~20 % of the rows (5 % outliers plus the normal tails beyond 1.345), and the
// branchy loop cost 8.9 ns/row against 7.3 at n = 10⁴ (p = 2, Newton plan, same process).
// One function per p, each called with one shape only: the generic loop (`p === 3 ?` per row, a
// band argument sometimes null) ran 10 ns/row at n = 10⁴ but 17–37 at 10⁶, process to process;
// these run 10–11 (p = 2) and 13–14 (p = 3) at both sizes (same process, interleaved, medians).
// Huber's "did any reading change side" is read from the previous pass's weight (exactly 1
// inside), as an integer OR: no side array, no branch.
import type { HuberBand } from './huber-active-set.ts';
import type { FusedSums } from './irls-fused-pass-sums.ts';
import type { LinearProblem } from './types.ts';
import type { NormalWorkspace } from './weighted-normal.ts';

const EMPTY = new Float64Array(0);

/**
 * Huber pass for p = 2: residuals (computed unless `ready`), robust weights, Σρ, Σψ², Σψ′, the
 * side-change flag, and into `ws` the normal equations (G with ψ′ for `newton`, with v
 * otherwise; b = Σ v·r·z). With a band, lists the rows with ||u| − k| < band.margin.
 */
export function huberPass2(problem: LinearProblem, k: number, beta: Float64Array, inv: number, residuals: Float64Array,
  weights: Float64Array, ready: boolean, ws: NormalWorkspace, newton: boolean, out: FusedSums, band: HuberBand | null): void {
  const { n, X, y } = problem;
  const { shift, scale, gram, rhs } = ws;
  const s0 = shift[0], s1 = shift[1], d0 = scale[0], d1 = scale[1];
  const c0 = beta[0], c1 = beta[1];
  // newton selects ψ′ or v for G by arithmetic (nf·h + vf·v), not a per-row branch.
  const nf = newton ? 1 : 0, vf = 1 - nf;
  // margin −1 lists nothing (|gap| ≥ 0): one always-false compare per row when there is no band.
  const margin = band ? band.margin : -1;
  const bx = band ? band.x : EMPTY, br = band ? band.r : EMPTY;
  const capacity = br.length;
  let listed = 0;
  let g00 = 0, g01 = 0, g11 = 0, b0 = 0, b1 = 0;
  let objective = 0, sumPsi2 = 0, inside = 0, changed = 0;
  for (let i = 0, o = 0; i < n; i++, o += 2) {
    const x0 = X[o], x1 = X[o + 1];
    let r: number;
    // `ready` is the same for every row (always predicted); the L1 start's residuals are not rewritten.
    if (ready) r = residuals[i];
    else {
      r = y[i] - (x0 * c0 + x1 * c1);
      residuals[i] = r;
    }
    const u = r * inv;
    const a = Math.abs(u);
    const h = +(a <= k);
    const out1 = 1 - h;
    const m = a * h + k * out1;
    objective += m * (0.5 * m) + k * (a - m);
    sumPsi2 += m * m;
    const v = k / (a * out1 + k * h);
    changed |= +(weights[i] === 1) ^ h;
    inside += h;
    weights[i] = v;
    if (Math.abs(a - k) < margin) {
      if (listed < capacity) {
        bx[2 * listed] = x0;
        bx[2 * listed + 1] = x1;
        br[listed] = r;
      }
      listed++;
    }
    const z0 = (x0 - s0) * d0, z1 = (x1 - s1) * d1;
    const g = nf * h + vf * v;
    const gz0 = g * z0, gz1 = g * z1, vr = v * r;
    g00 += gz0 * z0; g01 += gz0 * z1; g11 += gz1 * z1;
    b0 += z0 * vr; b1 += z1 * vr;
  }
  gram[0] = g00; gram[1] = g01; gram[2] = 0; gram[3] = g11;
  rhs[0] = b0; rhs[1] = b1;
  finishHuber(out, band, listed, objective, changed, sumPsi2, inside);
}

/** huberPass2 for p = 3 (the x² model). */
export function huberPass3(problem: LinearProblem, k: number, beta: Float64Array, inv: number, residuals: Float64Array,
  weights: Float64Array, ready: boolean, ws: NormalWorkspace, newton: boolean, out: FusedSums, band: HuberBand | null): void {
  const { n, X, y } = problem;
  const { shift, scale, gram, rhs } = ws;
  const s0 = shift[0], s1 = shift[1], s2 = shift[2], d0 = scale[0], d1 = scale[1], d2 = scale[2];
  const c0 = beta[0], c1 = beta[1], c2 = beta[2];
  const nf = newton ? 1 : 0, vf = 1 - nf;
  const margin = band ? band.margin : -1;
  const bx = band ? band.x : EMPTY, br = band ? band.r : EMPTY;
  const capacity = br.length;
  let listed = 0;
  let g00 = 0, g01 = 0, g02 = 0, g11 = 0, g12 = 0, g22 = 0, b0 = 0, b1 = 0, b2 = 0;
  let objective = 0, sumPsi2 = 0, inside = 0, changed = 0;
  for (let i = 0, o = 0; i < n; i++, o += 3) {
    const x0 = X[o], x1 = X[o + 1], x2 = X[o + 2];
    let r: number;
    if (ready) r = residuals[i];
    else {
      r = y[i] - (x0 * c0 + x1 * c1 + x2 * c2);
      residuals[i] = r;
    }
    const u = r * inv;
    const a = Math.abs(u);
    const h = +(a <= k);
    const out1 = 1 - h;
    const m = a * h + k * out1;
    objective += m * (0.5 * m) + k * (a - m);
    sumPsi2 += m * m;
    const v = k / (a * out1 + k * h);
    changed |= +(weights[i] === 1) ^ h;
    inside += h;
    weights[i] = v;
    if (Math.abs(a - k) < margin) {
      if (listed < capacity) {
        bx[3 * listed] = x0;
        bx[3 * listed + 1] = x1;
        bx[3 * listed + 2] = x2;
        br[listed] = r;
      }
      listed++;
    }
    const z0 = (x0 - s0) * d0, z1 = (x1 - s1) * d1, z2 = (x2 - s2) * d2;
    const g = nf * h + vf * v;
    const gz0 = g * z0, gz1 = g * z1, gz2 = g * z2, vr = v * r;
    g00 += gz0 * z0; g01 += gz0 * z1; g02 += gz0 * z2; g11 += gz1 * z1; g12 += gz1 * z2; g22 += gz2 * z2;
    b0 += z0 * vr; b1 += z1 * vr; b2 += z2 * vr;
  }
  gram[0] = g00; gram[1] = g01; gram[2] = g02; gram[3] = 0; gram[4] = g11; gram[5] = g12; gram[6] = 0; gram[7] = 0; gram[8] = g22;
  rhs[0] = b0; rhs[1] = b1; rhs[2] = b2;
  finishHuber(out, band, listed, objective, changed, sumPsi2, inside);
}

/**
 * The evaluation pass (no normal equations): residuals, weights and the sums at β only — the
 * pass after the active-set finish and the final pass, whose equations nobody reads. p = 2 or 3.
 * Measured: 6–7 ns/row at n = 10⁴ and 8–11 at 10⁶, against 12–17 for the old pass doing the same
 * (before the min/max change above).
 */
export function huberEvaluate(problem: LinearProblem, k: number, beta: Float64Array, inv: number, residuals: Float64Array,
  weights: Float64Array, out: FusedSums): void {
  const { n, p, X, y } = problem;
  let objective = 0, sumPsi2 = 0, inside = 0, changed = 0;
  // Two loops rather than `p === 3 ?` per row (the residual is the only p-dependent part).
  if (p === 2) {
    const c0 = beta[0], c1 = beta[1];
    for (let i = 0, o = 0; i < n; i++, o += 2) {
      const r = y[i] - (X[o] * c0 + X[o + 1] * c1);
      residuals[i] = r;
      const a = Math.abs(r * inv);
      const h = +(a <= k);
      const out1 = 1 - h;
      const m = a * h + k * out1;
      objective += m * (0.5 * m) + k * (a - m);
      sumPsi2 += m * m;
      changed |= +(weights[i] === 1) ^ h;
      inside += h;
      weights[i] = k / (a * out1 + k * h);
    }
  } else {
    const c0 = beta[0], c1 = beta[1], c2 = beta[2];
    for (let i = 0, o = 0; i < n; i++, o += 3) {
      const r = y[i] - (X[o] * c0 + X[o + 1] * c1 + X[o + 2] * c2);
      residuals[i] = r;
      const a = Math.abs(r * inv);
      const h = +(a <= k);
      const out1 = 1 - h;
      const m = a * h + k * out1;
      objective += m * (0.5 * m) + k * (a - m);
      sumPsi2 += m * m;
      changed |= +(weights[i] === 1) ^ h;
      inside += h;
      weights[i] = k / (a * out1 + k * h);
    }
  }
  finishHuber(out, null, 0, objective, changed, sumPsi2, inside);
}

function finishHuber(out: FusedSums, band: HuberBand | null, listed: number, objective: number, changed: number, sumPsi2: number, inside: number): void {
  if (band) {
    band.count = Math.min(listed, band.r.length);
    band.overflowed = listed > band.r.length;
  }
  out.objective = objective;
  out.changed = changed !== 0;
  out.sumPsi2 = sumPsi2;
  // ψ′ ∈ {0, 1}: Σψ′² = Σψ′, the count inside ±k.
  out.sumD = inside;
  out.sumD2 = inside;
}
