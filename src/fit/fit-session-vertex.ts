// The L1 vertex a fit session keeps (fit-session.ts): the dual-condition state that lets a refit
// after one more reading keep the previous vertex in O(p) per new row plus one p×p solve.
import { defineCachedField } from './cached-field.ts';
import { GAP_TOL, ROW_ZERO_EPS } from './least-absolute-certificate.ts';
import { factorLu, matrixNorm1, inverseFromLu, solveLuTransposed, type LuFactors } from './linear-solve.ts';
import { residualsOf } from './problem.ts';
import { madScaleOfResiduals } from './simplex-residual-scale.ts';
import type { VertexSides } from './least-absolute-vertex-sides.ts';
import type { FitResult, LinearProblem } from './types.ts';
import { smallFloat64 } from './small-array.ts';

/**
 * The L1 vertex test's state (least-absolute-certificate.ts): with aᵢ = √wᵢxᵢ, sᵢ = sign(rᵢ) and
 * B the basis rows, the vertex is optimal iff z = A_B⁻ᵀg, g = Σ_{i∉B} sᵢaᵢ, has max|z| ≤ 1. A new
 * row only adds its term to g; the basis, hence A_B's factors, stays. g is summed with every term
 * through TwoSum (error ≤ ε|gⱼ| + γ²ₙΣ|aᵢⱼ|, the certificate's compensated bound), so a chain of
 * appended rows never accumulates rounding. A row whose residual is zero to rounding (as the
 * certificate decides it) may take any side in [−1, 1]; it is given 0 here. Any choice in [−1, 1]
 * is a valid subgradient, so a passing test proves optimality; a failing one only costs the
 * plain refit. After a screened warm refit the state starts from the fitter's own g and its
 * rounding bound (least-absolute-vertex-sides.ts) instead of a pass over the rows.
 */
export interface L1Vertex {
  beta: Float64Array;
  basis: Int32Array;
  lu: LuFactors;
  /** max_k Σ_j |A_B⁻¹[j, k]|: carries g's error to z. */
  invNorm: number;
  g: Float64Array;
  comp: Float64Array;
  /** Σ|aᵢⱼ| over the rows summed here by TwoSum, for the rounding bound. */
  absSum: Float64Array;
  /** A fixed per-column bound on the error of the g the state started from (0 when summed here). */
  gErr0: Float64Array;
}

/**
 * Adds the side terms of rows from … n−1 to g in place, except the rows in `skip` (the basis).
 * A row is zero to rounding when |ρᵢ| ≤ the certificate's rowTol, ROW_ZERO_EPS·ε·√wᵢ(|yᵢ| + Σ|xᵢⱼβⱼ|).
 * The loop runs over the segments between skipped rows with the constants in locals: after a new
 * vertex this is a full pass, and a per-row Set lookup and tolerance call were a quarter of a
 * session's refit time.
 */
function addSideTerms(v: L1Vertex, problem: LinearProblem, from: number, skip: Int32Array | null): void {
  const { n } = problem;
  const cuts = skip ? Array.from(skip).filter((i) => i >= from && i < n).sort((a, b) => a - b) : [];
  let start = from;
  for (const cut of cuts) {
    addSideSegment(v, problem, start, cut);
    start = cut + 1;
  }
  addSideSegment(v, problem, start, n);
}

function addSideSegment(v: L1Vertex, problem: LinearProblem, from: number, to: number): void {
  const { p, X, y, weights } = problem;
  const { beta, g, comp, absSum } = v;
  const zeroEps = ROW_ZERO_EPS * Number.EPSILON;
  for (let i = from; i < to; i++) {
    const sw = weights ? Math.sqrt(weights[i]) : 1;
    let f = 0;
    let m = Math.abs(y[i]);
    for (let j = 0; j < p; j++) {
      const t = X[i * p + j] * beta[j];
      f += t;
      m += Math.abs(t);
      absSum[j] += Math.abs(sw * X[i * p + j]);
    }
    const rho = sw * (y[i] - f);
    if (!(Math.abs(rho) > zeroEps * sw * m)) continue;
    const side = rho > 0 ? sw : -sw;
    for (let j = 0; j < p; j++) {
      // TwoSum (Knuth): g + t = u + e exactly.
      const t = side * X[i * p + j];
      const u = g[j] + t;
      const w = u - g[j];
      comp[j] += g[j] - (u - w) + (t - w);
      g[j] = u;
    }
  }
}

