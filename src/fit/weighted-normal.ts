// Weighted normal equations on centred, scaled columns, solved in correction form.
//
// Used where a QR of the whole n×p design would cost too much: least squares at large n and every
// IRLS step. Three departures from the textbook XᵀVXβ = XᵀVy, each for accuracy:
// 1. Centring. When the design has an intercept column, every other column is shifted by its
//    prior-weighted mean (an exact reparameterisation: only the intercept changes). For
//    degree-length data x = sin²φ lies in a narrow band, and the uncentred Gram matrix loses
//    about 2·log10(cond) digits; centred it is nearly diagonal.
// 2. Scaling. Columns are divided by their raw weighted norms ‖√w xⱼ‖, so the Gram matrix is
//    O(1) and the pivot test below compares like with like.
// 3. Correction form. Each solve is δ = G⁻¹ Zᵀ V r with the residual r = y − Xβ computed from the
//    data, and β ← β + δ. A fixed point satisfies XᵀVr = 0 to the accuracy of r itself, whatever
//    the error of G⁻¹ (Björck, "Numerical Methods for Least Squares Problems", SIAM 1996, §2.5.3:
//    semi-normal equations with one step of refinement are as accurate as QR when cond²·ε < 1).
//    The guard `minPivotRatio` lets callers refuse problems where that fails.
import type { LinearProblem } from './types.ts';

export interface NormalWorkspace {
  readonly p: number;
  /** Intercept column, or −1 (then nothing is shifted). */
  readonly intercept: number;
  /** Value of the intercept column's entries (κ), 1 when there is none. */
  readonly interceptValue: number;
  /** Column shifts s_j (0 for the intercept column and when there is no intercept). */
  readonly shift: Float64Array;
  /** Column scales d_j = 1/‖√w x_j‖. */
  readonly scale: Float64Array;
  /** Factor order: the intercept first, so later pivots measure independence from it. */
  readonly order: Int32Array;
  readonly gram: Float64Array;
  readonly rhs: Float64Array;
  readonly chol: Float64Array;
  readonly z: Float64Array;
  readonly theta: Float64Array;
}

/**
 * Rows the shift and scale are taken from when n is larger (a systematic sample). Any shift and
 * any positive scale give an exact reparameterisation (the factor, the pivot ratio and the map
 * back to β below hold for whatever values are chosen); they only have to be near the weighted
 * mean and the column norm for the conditioning gain, which a sample of this size gives, and a
 * whole pass over X is saved for every fit.
 */
export const WORKSPACE_SAMPLE_ROWS = 2048;

/** Shift and scale from the prior weights; the buffers are reused by every accumulate/solve. */
export function createNormalWorkspace(problem: LinearProblem, intercept: number): NormalWorkspace {
  const { n, p, X, weights } = problem;
  const shift = new Float64Array(p);
  const scale = new Float64Array(p);
  const sums = new Float64Array(p);
  const sq = new Float64Array(p);
  let wsum = 0;
  const m = Math.min(n, WORKSPACE_SAMPLE_ROWS);
  const stride = n / m;
  for (let k = 0; k < m; k++) {
    const i = m === n ? k : Math.floor(k * stride);
    const w = weights ? weights[i] : 1;
    wsum += w;
    for (let j = 0; j < p; j++) {
      const x = X[i * p + j];
      sums[j] += w * x;
      sq[j] += w * x * x;
    }
  }
  // Norms of the whole columns, estimated from the sample (×n/m).
  for (let j = 0; j < p; j++) {
    if (intercept >= 0 && j !== intercept) shift[j] = wsum > 0 ? sums[j] / wsum : 0;
    scale[j] = sq[j] > 0 ? 1 / Math.sqrt((sq[j] * n) / m) : 1;
  }
  const order = new Int32Array(p);
  let k = 0;
  if (intercept >= 0) order[k++] = intercept;
  for (let j = 0; j < p; j++) if (j !== intercept) order[k++] = j;
  return workspace(p, intercept, intercept >= 0 ? X[intercept] : 1, shift, scale, order);
}

/**
 * Every workspace is built here, with one property order: the passes (irls-fused-pass.ts) read
 * the IRLS and the Newton workspace alternately, and two hidden classes (an object spread makes
 * another) turned their property reads polymorphic and deoptimised the pass to ~4× its time in
 * some processes.
 */
function workspace(p: number, intercept: number, interceptValue: number, shift: Float64Array, scale: Float64Array, order: Int32Array): NormalWorkspace {
  return {
    p, intercept, interceptValue, shift, scale, order,
    gram: new Float64Array(p * p), rhs: new Float64Array(p), chol: new Float64Array(p * p),
    z: new Float64Array(p), theta: new Float64Array(p),
  };
}

