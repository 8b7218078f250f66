// Reference computations for the exact-estimator tests, written independently of the code under
// test: seeded invented data, brute force over LP vertices, and the L1 optimality (KKT) check.
// Dense Gaussian elimination here is the textbook algorithm (partial pivoting), nothing shared
// with src/fit.
import type { LinearProblem } from '../../src/fit/types.ts';

/** mulberry32: a small seeded generator, so every test input is reproducible. */
export function seeded(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Degree-length rows as in the benchmark: x = sin²φ, φ in [0°, 70°], noise sd 5, 5 % outliers ±50…300 (invented). */
export function degreeRows(n: number, p: number, seed: number, weighted = false): LinearProblem {
  const u = seeded(seed);
  const X = new Float64Array(n * p);
  const y = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const s = Math.sin((u() * 70 * Math.PI) / 180);
    const x = s * s;
    for (let j = 0; j < p; j++) X[i * p + j] = x ** j;
    const z = Math.sqrt(-2 * Math.log(u() + 1e-300)) * Math.cos(2 * Math.PI * u());
    y[i] = 110574 + 1120 * x + (p > 2 ? 1.2 * x * x : 0) + 5 * z + (u() < 0.05 ? (u() < 0.5 ? -1 : 1) * (50 + 250 * u()) : 0);
    w[i] = 0.25 + 4 * u();
  }
  return weighted ? { n, p, X, y, weights: w } : { n, p, X, y };
}

/** Gaussian elimination with partial pivoting, written for the tests (no code under test). */
export function solve(A: number[][], b: number[]): number[] | null {
  const m = b.length;
  const M = A.map((r, i) => [...r, b[i]]);
  for (let c = 0; c < m; c++) {
    let piv = c;
    for (let r = c + 1; r < m; r++) if (Math.abs(M[r][c]) > Math.abs(M[piv][c])) piv = r;
    if (Math.abs(M[piv][c]) < 1e-13 * Math.max(1, ...M.map((r) => Math.abs(r[c])))) return null;
    [M[c], M[piv]] = [M[piv], M[c]];
    for (let r = 0; r < m; r++) {
      if (r === c) continue;
      const f = M[r][c] / M[c][c];
      for (let k = c; k <= m; k++) M[r][k] -= f * M[c][k];
    }
  }
  return M.map((r, i) => r[m] / r[i]);
}

export const sw = (pr: LinearProblem, i: number): number => (pr.weights ? Math.sqrt(pr.weights[i]) : 1);

export function objectiveAt(pr: LinearProblem, beta: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < pr.n; i++) {
    let f = 0;
    for (let j = 0; j < pr.p; j++) f += pr.X[i * pr.p + j] * beta[j];
    s += sw(pr, i) * Math.abs(pr.y[i] - f);
  }
  return s;
}

/** Brute force: the smallest objective over every fit interpolating p rows. */
export function bruteForceL1(pr: LinearProblem): number {
  const { n, p, X, y } = pr;
  let best = Infinity;
  const pick = (start: number, chosen: number[]): void => {
    if (chosen.length === p) {
      const beta = solve(chosen.map((i) => Array.from({ length: p }, (_, j) => X[i * p + j])), chosen.map((i) => y[i]));
      if (beta) best = Math.min(best, objectiveAt(pr, beta));
      return;
    }
    for (let i = start; i < n; i++) pick(i + 1, [...chosen, i]);
  };
  pick(0, []);
  return best;
}

/**
 * The LP optimality condition, computed here: max|u| over u solving A_Bᵀu = −Σ_{i∉B} sᵢaᵢ with
 * sᵢ = sign(rᵢ) (zero residuals outside the basis take the side that helps, which is exact for
 * the few that occur). ≤ 1 proves the vertex optimal.
 */
export function kktDual(pr: LinearProblem, beta: ArrayLike<number>, basis: ArrayLike<number>): number {
  const { n, p, X, y } = pr;
  const inB = new Set(Array.from(basis));
  const g = new Array<number>(p).fill(0);
  const zeros: number[] = [];
  for (let i = 0; i < n; i++) {
    if (inB.has(i)) continue;
    let f = 0;
    let mag = Math.abs(y[i]);
    for (let j = 0; j < p; j++) {
      f += X[i * p + j] * beta[j];
      mag += Math.abs(X[i * p + j] * beta[j]);
    }
    const r = y[i] - f;
    if (Math.abs(r) <= 1e-12 * mag) {
      zeros.push(i);
      continue;
    }
    const s = r > 0 ? 1 : -1;
    for (let j = 0; j < p; j++) g[j] += s * sw(pr, i) * X[i * p + j];
  }
  const AT = Array.from({ length: p }, (_, j) => Array.from(basis, (i) => sw(pr, i) * X[i * p + j]));
  const u0 = solve(AT, g.map((v) => -v));
  if (!u0) return Infinity;
  let u: number[] = u0;
  // Each zero-residual row may take any side in [−1, 1]; give it, greedily, the side (±1) that
  // lowers max|u| (enough for the few such rows these tests meet; exact rows are rare).
  let gCur = g;
  for (const i of zeros) {
    let best: number[] = u;
    let bestG = gCur;
    for (const s of [-1, 1]) {
      const g2 = gCur.map((v, j) => v + s * sw(pr, i) * X[i * p + j]);
      const u2 = solve(AT, g2.map((v) => -v));
      if (u2 && Math.max(...u2.map(Math.abs)) < Math.max(...best.map(Math.abs))) {
        best = u2;
        bestG = g2;
      }
    }
    u = best;
    gCur = bestG;
  }
  return Math.max(...u.map(Math.abs));
}


/**
 * Absolute tolerance for comparing two objectives of the same problem computed by different
 * routes: each residual yᵢ − xᵢβ carries a rounding of a few ε·|yᵢ| (the readings are ~1.1e5 m
 * and the residuals a few metres, so cancellation costs ~5 digits), so objectives agree to
 * relative 1e-12 plus n·8(p+1)·ε·max√wᵢ|yᵢ| absolute.
 */
export function objectiveTolerance(pr: LinearProblem, expected: number): number {
  let yMax = 0;
  for (let i = 0; i < pr.n; i++) yMax = Math.max(yMax, sw(pr, i) * Math.abs(pr.y[i]));
  return 1e-12 * Math.abs(expected) + pr.n * 8 * (pr.p + 1) * Number.EPSILON * yMax;
}
