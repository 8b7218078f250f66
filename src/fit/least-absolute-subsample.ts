// The subsample fit that seeds the screened least-absolute-deviations solve.
//
// The top level only needs from its subsample a good estimate γ̂ and the vertex (basis rows)
// it sits on; it then certifies its own answer on all rows, so the subsample fit need not carry
// a certificate. Large subsamples are therefore screened the same way, recursively (Portnoy &
// Koenker 1997, §4 applied to the subsample): a sub-subsample of (p·m)^(2/3) rows is fitted,
// rows outside the leverage-shaped band are pinned into the linear term, and the kept rows are
// solved exactly from the sub-subsample's vertex. A pinned row on the wrong side only makes the
// estimate slightly worse (the top level's band and certificate absorb it); an unbounded small
// problem falls back to the direct descent on the whole subsample.
import { bandFromSubsample, widen } from './least-absolute-band.ts';
import { descendLeastAbsolute, type CompactLeastAbsolute, type DescentResult } from './least-absolute-descent.ts';
import { screenCompact } from './least-absolute-screen.ts';
import { factorLu, solveLu } from './linear-solve.ts';
import { dotRow } from './row-forms.ts';
import type { ColumnFrame } from './simplex-frame.ts';
import { stratifiedSample } from './simplex-problem.ts';

export interface SubsampleOptions {
  /** Compact problems up to this many rows go to the descent directly. */
  directMaxRows: number;
  /** Band keep fraction multiplier κ (least-absolute-band.ts). */
  kappa: number;
  /** Floor of every subsample. */
  minRows: number;
  cap: (m: number, p: number) => number;
}

export interface SubsampleFit {
  result: DescentResult;
  /** Line searches over all levels. */
  iterations: number;
}

/** Fits m compact rows without a linear term (cp.c must be zero). */
export function fitSubsample(cp: CompactLeastAbsolute, frame: ColumnFrame, opts: SubsampleOptions): SubsampleFit {
  const { m, p, A, b } = cp;
  if (m <= opts.directMaxRows) {
    const result = descendLeastAbsolute(cp, { gamma: leastSquaresStart(cp) }, opts.cap(m, p));
    return { result, iterations: result.iterations };
  }
  const m1 = Math.min(m, Math.max(opts.minRows, Math.round((p * m) ** (2 / 3))));
  const pos = stratifiedSample(m, m1);
  const sub = gatherCompact(cp, pos, m1, new Float64Array(p));
  const inner = fitSubsample(sub, frame, opts);
  let iterations = inner.iterations;
  if (inner.result.status !== 'optimal') {
    const result = descendLeastAbsolute(cp, { gamma: leastSquaresStart(cp) }, opts.cap(m, p));
    return { result, iterations: iterations + result.iterations };
  }
  const gamma = inner.result.gamma;
  let band = bandFromSubsample(frame, sub.A, inner.result.residuals, m1, Math.min(1, opts.kappa * Math.sqrt(p / m1)));
  const basisRows = inner.result.basis.map((k) => pos[k]);
  for (let attempt = 0; attempt < 4; attempt++) {
    const screen = screenCompact(A, b, m, p, gamma, band);
    const c = screen.pinnedSum.map((v) => -v);
    const kept = gatherCompact(cp, screen.kept, screen.keptCount, c);
    const start = positionsIn(basisRows, screen.kept, screen.keptCount);
    const res = descendLeastAbsolute(kept, start ? { gamma, basis: start } : { gamma }, opts.cap(kept.m, p));
    iterations += res.iterations;
    if (res.status === 'optimal') {
      // Back to positions in cp, with the residuals of every cp row at the kept optimum.
      const basis = res.basis.map((k) => screen.kept[k]);
      const residuals = new Float64Array(m);
      const sign = new Int8Array(m);
      const g = res.gamma;
      for (let i = 0; i < m; i++) {
        const r = b[i] - dotRow(A, i * p, g, p);
        residuals[i] = r;
        sign[i] = 1 - 2 * +(r < 0);
      }
      for (let k = 0; k < p; k++) {
        residuals[basis[k]] = 0;
        sign[basis[k]] = 0;
      }
      return { result: { ...res, basis, residuals, sign }, iterations };
    }
    if (res.status !== 'unbounded') break;
    band = widen(band);
  }
  const result = descendLeastAbsolute(cp, { gamma }, opts.cap(m, p));
  return { result, iterations: iterations + result.iterations };
}

/** Copies rows[0..count) of cp into a new compact problem with linear term c. */
export function gatherCompact(cp: CompactLeastAbsolute, rows: Int32Array, count: number, c: Float64Array): CompactLeastAbsolute {
  const { p, A, b } = cp;
  const A2 = new Float64Array(count * p);
  const b2 = new Float64Array(count);
  for (let r = 0; r < count; r++) {
    const i = rows[r];
    for (let j = 0; j < p; j++) A2[r * p + j] = A[i * p + j];
    b2[r] = b[i];
  }
  return { m: count, p, A: A2, b: b2, c };
}

/**
 * Least squares on compact rows (normal equations in the frame, where they are well scaled).
 * Each sum is one pass with its accumulator in a local: adding every row into the p×p array
 * kept the p² + p sums in memory, a store and reload per term (~60 ns a row at p = 3).
 */
export function leastSquaresStart(cp: CompactLeastAbsolute): Float64Array {
  const { m, p, A, b } = cp;
  const G = new Float64Array(p * p);
  const r = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    let rj = 0;
    for (let i = 0; i < m; i++) rj += A[i * p + j] * b[i];
    r[j] = rj;
    for (let k = j; k < p; k++) {
      let g = 0;
      for (let i = 0; i < m; i++) g += A[i * p + j] * A[i * p + k];
      G[j * p + k] = g;
      G[k * p + j] = g;
    }
  }
  const lu = factorLu(G, p);
  const gamma = lu.singular ? new Float64Array(p) : solveLu(lu, r);
  for (let j = 0; j < p; j++) if (!Number.isFinite(gamma[j])) return new Float64Array(p);
  return gamma;
}

/** Positions of the given values among sorted[0..count), or null if one is missing. */
export function positionsIn(values: Int32Array, sorted: Int32Array, count: number): Int32Array | null {
  const out = new Int32Array(values.length);
  for (let k = 0; k < values.length; k++) {
    const at = binarySearch(sorted, count, values[k]);
    if (at < 0) return null;
    out[k] = at;
  }
  return out;
}

export function binarySearch(a: Int32Array, count: number, v: number): number {
  let lo = 0;
  let hi = count - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >>> 1;
    const x = a[mid];
    if (x < v) lo = mid + 1;
    else if (x > v) hi = mid - 1;
    else return mid;
  }
  return -1;
}