/**
 * G = Σ vᵢ zᵢzᵢᵀ and b = Σ uᵢ zᵢ rᵢ with zᵢⱼ = (xᵢⱼ − sⱼ)·dⱼ; `rowWeights` vᵢ (the prior weights
 * when undefined), `rhsWeights` uᵢ (vᵢ when undefined — a Newton step pairs ψ′ weights in G with
 * the IRLS weights in b). Upper triangle only.
 */
export function accumulateNormal(ws: NormalWorkspace, problem: LinearProblem, residuals: Float64Array, rowWeights: Float64Array | undefined,
  rhsWeights?: Float64Array): void {
  resetNormal(ws);
  addRows(ws, problem, 0, problem.n, residuals, rowWeights ?? problem.weights, rhsWeights);
}

/** Clears G and b before a sequence of addRows calls. */
export function resetNormal(ws: NormalWorkspace): void {
  ws.gram.fill(0);
  ws.rhs.fill(0);
}

/** A second workspace with the same shift, scale and order (no pass over the data). */
export function cloneNormalWorkspace(ws: NormalWorkspace): NormalWorkspace {
  return workspace(ws.p, ws.intercept, ws.interceptValue, Float64Array.from(ws.shift), Float64Array.from(ws.scale), Int32Array.from(ws.order));
}

/**
 * Adds rows start … start+m−1 to G and b, with residuals, row weights and right-hand-side weights
 * indexed from 0 for that range (a chunk; the whole problem when start = 0, m = n). Row weights
 * undefined: 1 for every row (pass problem.weights, or its chunk, for the prior weights).
 * Chunks of a few thousand rows keep each chunk's sums exact to ~ε·√chunk, and their sum over
 * chunks is a two-level (blocked) summation: no less accurate than one long sum.
 */
export function addRows(ws: NormalWorkspace, problem: LinearProblem, start: number, m: number, residuals: Float64Array,
  rowWeights: Float64Array | undefined, rhsWeights?: Float64Array): void {
  const { p, shift, scale, gram, rhs, z } = ws;
  const { X } = problem;
  const v = rowWeights;
  const u = rhsWeights ?? v;
  if (p === 2) {
    // The degree model: unrolled, the bulk of every benchmark.
    const s0 = shift[0], s1 = shift[1], d0 = scale[0], d1 = scale[1];
    let g00 = 0, g01 = 0, g11 = 0, b0 = 0, b1 = 0;
    for (let i = 0, o = 2 * start; i < m; i++, o += 2) {
      const vi = v ? v[i] : 1;
      const z0 = (X[o] - s0) * d0;
      const z1 = (X[o + 1] - s1) * d1;
      const vz0 = vi * z0, vz1 = vi * z1, ur = (u ? u[i] : 1) * residuals[i];
      g00 += vz0 * z0; g01 += vz0 * z1; g11 += vz1 * z1;
      b0 += z0 * ur; b1 += z1 * ur;
    }
    gram[0] += g00; gram[1] += g01; gram[3] += g11; rhs[0] += b0; rhs[1] += b1;
    return;
  }
  if (p === 3) {
    // The degree model with the k·x² term, unrolled likewise.
    const s0 = shift[0], s1 = shift[1], s2 = shift[2], d0 = scale[0], d1 = scale[1], d2 = scale[2];
    let g00 = 0, g01 = 0, g02 = 0, g11 = 0, g12 = 0, g22 = 0, b0 = 0, b1 = 0, b2 = 0;
    for (let i = 0, o = 3 * start; i < m; i++, o += 3) {
      const vi = v ? v[i] : 1;
      const z0 = (X[o] - s0) * d0;
      const z1 = (X[o + 1] - s1) * d1;
      const z2 = (X[o + 2] - s2) * d2;
      const vz0 = vi * z0, vz1 = vi * z1, vz2 = vi * z2, ur = (u ? u[i] : 1) * residuals[i];
      g00 += vz0 * z0; g01 += vz0 * z1; g02 += vz0 * z2; g11 += vz1 * z1; g12 += vz1 * z2; g22 += vz2 * z2;
      b0 += z0 * ur; b1 += z1 * ur; b2 += z2 * ur;
    }
    gram[0] += g00; gram[1] += g01; gram[2] += g02; gram[4] += g11; gram[5] += g12; gram[8] += g22;
    rhs[0] += b0; rhs[1] += b1; rhs[2] += b2;
    return;
  }
  for (let i = 0; i < m; i++) {
    const vi = v ? v[i] : 1;
    const ur = (u ? u[i] : 1) * residuals[i];
    if (vi === 0 && ur === 0) continue;
    const o = (start + i) * p;
    for (let j = 0; j < p; j++) z[j] = (X[o + j] - shift[j]) * scale[j];
    for (let j = 0; j < p; j++) {
      const vz = vi * z[j];
      rhs[j] += z[j] * ur;
      for (let k = j; k < p; k++) gram[j * p + k] += vz * z[k];
    }
  }
}

