// Exact minimax (Chebyshev, L∞) fit: minimise max_i √wᵢ |yᵢ − xᵢᵀβ|.
//
// Method: the revised simplex method on the dual of the Chebyshev LP, which is the classic
// exchange algorithm (Stiefel 1959; Cheney, "Introduction to Approximation Theory", 1966, ch. 2;
// Barrodale & Phillips, ACM TOMS 1975). With whitened rows aᵢ = √wᵢ xᵢ, bᵢ = √wᵢ yᵢ the dual is
//     max Σ_j c_j u_j   s.t.  Σ_j u_j [s_j a_j ; 1] = [0 ; 1],  u ≥ 0,
// one column j per (row i, sign s), c_j = s·b_i. A basis is a reference of p+1 rows; its simplex
// multipliers are (β, h) with the levelled equations s_i (b_i − a_iᵀβ) = h on the reference, and
// the reduced cost of column (i, s) is s·r_i − h. So pricing every column is ONE O(n·p) pass over
// the residuals: the entering row is the one with the largest |r_i|, and the method stops exactly
// when max|r_i| ≤ h — then the reference levels the error and no row exceeds it, which is
// Chebyshev's optimality condition (equioscillation on p+1 rows with the dual signs). h never
// decreases, and h is a lower bound on the optimum at every step (LP weak duality), so the reason
// string can state the certificate. Only (p+1)×(p+1) systems are solved; no n-sized copy is made.
//
// Numerics: the basis systems use columns scaled to unit max|a_ij| (β' = s·β) so that a design with
// x in [0, 1] and x² columns stays well conditioned; the reduced-cost test uses a relative
// tolerance of OPTIMALITY_TOLERANCE on h plus rounding of the residual pass. Cycling under
// degeneracy (ties in the ratio test) is prevented by switching to Bland's smallest-index rule
// after DEGENERATE_SWITCH degenerate steps.
import { isNegligiblePivot, noSolution, residualsOf } from './problem.ts';
import { madScale } from './robust-scale.ts';
import type { FitOptions, FitResult, LinearProblem } from './types.ts';

/** Relative slack in the optimality test max|r| ≤ h(1 + tol): a few ulps of the residual pass. */
export const OPTIMALITY_TOLERANCE = 64 * Number.EPSILON;
/** Degenerate simplex steps tolerated under the largest-residual rule before Bland's rule. */
export const DEGENERATE_SWITCH = 20;
/** Default iteration cap: each exchange raises h; practical counts are tens even at n = 10⁶. */
export const MINIMAX_MAX_ITERATIONS = 10_000;

