// Residual diagnostics: standardized residuals on a robust scale, suspect flags, and for least
// squares the reliability measures of Baarda's data snooping (W. Baarda, "A testing procedure for
// use in geodetic networks", Netherlands Geodetic Commission, 1968 — from memory):
//   leverage       hᵢᵢ = wᵢ xᵢᵀ(XᵀWX)⁻¹xᵢ (hat matrix of the whitened problem), Σhᵢᵢ = p
//   redundancy     rᵢ = 1 − hᵢᵢ = (Q_vv W)ᵢᵢ, Σrᵢ = n − p
//   w-test         wᵢ = eᵢ/(σ₀ √(Q_vv)ᵢᵢ) = eᵢ √wᵢ / (σ₀ √rᵢ), N(0, 1) for one blunder-free reading;
//                  critical value 3.29 (α₀ = 0.001, two-sided)
//   MDB            ∇ᵢ = δ₀ σᵢ / √rᵢ with σᵢ = σ₀/√wᵢ, δ₀ = 4.13 (β₀ = 0.80 at α₀ = 0.001), in the
//                  reading's unit: the smallest blunder the w-test finds with power β₀.
// σ₀ is the a priori 1 when the problem carries weights 1/σ² (Baarda's w); without weights the
// sigmas are unknown and σ̂₀ of the fit is used (then wᵢ is Pope's τ, the internally
// studentized residual; 3.29 is its large-(n − p) critical value).
import { InputError } from '../errors.ts';
import { leastSquaresCofactor } from './least-squares.ts';
import { whitenResiduals } from './problem.ts';
import { madScale } from './robust-scale.ts';
import type { FitResult, LinearProblem } from './types.ts';

/** Suspect threshold on |standardized residual| (common practice). */
export const SUSPECT_THRESHOLD = 3;
/** w-test critical value for α₀ = 0.001 two-sided (Baarda 1968 — from memory). */
export const W_TEST_CRITICAL_VALUE = 3.29;
/** Non-centrality δ₀ for power β₀ = 0.80 at α₀ = 0.001 (Baarda 1968 — from memory). */
export const MDB_NONCENTRALITY = 4.13;
/**
 * A reading with redundancy rᵢ below this is not controlled by the others (n = p, or a lone
 * reading fixing a parameter): rᵢ comes from 1 − hᵢᵢ with an error ~ cond·ε ≪ 1e-10.
 */
export const REDUNDANCY_FLOOR = 1e-10;
/**
 * Residuals below RESIDUAL_ROUNDING·max|√wᵢ yᵢ| are rounding: y − Xβ of a fit to data of that size
 * carries an error of a few ε·|y|; 1024ε leaves room for the coefficients' own error.
 */
export const RESIDUAL_ROUNDING = 1024 * Number.EPSILON;

function requireFit(fit: FitResult): void {
  if (fit.status === 'too-few-rows' || fit.status === 'rank-deficient') {
    throw new InputError('fit.status', fit.status, 'diagnostics need a fitted model; check the status first');
  }
}

/**
 * √wᵢ eᵢ / s. s is σ₀ for least squares and the MAD scale of the fit's whitened residuals for the
 * other estimators. When s is undefined (n = p) every value is 0 — nothing can be tested. When s is
 * at rounding level (more than half the readings fit exactly) a rounding-level residual gives 0
 * and any other ±Infinity: infinitely far from a majority that agrees exactly.
 */
export function standardizedResiduals(fit: FitResult, problem: LinearProblem): Float64Array {
  requireFit(fit);
  if (fit.residuals.length !== problem.n) throw new InputError('fit.residuals', fit.residuals.length, `has ${fit.residuals.length} values for ${problem.n} rows`);
  const e = whitenResiduals(problem, fit.residuals);
  const out = new Float64Array(problem.n);
  const s = fit.estimator === 'least-squares' ? fit.scale : madScale(e);
  if (!Number.isFinite(s)) return out;
  let ymax = 0;
  const w = problem.weights;
  for (let i = 0; i < problem.n; i++) ymax = Math.max(ymax, Math.abs(problem.y[i] * (w ? Math.sqrt(w[i]) : 1)));
  const floor = RESIDUAL_ROUNDING * ymax;
  for (let i = 0; i < problem.n; i++) {
    if (s > floor) out[i] = e[i] / s;
    else out[i] = Math.abs(e[i]) <= floor ? 0 : e[i] > 0 ? Infinity : -Infinity;
  }
  return out;
}

