// Tukey's biweight fused IRLS/Newton pass (irls-fused-pass.ts), one loop per degree model p = 2, 3.
//
// With q = (u/c)² and t = max(1 − q, 0): ρ = c²/6·(1 − t³), IRLS weight v = t², ψ = u·v and
// ψ′ = t·(1 − 5q) (Beaton & Tukey 1974). Clamping t at 0 gives the outside values (ρ = c²/6,
// v = ψ = ψ′ = 0) from the inside formulas, bit for bit the branchy form's (ψ′ becomes −0,
// which adds nothing), so the loop has no data-dependent branch. One function per p, each
// called with one shape only (the generic loop's per-row `p === 3 ?` and mixed call shapes made
// it up to 4× slower at n = 10⁶ than at 10⁴). Measured, same process, interleaved medians:
// p = 2 8.3/7.9 ns/row at n = 10⁴/10⁶ against 11.6/12.4; p = 3 10.6/10.1 against 13.1/44.8.
// The side-change flag is not tracked for Tukey (irls.ts uses it only for a piecewise-quadratic
// ρ) and is reported as true.
import type { FusedSums } from './irls-fused-pass-sums.ts';
import type { LinearProblem } from './types.ts';
import type { NormalWorkspace } from './weighted-normal.ts';

/**
 * Tukey pass for p = 2: residuals (computed unless `ready`), robust weights, Σρ, Σψ², Σψ′, Σψ′²,
 * and into `ws` the normal equations (G with ψ′ for `newton`, with v otherwise; b = Σ v·r·z).
 */
export function tukeyPass2(problem: LinearProblem, c: number, beta: Float64Array, inv: number, residuals: Float64Array,
  weights: Float64Array, ready: boolean, ws: NormalWorkspace, newton: boolean, out: FusedSums): void {
  const { n, X, y } = problem;
  const { shift, scale, gram, rhs } = ws;
  const s0 = shift[0], s1 = shift[1], d0 = scale[0], d1 = scale[1];
  const c0 = beta[0], c1 = beta[1];
  const invC2 = 1 / (c * c);
  const cap = (c * c) / 6;
  const nf = newton ? 1 : 0, vf = 1 - nf;
  let g00 = 0, g01 = 0, g11 = 0, b0 = 0, b1 = 0;
  let objective = 0, sumPsi2 = 0, sumD = 0, sumD2 = 0;
  for (let i = 0, o = 0; i < n; i++, o += 2) {
    const x0 = X[o], x1 = X[o + 1];
    let r: number;
    if (ready) r = residuals[i];
    else {
      r = y[i] - (x0 * c0 + x1 * c1);
      residuals[i] = r;
    }
    const u = r * inv;
    const q = u * u * invC2;
    const e = 1 - q;
    const t = 0.5 * (e + Math.abs(e)); // max(e, 0) exactly, without Math.max's NaN/−0 branches (irls-huber-pass.ts)
    objective += cap * (1 - t * t * t);
    const v = t * t;
    const ps = u * v;
    sumPsi2 += ps * ps;
    const h = t * (1 - 5 * q);
    sumD += h;
    sumD2 += h * h;
    weights[i] = v;
    const z0 = (x0 - s0) * d0, z1 = (x1 - s1) * d1;
    const g = nf * h + vf * v;
    const gz0 = g * z0, gz1 = g * z1, vr = v * r;
    g00 += gz0 * z0; g01 += gz0 * z1; g11 += gz1 * z1;
    b0 += z0 * vr; b1 += z1 * vr;
  }
  gram[0] = g00; gram[1] = g01; gram[2] = 0; gram[3] = g11;
  rhs[0] = b0; rhs[1] = b1;
  finishTukey(out, objective, sumPsi2, sumD, sumD2);
}

/** tukeyPass2 for p = 3 (the x² model). */
export function tukeyPass3(problem: LinearProblem, c: number, beta: Float64Array, inv: number, residuals: Float64Array,
  weights: Float64Array, ready: boolean, ws: NormalWorkspace, newton: boolean, out: FusedSums): void {
  const { n, X, y } = problem;
  const { shift, scale, gram, rhs } = ws;
  const s0 = shift[0], s1 = shift[1], s2 = shift[2], d0 = scale[0], d1 = scale[1], d2 = scale[2];
  const c0 = beta[0], c1 = beta[1], c2 = beta[2];
  const invC2 = 1 / (c * c);
  const cap = (c * c) / 6;
  const nf = newton ? 1 : 0, vf = 1 - nf;
  let g00 = 0, g01 = 0, g02 = 0, g11 = 0, g12 = 0, g22 = 0, b0 = 0, b1 = 0, b2 = 0;
  let objective = 0, sumPsi2 = 0, sumD = 0, sumD2 = 0;
  for (let i = 0, o = 0; i < n; i++, o += 3) {
    const x0 = X[o], x1 = X[o + 1], x2 = X[o + 2];
    let r: number;
    if (ready) r = residuals[i];
    else {
      r = y[i] - (x0 * c0 + x1 * c1 + x2 * c2);
      residuals[i] = r;
    }
    const u = r * inv;
    const q = u * u * invC2;
    const e = 1 - q;
    const t = 0.5 * (e + Math.abs(e)); // max(e, 0) exactly, without Math.max's NaN/−0 branches (irls-huber-pass.ts)
    objective += cap * (1 - t * t * t);
    const v = t * t;
    const ps = u * v;
    sumPsi2 += ps * ps;
    const h = t * (1 - 5 * q);
    sumD += h;
    sumD2 += h * h;
    weights[i] = v;
    const z0 = (x0 - s0) * d0, z1 = (x1 - s1) * d1, z2 = (x2 - s2) * d2;
    const g = nf * h + vf * v;
    const gz0 = g * z0, gz1 = g * z1, gz2 = g * z2, vr = v * r;
    g00 += gz0 * z0; g01 += gz0 * z1; g02 += gz0 * z2; g11 += gz1 * z1; g12 += gz1 * z2; g22 += gz2 * z2;
    b0 += z0 * vr; b1 += z1 * vr; b2 += z2 * vr;
  }
  gram[0] = g00; gram[1] = g01; gram[2] = g02; gram[3] = 0; gram[4] = g11; gram[5] = g12; gram[6] = 0; gram[7] = 0; gram[8] = g22;
  rhs[0] = b0; rhs[1] = b1; rhs[2] = b2;
  finishTukey(out, objective, sumPsi2, sumD, sumD2);
}

function finishTukey(out: FusedSums, objective: number, sumPsi2: number, sumD: number, sumD2: number): void {
  out.objective = objective;
  out.changed = true;
  out.sumPsi2 = sumPsi2;
  out.sumD = sumD;
  out.sumD2 = sumD2;
}