/** Fits `problem` exactly in the minimax sense; see the header for the method and its certificate. */
export function fitMinimax(problem: LinearProblem, options: FitOptions = {}): FitResult {
  const { n, p, X, y, weights } = problem;
  if (n < p + 1) {
    // With n ≤ p rows an exact interpolation exists only in special cases; a reference needs p+1.
    return noSolution('minimax', problem, 'too-few-rows', `minimax needs at least p + 1 = ${p + 1} rows, got ${n}`);
  }
  const sw = new Float64Array(n);
  for (let i = 0; i < n; i++) sw[i] = weights ? Math.sqrt(weights[i]) : 1;
  const colScale = columnScales(problem, sw);
  if (!fullColumnRank(problem, sw, colScale)) {
    return noSolution('minimax', problem, 'rank-deficient', 'the design columns are linearly dependent (scaled tolerance): every reading at one latitude?');
  }
  const maxIterations = options.maxIterations ?? MINIMAX_MAX_ITERATIONS;
  const m = p + 1;
  const ref = startReference(problem, sw, colScale, options.warmStart?.basis);
  if (!ref) return noSolution('minimax', problem, 'rank-deficient', 'no reference of p + 1 rows in general position was found');

  const signs = new Float64Array(m);
  const B = new Float64Array(m * m);
  const work = new Float64Array(m * m);
  const rhs = new Float64Array(m);
  const u = new Float64Array(m);
  const d = new Float64Array(m);
  const pi = new Float64Array(m);
  const beta = new Float64Array(p);
  const residuals = new Float64Array(n);
  initialSigns(problem, sw, colScale, ref, signs);
  let yScale = 0;
  for (let i = 0; i < n; i++) yScale = Math.max(yScale, Math.abs(y[i] * sw[i]));
  const slack = roundingSlack(yScale, p);

  let iterations = 0;
  let degenerate = 0;
  let h = -Infinity;
  let reason = '';
  let converged = false;
  for (;;) {
    // Basis matrix: column k is [s_k a_k / colScale ; 1] for reference row ref[k].
    buildBasis(problem, sw, colScale, ref, signs, B);
    // Primal of the dual: B u = e_m (u ≥ 0 by construction of the signs / ratio test).
    rhs.fill(0); rhs[m - 1] = 1;
    if (!solveDense(B, m, rhs, u, work, false)) { reason = 'reference became singular'; break; }
    // Multipliers: Bᵀ π = c_B with c_k = s_k b_k; π = (β', h).
    for (let k = 0; k < m; k++) rhs[k] = signs[k] * sw[ref[k]] * y[ref[k]];
    if (!solveDense(B, m, rhs, pi, work, true)) { reason = 'reference became singular'; break; }
    for (let j = 0; j < p; j++) beta[j] = pi[j] / colScale[j];
    h = pi[m - 1];
    // Pricing: one pass over all rows for the largest whitened residual.
    residualsOf(problem, beta, residuals);
    let enter = largestWhitened(residuals, sw, n);
    const best = Math.abs(residuals[enter] * sw[enter]);
    if (best <= h * (1 + OPTIMALITY_TOLERANCE) + slack) {
      converged = true;
      reason = `exact: reference of ${m} rows levels the error at ${h.toPrecision(12)} and no row exceeds it (dual-feasible basis, LP optimal)`;
      break;
    }
    if (iterations >= maxIterations) { reason = `stopped at the iteration cap ${maxIterations}; max |r| ${best} above the level ${h}`; break; }
    iterations++;
    if (degenerate > DEGENERATE_SWITCH) {
      // Bland's rule: the smallest index with a positive reduced cost enters (no cycling).
      enter = firstAbove(residuals, sw, n, h * (1 + OPTIMALITY_TOLERANCE) + slack);
    }
    const s = residuals[enter] >= 0 ? 1 : -1;
    // Entering column q = [s a_enter / colScale ; 1]; d = B⁻¹ q.
    for (let j = 0; j < p; j++) rhs[j] = (s * sw[enter] * X[enter * p + j]) / colScale[j];
    rhs[m - 1] = 1;
    if (!solveDense(B, m, rhs, d, work, false)) { reason = 'reference became singular'; break; }
    // Ratio test over d_k > 0 (u stays ≥ 0). Ties: smallest row index (Bland), else largest d.
    let leave = -1;
    let theta = Infinity;
    for (let k = 0; k < m; k++) {
      if (d[k] <= 1e-14) continue;
      const t = u[k] / d[k];
      if (t < theta - 1e-15 || (Math.abs(t - theta) <= 1e-15 && leave >= 0 && (degenerate > DEGENERATE_SWITCH ? ref[k] < ref[leave] : d[k] > d[leave]))) {
        theta = t; leave = k;
      }
    }
    if (leave < 0) { reason = 'ratio test found no leaving row (dual unbounded): numerical breakdown'; break; }
    degenerate = theta <= 1e-15 ? degenerate + 1 : 0;
    ref[leave] = enter;
    signs[leave] = s;
  }

  if (!converged && !Number.isFinite(h)) {
    return noSolution('minimax', problem, 'rank-deficient', reason);
  }
  const top = largestWhitened(residuals, sw, n);
  const objective = Math.abs(residuals[top] * sw[top]);
  // The whitened residuals reuse the weight buffer: it is not needed any more.
  const whitened = sw;
  for (let i = 0; i < n; i++) whitened[i] *= residuals[i];
  return {
    estimator: 'minimax',
    status: converged ? 'ok' : 'not-converged',
    coefficients: beta,
    residuals,
    objective,
    scale: madScale(whitened),
    iterations,
    converged,
    reason,
    basis: Int32Array.from(ref),
  };
}

/** Index of the largest |√wᵢ rᵢ| (the pricing pass: the most violated dual column). */
function largestWhitened(r: Float64Array, sw: Float64Array, n: number): number {
  let best = -1;
  let at = 0;
  for (let i = 0; i < n; i++) {
    const a = Math.abs(r[i] * sw[i]);
    if (a > best) { best = a; at = i; }
  }
  return at;
}