/** True where |standardized| > threshold (default 3, common practice). */
export function suspectFlags(standardized: ArrayLike<number>, threshold = SUSPECT_THRESHOLD): boolean[] {
  if (!Number.isFinite(threshold) || threshold <= 0) throw new InputError('threshold', threshold, 'must be finite and > 0');
  const out: boolean[] = [];
  for (let i = 0; i < standardized.length; i++) {
    const z = standardized[i];
    if (Number.isNaN(z)) throw new InputError(`standardized[${i}]`, z, 'is not a number');
    out.push(Math.abs(z) > threshold);
  }
  return out;
}

export interface LeastSquaresDiagnostics {
  /** hᵢᵢ, Σ = p. */
  leverage: Float64Array;
  /** rᵢ = 1 − hᵢᵢ, Σ = n − p. */
  redundancy: Float64Array;
  /** Baarda's wᵢ (Pope's τ without weights); NaN where the reading is not controlled. */
  wTest: Float64Array;
  /** Minimal detectable bias in the reading's unit; Infinity where not controlled. */
  minimalDetectableBias: Float64Array;
  /** 1 where rᵢ > REDUNDANCY_FLOOR (the reading is checked by the others). */
  controlled: Uint8Array;
  /** |wᵢ| > criticalValue. */
  wTestSuspect: boolean[];
  /** The σ₀ used: 1 a priori with weights, σ̂₀ without. */
  sigma0: number;
  sigma0Source: 'a-priori' | 'a-posteriori';
  criticalValue: number;
  noncentrality: number;
}

export interface LeastSquaresDiagnosticsOptions {
  /** Override σ₀ (e.g. the fit's σ̂₀ when the weights are only relative). */
  sigma0?: number;
  criticalValue?: number;
  noncentrality?: number;
}

/** Leverage, redundancy numbers, w-test and MDB of a least-squares fit of `problem`. */
export function leastSquaresDiagnostics(problem: LinearProblem, fit: FitResult, options: LeastSquaresDiagnosticsOptions = {}): LeastSquaresDiagnostics {
  requireFit(fit);
  if (fit.estimator !== 'least-squares') throw new InputError('fit.estimator', fit.estimator, 'redundancy, w-test and MDB are defined for least squares');
  const { n, p, X, weights } = problem;
  const q = leastSquaresCofactor(problem);
  if (typeof q === 'string') throw new InputError('problem', `${n}×${p}`, `no cofactor matrix: ${q}`);
  const sigma0Source = options.sigma0 !== undefined || weights ? 'a-priori' : 'a-posteriori';
  const sigma0 = options.sigma0 ?? (weights ? 1 : fit.scale);
  const criticalValue = options.criticalValue ?? W_TEST_CRITICAL_VALUE;
  const noncentrality = options.noncentrality ?? MDB_NONCENTRALITY;
  for (const [field, v] of [['options.sigma0', sigma0], ['options.criticalValue', criticalValue], ['options.noncentrality', noncentrality]] as const) {
    if (!Number.isFinite(v) || v <= 0) throw new InputError(field, v, 'must be finite and > 0 (σ̂₀ needs n > p)');
  }
  const leverage = new Float64Array(n);
  const redundancy = new Float64Array(n);
  const wTest = new Float64Array(n);
  const mdb = new Float64Array(n);
  const controlled = new Uint8Array(n);
  const wTestSuspect: boolean[] = [];
  for (let i = 0; i < n; i++) {
    const wi = weights ? weights[i] : 1;
    let h = 0;
    for (let a = 0; a < p; a++) {
      let s = 0;
      for (let b = 0; b < p; b++) s += q[a * p + b] * X[i * p + b];
      h += X[i * p + a] * s;
    }
    h *= wi;
    leverage[i] = h;
    const r = 1 - h;
    redundancy[i] = r;
    if (r > REDUNDANCY_FLOOR) {
      controlled[i] = 1;
      wTest[i] = (fit.residuals[i] * Math.sqrt(wi)) / (sigma0 * Math.sqrt(r));
      mdb[i] = (noncentrality * sigma0) / Math.sqrt(wi) / Math.sqrt(r);
    } else {
      wTest[i] = NaN;
      mdb[i] = Infinity;
    }
    wTestSuspect.push(controlled[i] === 1 && Math.abs(wTest[i]) > criticalValue);
  }
  return { leverage, redundancy, wTest, minimalDetectableBias: mdb, controlled, wTestSuspect, sigma0, sigma0Source, criticalValue, noncentrality };
}
