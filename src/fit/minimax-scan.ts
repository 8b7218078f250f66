// The pass over all rows of the exact minimax fit: residuals at β, the largest whitened
// residual, and the rows that exceed a level, reduced to the most violating row per sign in
// each of NB bins along the design's leading column.
//
// Why bins: the violators of a level are clustered (the largest outliers at one end of the
// latitude range when the slope is off); the exchange needs rows that pin the new optimum
// from every part of the range, as the multiple exchange of Remez picks one extremum per
// alternation interval (Remez 1934; Watson, "Approximation Theory and Numerical Methods",
// 1980, §4.3). The most violating row overall is always among them. The violation test is a
// well-predicted branch (few rows exceed the level after the first round); everything else in
// the loop is straight-line code.
import { nonFiniteRow } from './simplex-frame.ts';
import type { LinearProblem } from './types.ts';

/** Bins along the leading column for the violators. */
export const VIOLATOR_BINS = 64;

export interface BinAxis {
  /** Leading coordinate of a raw row: t = Σ_j x_j·coef[j]. */
  coef: Float64Array;
  lo: number;
  width: number;
}

export interface Scan {
  /** max_i √wᵢ|rᵢ|. */
  maxAbs: number;
  /** Rows above the level (all of them, before the reduction to bins). */
  violators: number;
  /** The bins' most violating rows (both signs), increasing, without repeats. */
  rows: Int32Array;
  /** Σ (√wᵢ xᵢⱼ)² per column: the design's column norms, for the rank proof. */
  colSq: Float64Array;
}

/** Raw residuals of every row at β into `residuals`, and the violators of `level` (whitened). */
export function scanRows(problem: LinearProblem, beta: Float64Array, level: number, residuals: Float64Array, axis: BinAxis): Scan {
  const { n, p, X, y, weights } = problem;
  const bins = new ViolatorBins(axis, p);
  const colSq = new Float64Array(p);
  let maxAbs = 0;
  if (p === 2 && !weights) {
    // The degree model without weights, unrolled: the bulk of every large fit.
    const b0 = beta[0];
    const b1 = beta[1];
    let q0 = 0;
    let q1 = 0;
    for (let i = 0; i < n; i++) {
      const x0 = X[2 * i];
      const x1 = X[2 * i + 1];
      const r = y[i] - b0 * x0 - b1 * x1;
      residuals[i] = r;
      const a = Math.abs(r);
      if (!(a <= level)) bins.note(problem, i, r);
      maxAbs = Math.max(maxAbs, a);
      q0 += x0 * x0;
      q1 += x1 * x1;
    }
    colSq[0] = q0;
    colSq[1] = q1;
  } else if (p === 3 && !weights) {
    const b0 = beta[0];
    const b1 = beta[1];
    const b2 = beta[2];
    let q0 = 0;
    let q1 = 0;
    let q2 = 0;
    for (let i = 0; i < n; i++) {
      const x0 = X[3 * i];
      const x1 = X[3 * i + 1];
      const x2 = X[3 * i + 2];
      const r = y[i] - b0 * x0 - b1 * x1 - b2 * x2;
      residuals[i] = r;
      const a = Math.abs(r);
      if (!(a <= level)) bins.note(problem, i, r);
      maxAbs = Math.max(maxAbs, a);
      q0 += x0 * x0;
      q1 += x1 * x1;
      q2 += x2 * x2;
    }
    colSq[0] = q0;
    colSq[1] = q1;
    colSq[2] = q2;
  } else {
    for (let i = 0; i < n; i++) {
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
      if (!(a <= level)) bins.note(problem, i, rho);
      maxAbs = Math.max(maxAbs, a);
      for (let j = 0; j < p; j++) {
        const v = s * X[o + j];
        colSq[j] += v * v;
      }
    }
  }
  return { maxAbs, violators: bins.count, rows: bins.rows(), colSq };
}

/** The most violating row per sign in each bin (a class: one stable method for the rare path). */
class ViolatorBins {
  count = 0;
  private readonly hiVal = new Float64Array(VIOLATOR_BINS).fill(-Infinity);
  private readonly hiRow = new Int32Array(VIOLATOR_BINS).fill(-1);
  private readonly loVal = new Float64Array(VIOLATOR_BINS).fill(Infinity);
  private readonly loRow = new Int32Array(VIOLATOR_BINS).fill(-1);

  constructor(private readonly axis: BinAxis, private readonly p: number) {}

  note(problem: LinearProblem, i: number, rho: number): void {
    if (!Number.isFinite(rho)) throw nonFiniteRow(problem, i);
    this.count++;
    const { X } = problem;
    const { coef, lo, width } = this.axis;
    let t = 0;
    for (let j = 0; j < this.p; j++) t += X[i * this.p + j] * coef[j];
    const bin = Math.max(0, Math.min(VIOLATOR_BINS - 1, Math.floor((t - lo) / width) | 0));
    if (rho > 0 && rho > this.hiVal[bin]) {
      this.hiVal[bin] = rho;
      this.hiRow[bin] = i;
    } else if (rho < 0 && rho < this.loVal[bin]) {
      this.loVal[bin] = rho;
      this.loRow[bin] = i;
    }
  }

  rows(): Int32Array {
    const picked = new Set<number>();
    for (let k = 0; k < VIOLATOR_BINS; k++) {
      if (this.hiRow[k] >= 0) picked.add(this.hiRow[k]);
      if (this.loRow[k] >= 0) picked.add(this.loRow[k]);
    }
    return Int32Array.from(picked).sort();
  }
}