/**
 * The state at the plain fitter's vertex: g from the fitter's side sum when it has one (no pass),
 * else one pass over every non-basis row.
 */
export function vertexState(problem: LinearProblem, coefficients: Float64Array, basis: Int32Array, sides: VertexSides | null = null): L1Vertex | undefined {
  const { p, X, weights } = problem;
  if (basis.length !== p) return undefined;
  const AB = smallFloat64(p * p);
  for (let k = 0; k < p; k++) {
    const i = basis[k];
    const sw = weights ? Math.sqrt(weights[i]) : 1;
    for (let j = 0; j < p; j++) AB[k * p + j] = sw * X[i * p + j];
  }
  const lu = factorLu(AB, p);
  if (lu.singular) return undefined;
  const invNorm = matrixNorm1(inverseFromLu(lu), p);
  const v: L1Vertex = {
    beta: Float64Array.from(coefficients), basis: Int32Array.from(basis), lu, invNorm,
    g: new Float64Array(p), comp: new Float64Array(p), absSum: new Float64Array(p), gErr0: new Float64Array(p),
  };
  if (sides) {
    v.g.set(sides.g);
    v.gErr0.set(sides.gErr);
  } else addSideTerms(v, problem, 0, v.basis);
  return v;
}

/** A copy of the state with rows from … n−1 added (the kept state may belong to a checkpoint). */
export function extendVertex(v: L1Vertex, problem: LinearProblem, from: number): L1Vertex {
  const next: L1Vertex = { ...v, g: Float64Array.from(v.g), comp: Float64Array.from(v.comp), absSum: Float64Array.from(v.absSum) };
  addSideTerms(next, problem, from, null);
  return next;
}

/** γ_k = kε/(1 − kε) (Higham, "Accuracy and Stability of Numerical Algorithms", §3.1). */
export function gamma(k: number): number {
  return (k * Number.EPSILON) / (1 - k * Number.EPSILON);
}

/** The certificate's acceptance rule: max|z| plus its rounding bound within 1 + GAP_TOL. */
export function dualTest(v: L1Vertex, n: number): { ok: boolean; maxDual: number } {
  const { g, comp, absSum, lu, invNorm } = v;
  const p = g.length;
  const G = new Float64Array(p);
  for (let j = 0; j < p; j++) G[j] = g[j] + comp[j];
  const z = solveLuTransposed(lu, G);
  let maxDual = 0;
  for (let k = 0; k < p; k++) maxDual = Math.max(maxDual, Math.abs(z[k]));
  let gErr = 0;
  for (let j = 0; j < p; j++) gErr = Math.max(gErr, Number.EPSILON * Math.abs(G[j]) + gamma(n) ** 2 * absSum[j] + v.gErr0[j]);
  const zErr = invNorm * gErr + 2 * p * Number.EPSILON * maxDual;
  return { ok: maxDual + zErr <= 1 + GAP_TOL, maxDual };
}

/** The kept vertex as the answer on all rows: objective = previous + the new rows' Σ√w|r|; residuals and scale when first read. */
export function vertexKept(problem: LinearProblem, prev: FitResult, v: L1Vertex, maxDual: number, added: number): FitResult {
  const { n, p, X, y, weights } = problem;
  const beta = Float64Array.from(v.beta);
  let extra = 0;
  for (let i = n - added; i < n; i++) {
    let f = 0;
    for (let j = 0; j < p; j++) f += X[i * p + j] * beta[j];
    extra += (weights ? Math.sqrt(weights[i]) : 1) * Math.abs(y[i] - f);
  }
  const rows = Array.from(v.basis).join(', ');
  const result: FitResult = {
    estimator: 'least-absolute',
    status: 'ok',
    coefficients: beta,
    residuals: new Float64Array(0),
    objective: prev.objective + extra,
    scale: NaN,
    iterations: 0,
    converged: true,
    reason: `exact: the vertex through rows ${rows} is optimal (dual condition max|z| = ${maxDual.toPrecision(6)} ≤ 1 over all ${n} rows); ` +
      `the fit session kept it: the ${added} row${added === 1 ? '' : 's'} added since only extend its side sum`,
    basis: Int32Array.from(v.basis),
  };
  defineCachedField(result, 'residuals', () => residualsOf(problem, beta));
  defineCachedField(result, 'scale', () => madScaleOfResiduals(result.residuals, problem.weights));
  return result;
}