/**
 * Refinement pass: rᵢ = yᵢ − xᵢᵀβ into `residuals` and b = Σ wᵢ zᵢ rᵢ (prior weights), leaving G
 * and its factor untouched.
 */
export function accumulateResidualRhs(ws: NormalWorkspace, problem: LinearProblem, beta: Float64Array, residuals: Float64Array): void {
  const { p, shift, scale, rhs } = ws;
  const { n, X, y, weights } = problem;
  rhs.fill(0);
  if (p === 2) {
    const c0 = beta[0], c1 = beta[1], s0 = shift[0], s1 = shift[1], d0 = scale[0], d1 = scale[1];
    let b0 = 0, b1 = 0;
    for (let i = 0; i < n; i++) {
      const x0 = X[2 * i], x1 = X[2 * i + 1];
      const r = y[i] - (x0 * c0 + x1 * c1);
      residuals[i] = r;
      const vr = (weights ? weights[i] : 1) * r;
      b0 += vr * (x0 - s0);
      b1 += vr * (x1 - s1);
    }
    rhs[0] = b0 * d0;
    rhs[1] = b1 * d1;
    return;
  }
  if (p === 3) {
    const c0 = beta[0], c1 = beta[1], c2 = beta[2], s0 = shift[0], s1 = shift[1], s2 = shift[2];
    let b0 = 0, b1 = 0, b2 = 0;
    for (let i = 0; i < n; i++) {
      const x0 = X[3 * i], x1 = X[3 * i + 1], x2 = X[3 * i + 2];
      const r = y[i] - (x0 * c0 + x1 * c1 + x2 * c2);
      residuals[i] = r;
      const vr = (weights ? weights[i] : 1) * r;
      b0 += vr * (x0 - s0);
      b1 += vr * (x1 - s1);
      b2 += vr * (x2 - s2);
    }
    rhs[0] = b0 * scale[0];
    rhs[1] = b1 * scale[1];
    rhs[2] = b2 * scale[2];
    return;
  }
  for (let i = 0; i < n; i++) {
    let f = 0;
    for (let j = 0; j < p; j++) f += X[i * p + j] * beta[j];
    const r = y[i] - f;
    residuals[i] = r;
    const vr = (weights ? weights[i] : 1) * r;
    for (let j = 0; j < p; j++) rhs[j] += vr * (X[i * p + j] - shift[j]) * scale[j];
  }
}

function g(ws: NormalWorkspace, a: number, b: number): number {
  return a <= b ? ws.gram[a * ws.p + b] : ws.gram[b * ws.p + a];
}

/**
 * Cholesky of G in `order`. Returns min over columns of Lⱼⱼ / ‖√v xⱼ‖ (raw, uncentred, scaled
 * norm): the sine of the angle between a column and the span of the columns before it, so a
 * column that is constant up to rounding (every reading at one latitude) gives ~1e-16, not 1.
 * Returns 0 when a pivot is not positive.
 */
export function factorNormal(ws: NormalWorkspace): number {
  const { p, order, chol, shift, scale, intercept, interceptValue } = ws;
  chol.fill(0);
  let minRatio = Infinity;
  for (let a = 0; a < p; a++) {
    const ja = order[a];
    for (let b = 0; b <= a; b++) {
      let sum = g(ws, order[a], order[b]);
      for (let c = 0; c < b; c++) sum -= chol[a * p + c] * chol[b * p + c];
      if (a === b) {
        // Raw weighted norm² of scaled column ja from the centred sums: ‖z + t·z₀‖² with the
        // intercept column z₀ and t = sⱼ dⱼ/(κ d₀).
        let raw = g(ws, ja, ja);
        if (intercept >= 0 && ja !== intercept) {
          const t = (shift[ja] * scale[ja]) / (interceptValue * scale[intercept]);
          raw += 2 * t * g(ws, intercept, ja) + t * t * g(ws, intercept, intercept);
        }
        if (!(sum > 0) || !(raw > 0)) return 0;
        const l = Math.sqrt(sum);
        chol[a * p + a] = l;
        minRatio = Math.min(minRatio, l / Math.sqrt(raw));
      } else {
        chol[a * p + b] = sum / chol[b * p + b];
      }
    }
  }
  return minRatio;
}

/** δβ from the last accumulated right-hand side (call factorNormal first). */
export function solveCorrection(ws: NormalWorkspace, delta: Float64Array): void {
  solveTheta(ws, delta);
  toCoefficients(ws, delta);
}