/** Smallest index with |√wᵢ rᵢ| above `level` (Bland's rule), or −1. */
function firstAbove(r: Float64Array, sw: Float64Array, n: number, level: number): number {
  for (let i = 0; i < n; i++) if (Math.abs(r[i] * sw[i]) > level) return i;
  return -1;
}

/**
 * Rounding of the residual pass: a residual yᵢ − xᵢᵀβ carries an error of a few ulps of |yᵢ|, not
 * of |rᵢ| (degree lengths are ~1.1e5 m/° while residuals are metres), so the slack is scaled by
 * the largest whitened reading and the number of terms in xᵢᵀβ.
 */
function roundingSlack(yScale: number, p: number): number {
  return 16 * (p + 1) * Number.EPSILON * yScale;
}

function columnScales(problem: LinearProblem, sw: Float64Array): Float64Array {
  const { n, p, X } = problem;
  const s = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < p; j++) s[j] = Math.max(s[j], Math.abs(X[i * p + j] * sw[i]));
  }
  for (let j = 0; j < p; j++) if (s[j] === 0) s[j] = 1;
  return s;
}

/** Rank test on the scaled Gram matrix by pivoted Cholesky, tolerance scaled by max(n, p)·ε. */
function fullColumnRank(problem: LinearProblem, sw: Float64Array, colScale: Float64Array): boolean {
  const { n, p, X } = problem;
  const G = new Float64Array(p * p);
  const inv = colScale.map((c) => 1 / c);
  const a = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    const w = sw[i];
    for (let j = 0; j < p; j++) a[j] = X[i * p + j] * w * inv[j];
    for (let j = 0; j < p; j++) {
      const aj = a[j];
      for (let k = 0; k <= j; k++) G[j * p + k] += aj * a[k];
    }
  }
  for (let j = 0; j < p; j++) for (let k = 0; k < j; k++) G[k * p + j] = G[j * p + k];
  // Cholesky diagonal² = squared QR pivots; compare their square roots as QR pivots would be.
  let maxPivot = 0;
  for (let j = 0; j < p; j++) {
    let diag = G[j * p + j];
    for (let k = 0; k < j; k++) diag -= G[j * p + k] * G[j * p + k];
    const r = diag > 0 ? Math.sqrt(diag) : 0;
    maxPivot = Math.max(maxPivot, r);
    // The Gram route squares the condition number, so the pivot test uses √ε-scaled slack.
    if (r === 0 || isNegligiblePivot(r * r, maxPivot * maxPivot, n, p) || r <= 1e-7 * maxPivot) return false;
    G[j * p + j] = r;
    for (let i = j + 1; i < p; i++) {
      let v = G[i * p + j];
      for (let k = 0; k < j; k++) v -= G[i * p + k] * G[j * p + k];
      G[i * p + j] = v / r;
    }
  }
  return true;
}

/**
 * A starting reference of p+1 rows in general position: the warm-start basis when it is usable,
 * else rows spread over the range of the last column (for the degree models: low, middle and high
 * latitudes), else seeded pseudo-random picks.
 */
function startReference(problem: LinearProblem, sw: Float64Array, colScale: Float64Array, warm?: ArrayLike<number>): Int32Array | null {
  const { n, p, X } = problem;
  const m = p + 1;
  const tryRef = (ref: Int32Array): boolean => {
    for (let k = 0; k < m; k++) if (ref[k] < 0 || ref[k] >= n) return false;
    return nullVector(problem, sw, colScale, ref) !== null;
  };
  if (warm && warm.length === m) {
    const ref = Int32Array.from(warm);
    if (tryRef(ref)) return ref;
  }
  // Order statistics of the last column by a cheap pass: min, max and evenly spaced values between.
  const last = p - 1;
  let lo = 0, hi = 0;
  for (let i = 1; i < n; i++) {
    if (X[i * p + last] < X[lo * p + last]) lo = i;
    if (X[i * p + last] > X[hi * p + last]) hi = i;
  }
  // One pass finds, for every target value, the nearest row (m comparisons per row).
  const ref = new Int32Array(m);
  const bestD = new Float64Array(m).fill(Infinity);
  const xlo = X[lo * p + last], xhi = X[hi * p + last];
  const step = (xhi - xlo) / p;
  for (let i = 0; i < n; i++) {
    const v = X[i * p + last];
    for (let k = 0; k < m; k++) {
      const dd = Math.abs(v - (xlo + step * k));
      if (dd < bestD[k]) { bestD[k] = dd; ref[k] = i; }
    }
  }
  if (new Set(ref).size === m && tryRef(ref)) return ref;
  let seed = 0x9e3779b9;
  for (let attempt = 0; attempt < 200; attempt++) {
    for (let k = 0; k < m; k++) {
      seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0;
      ref[k] = seed % n;
    }
    if (new Set(ref).size === m && tryRef(ref)) return ref;
  }
  return null;
}

