// The session's kept L1 scale (src/fit/fit-session-scale.ts) against the definition computed by
// brute force: sort, take the median, sort the absolute deviations, take their median, × 1/Φ⁻¹(3/4)
// (1.482602218505602, check-values.md; Hampel 1974). Seeded invented values with ties and outliers.
import { describe, expect, it } from 'vitest';
import { extendSorted, madAfterMove, madOfSorted, sortResiduals } from '../../src/fit/fit-session-scale.ts';
import { madScaleOverwrite } from '../../src/fit/robust-scale.ts';
import type { LinearProblem } from '../../src/fit/types.ts';
import { seeded as mulberry32 } from './least-absolute-reference.ts';

/** Median of an ascending array: the middle, or the mean of the two middles. */
function medianSorted(a: number[]): number {
  const n = a.length;
  return n % 2 === 1 ? a[(n - 1) / 2] : (a[n / 2 - 1] + a[n / 2]) / 2;
}

function bruteMad(values: ArrayLike<number>): number {
  const v = Array.from(values).sort((a, b) => a - b);
  const m = medianSorted(v);
  const d = v.map((x) => Math.abs(x - m)).sort((a, b) => a - b);
  return 1.482602218505602 * medianSorted(d);
}

function randomValues(seed: number, n: number, ties: boolean): Float64Array {
  const rand = mulberry32(seed);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let v = (rand() - 0.5) * 10 + (rand() < 0.05 ? 300 * (rand() - 0.3) : 0);
    if (ties) v = Math.round(v);
    out[i] = v;
  }
  return out;
}

describe('madOfSorted', () => {
  it('equals the brute-force MAD for odd and even n, with and without ties (seeded)', () => {
    for (const n of [1, 2, 3, 4, 5, 8, 9, 100, 101, 1000, 1001]) {
      for (const ties of [false, true]) {
        const seed = 1000 * n + (ties ? 1 : 0);
        const v = randomValues(seed, n, ties);
        const want = bruteMad(v);
        const sorted = Float64Array.from(v).sort();
        // Values are only compared and subtracted once: the same double as the definition.
        expect(madOfSorted(sorted), `n = ${n}, ties ${ties}, seed ${seed}`).toBe(want);
        expect(madScaleOverwrite(Float64Array.from(v), n), `selection route, seed ${seed}`).toBe(want);
      }
    }
  });

  it('is 0 when more than half the values are equal, and NaN for no values', () => {
    expect(madOfSorted(Float64Array.from([1, 2, 2, 2, 9]))).toBe(0);
    expect(madOfSorted(new Float64Array(0))).toBeNaN();
  });
});

describe('sortResiduals / extendSorted', () => {
  it('keeps the whitened residuals of every row sorted as rows are appended, leaving the old array untouched', () => {
    const rand = mulberry32(77);
    const n = 400;
    const p = 2;
    const X = new Float64Array(n * p);
    const y = new Float64Array(n);
    const weights = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const s = Math.sin((rand() * 70 * Math.PI) / 180);
      X[i * p] = 1;
      X[i * p + 1] = s * s;
      y[i] = 110574 + 1120 * s * s + (rand() - 0.5) * 10;
      weights[i] = 0.5 + rand();
    }
    const beta = Float64Array.from([110574, 1120]);
    const pr = (m: number): LinearProblem => ({ n: m, p, X: X.subarray(0, m * p), y: y.subarray(0, m), weights: weights.subarray(0, m) });
    let kept = sortResiduals(pr(300), beta);
    const first = Float64Array.from(kept.values);
    for (const m of [301, 302, 310, 400]) {
      const next = extendSorted(kept, pr(m));
      const want: number[] = [];
      for (let i = 0; i < m; i++) want.push(Math.sqrt(weights[i]) * (y[i] - (X[i * p] * beta[0] + X[i * p + 1] * beta[1])));
      want.sort((a, b) => a - b);
      expect(Array.from(next.values)).toEqual(want);
      expect(next.rows).toBe(m);
      expect(madOfSorted(next.values)).toBe(bruteMad(want));
      kept = next;
    }
    expect(Array.from(sortResiduals(pr(300), beta).values)).toEqual(Array.from(first));
  });
});

describe('madAfterMove', () => {
  it('gives the brute-force MAD at a moved β with rows added, from windows around the old order statistics', () => {
    const rand = mulberry32(91);
    const n = 2000;
    const p = 2;
    const X = new Float64Array(n * p);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const s = Math.sin((rand() * 70 * Math.PI) / 180);
      X[i * p] = 1;
      X[i * p + 1] = s * s;
      y[i] = 110574 + 1120 * s * s + (rand() - 0.5) * 10 + (rand() < 0.05 ? 200 : 0);
    }
    const pr = (m: number): LinearProblem => ({ n: m, p, X: X.subarray(0, m * p), y: y.subarray(0, m) });
    const old = sortResiduals(pr(1990), Float64Array.from([110574, 1120]));
    for (const [m, dc, dm] of [[1990, 0.001, -0.002], [1991, 0.004, 0.001], [1995, -0.003, 0.01], [2000, 0.02, -0.05]] as const) {
      const beta = Float64Array.from([110574 + dc, 1120 + dm]);
      // max |x| per column is 1 and ≤ 0.883 (sin²70°): the reach bound of the session.
      const reach = Math.abs(dc) + Math.abs(dm);
      const want: number[] = [];
      for (let i = 0; i < m; i++) want.push(y[i] - (X[i * p] * beta[0] + X[i * p + 1] * beta[1]));
      expect(madAfterMove(pr(m), beta, old, reach), `rows ${m}, Δβ = (${dc}, ${dm})`).toBe(bruteMad(want));
    }
  });

  it('refuses (null) when the windows are too wide to help, so the caller selects directly', () => {
    const values = randomValues(5, 400, false);
    const X = new Float64Array(400 * 2);
    for (let i = 0; i < 400; i++) X[2 * i] = 1;
    const pr: LinearProblem = { n: 400, p: 2, X, y: values };
    const old = sortResiduals(pr, Float64Array.from([0, 0]));
    expect(madAfterMove(pr, Float64Array.from([0.5, 0]), old, 1e6)).toBeNull();
  });
});