/** Maps θ (centred, scaled parameters) to β in place: βⱼ = dⱼθⱼ, β₀ = d₀θ₀ − Σ (sⱼ/κ) βⱼ. */
function toCoefficients(ws: NormalWorkspace, v: Float64Array): void {
  const { p, scale, shift, intercept, interceptValue } = ws;
  for (let j = 0; j < p; j++) v[j] *= scale[j];
  if (intercept >= 0) {
    let s = 0;
    for (let j = 0; j < p; j++) if (j !== intercept) s += (shift[j] / interceptValue) * v[j];
    v[intercept] -= s;
  }
}

/**
 * The diagonal of (XᵀVX)⁻¹ in the units of β, from the last factorisation, without allocating:
 * Qⱼⱼ = tⱼᵀG⁻¹tⱼ = ‖L⁻¹P tⱼ‖² with tⱼ row j of the θ→β map.
 */
export function cofactorDiagonal(ws: NormalWorkspace, out: Float64Array): void {
  const { p, scale, shift, intercept, interceptValue, z, theta } = ws;
  for (let j = 0; j < p; j++) {
    z.fill(0);
    z[j] = scale[j];
    if (j === intercept) {
      for (let k = 0; k < p; k++) if (k !== intercept) z[k] = (-shift[k] * scale[k]) / interceptValue;
    }
    out[j] = lowerSolveNormSquared(ws, z, theta);
  }
}

/**
 * ‖L⁻¹P v‖² from the last factorisation (L is in the workspace's factor order), the forward
 * solve written into `work`: vᵀG⁻¹v, the quadratic form behind the cofactors and bᵀG⁻¹b.
 */
export function lowerSolveNormSquared(ws: NormalWorkspace, v: Float64Array, work: Float64Array): number {
  const { p, order, chol } = ws;
  let sum = 0;
  for (let a = 0; a < p; a++) {
    let t = v[order[a]];
    for (let c = 0; c < a; c++) t -= chol[a * p + c] * work[c];
    work[a] = t / chol[a * p + a];
    sum += work[a] * work[a];
  }
  return sum;
}

/** factor·(XᵀVX)⁻¹ in the units of β (row-major p×p), from the last factorisation. */
export function cofactorMatrix(ws: NormalWorkspace, factor = 1): Float64Array {
  const { p } = ws;
  const out = new Float64Array(p * p);
  // Temporaries reused across calls (a session refit on every save calls this per fit; fresh
  // small typed arrays were a third of its allocations).
  if (cofactorTemp.col.length !== p) cofactorTemp = { inv: new Float64Array(p * p), col: new Float64Array(p), saved: new Float64Array(p) };
  const { inv, col, saved } = cofactorTemp;
  saved.set(ws.rhs);
  // Column k of G⁻¹ in θ units, mapped to β for rows, then the transposed map for columns.
  for (let k = 0; k < p; k++) {
    ws.rhs.fill(0);
    ws.rhs[k] = 1;
    solveTheta(ws, col);
    for (let j = 0; j < p; j++) inv[j * p + k] = col[j];
  }
  ws.rhs.set(saved);
  // out = T inv Tᵀ with T the θ→β map: apply T to each column, then to each row.
  for (let k = 0; k < p; k++) {
    for (let j = 0; j < p; j++) col[j] = inv[j * p + k];
    toCoefficients(ws, col);
    for (let j = 0; j < p; j++) inv[j * p + k] = col[j];
  }
  for (let j = 0; j < p; j++) {
    for (let k = 0; k < p; k++) col[k] = inv[j * p + k];
    toCoefficients(ws, col);
    for (let k = 0; k < p; k++) out[j * p + k] = col[k] * factor;
  }
  return out;
}

let cofactorTemp = { inv: new Float64Array(0), col: new Float64Array(0), saved: new Float64Array(0) };

/** θ = G⁻¹b by forward and back substitution on the permuted factor L Lᵀ. */
function solveTheta(ws: NormalWorkspace, out: Float64Array): void {
  const { p, order, chol, rhs, theta } = ws;
  for (let a = 0; a < p; a++) {
    let s = rhs[order[a]];
    for (let c = 0; c < a; c++) s -= chol[a * p + c] * theta[c];
    theta[a] = s / chol[a * p + a];
  }
  for (let a = p - 1; a >= 0; a--) {
    let s = theta[a];
    for (let c = a + 1; c < p; c++) s -= chol[c * p + a] * theta[c];
    theta[a] = s / chol[a * p + a];
  }
  for (let a = 0; a < p; a++) out[order[a]] = theta[a];
}