/** Null vector λ of the p×(p+1) matrix [a_k/colScale]ᵀ over the reference, or null if its rank < p. */
function nullVector(problem: LinearProblem, sw: Float64Array, colScale: Float64Array, ref: Int32Array): Float64Array | null {
  const { p, X } = problem;
  const m = p + 1;
  // Fix λ_free = 1 for each candidate free column and solve the remaining p×p system.
  const A = new Float64Array(p * p);
  const b = new Float64Array(p);
  const x = new Float64Array(p);
  const work = new Float64Array(p * p);
  for (let free = m - 1; free >= 0; free--) {
    let c = 0;
    for (let k = 0; k < m; k++) {
      if (k === free) continue;
      for (let j = 0; j < p; j++) A[j * p + c] = (X[ref[k] * p + j] * sw[ref[k]]) / colScale[j];
      c++;
    }
    for (let j = 0; j < p; j++) b[j] = -(X[ref[free] * p + j] * sw[ref[free]]) / colScale[j];
    if (!solveDense(A, p, b, x, work, false)) continue;
    const lambda = new Float64Array(m);
    c = 0;
    for (let k = 0; k < m; k++) lambda[k] = k === free ? 1 : x[c++];
    return lambda;
  }
  return null;
}

/** Signs of the starting reference: s_k = sign(λ_k), so that u = |λ|/Σ|λ| is dual feasible. */
function initialSigns(problem: LinearProblem, sw: Float64Array, colScale: Float64Array, ref: Int32Array, signs: Float64Array): void {
  const lambda = nullVector(problem, sw, colScale, ref);
  for (let k = 0; k < signs.length; k++) signs[k] = lambda && lambda[k] < 0 ? -1 : 1;
}

function buildBasis(problem: LinearProblem, sw: Float64Array, colScale: Float64Array, ref: Int32Array, signs: Float64Array, B: Float64Array): void {
  const { p, X } = problem;
  const m = p + 1;
  for (let k = 0; k < m; k++) {
    const i = ref[k];
    for (let j = 0; j < p; j++) B[j * m + k] = (signs[k] * sw[i] * X[i * p + j]) / colScale[j];
    B[p * m + k] = 1;
  }
}

/**
 * Solves A x = b (or Aᵀ x = b) for a small dense m×m matrix by Gaussian elimination with partial
 * pivoting. Returns false when a pivot is negligible against the largest entry (scaled test).
 */
function solveDense(A: Float64Array, m: number, b: ArrayLike<number>, x: Float64Array, work: Float64Array, transpose: boolean): boolean {
  let amax = 0;
  for (let r = 0; r < m; r++) {
    for (let c = 0; c < m; c++) {
      const v = transpose ? A[c * m + r] : A[r * m + c];
      work[r * m + c] = v;
      amax = Math.max(amax, Math.abs(v));
    }
    x[r] = b[r];
  }
  if (amax === 0) return false;
  for (let col = 0; col < m; col++) {
    let piv = col;
    for (let r = col + 1; r < m; r++) if (Math.abs(work[r * m + col]) > Math.abs(work[piv * m + col])) piv = r;
    const pv = work[piv * m + col];
    if (Math.abs(pv) <= m * 1e3 * Number.EPSILON * amax) return false;
    if (piv !== col) {
      for (let c = 0; c < m; c++) { const t = work[col * m + c]; work[col * m + c] = work[piv * m + c]; work[piv * m + c] = t; }
      const t = x[col]; x[col] = x[piv]; x[piv] = t;
    }
    for (let r = col + 1; r < m; r++) {
      const f = work[r * m + col] / pv;
      if (f === 0) continue;
      for (let c = col; c < m; c++) work[r * m + c] -= f * work[col * m + c];
      x[r] -= f * x[col];
    }
  }
  for (let r = m - 1; r >= 0; r--) {
    let v = x[r];
    for (let c = r + 1; c < m; c++) v -= work[r * m + c] * x[c];
    x[r] = v / work[r * m + r];
  }
  return true;
}
