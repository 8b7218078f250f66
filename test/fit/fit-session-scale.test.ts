// The session's L1 scale from a sorted reference (src/fit/fit-session-scale.ts) against the definition computed by
// brute force: sort, take the median, sort the absolute deviations, take their median, × 1/Φ⁻¹(3/4)
// (1.482602218505602, check-values.md; Hampel 1974). Seeded invented values with ties and outliers.
import { describe, expect, it } from 'vitest';
import { madFromReference, madOfSorted, sortResiduals } from '../../src/fit/fit-session-scale.ts';
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

/** Invented degree-length rows (seeded): x = sin²φ, 110574 + 1120x + noise, 5 % outliers, optional weights. */
function degreeProblem(seed: number, n: number, weighted: boolean): LinearProblem {
  const rand = mulberry32(seed);
  const p = 2;
  const X = new Float64Array(n * p);
  const y = new Float64Array(n);
  const weights = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const s = Math.sin((rand() * 70 * Math.PI) / 180);
    X[i * p] = 1;
    X[i * p + 1] = s * s;
    y[i] = 110574 + 1120 * s * s + (rand() - 0.5) * 10 + (rand() < 0.05 ? 200 * (rand() - 0.3) : 0);
    weights[i] = 0.5 + rand();
  }
  return weighted ? { n, p, X, y, weights } : { n, p, X, y };
}

function head(pr: LinearProblem, m: number): LinearProblem {
  const out: LinearProblem = { n: m, p: pr.p, X: pr.X.subarray(0, m * pr.p), y: pr.y.subarray(0, m) };
  if (pr.weights) out.weights = pr.weights.subarray(0, m);
  return out;
}

function whitenedAt(pr: LinearProblem, beta: ArrayLike<number>): number[] {
  const out: number[] = [];
  for (let i = 0; i < pr.n; i++) {
    const sw = pr.weights ? Math.sqrt(pr.weights[i]) : 1;
    out.push(sw * (pr.y[i] - (pr.X[2 * i] * beta[0] + pr.X[2 * i + 1] * beta[1])));
  }
  return out;
}

describe('sortResiduals', () => {
  it('sorts the whitened residuals with each one\'s row', () => {
    const pr = degreeProblem(77, 400, true);
    const beta = Float64Array.from([110574, 1120]);
    const ref = sortResiduals(pr, beta);
    const want = whitenedAt(pr, beta);
    expect(Array.from(ref.values)).toEqual([...want].sort((a, b) => a - b));
    ref.order.forEach((row, t) => expect(ref.values[t]).toBe(want[row]));
  });
});

describe('madFromReference', () => {
  for (const weighted of [false, true]) {
    it(`gives the brute-force MAD at moved β with rows added since the reference${weighted ? ' (weighted rows)' : ''}`, () => {
      const full = degreeProblem(weighted ? 92 : 91, 2000, weighted);
      const ref = sortResiduals(head(full, 1990), Float64Array.from([110574, 1120]));
      for (const [m, dc, dm] of [[1990, 0, 0], [1991, 0, 0], [1990, 0.001, -0.002], [1991, 0.004, 0.001], [1995, -0.003, 0.01], [2000, 0.02, -0.05], [2000, 0.5, -1]] as const) {
        const beta = Float64Array.from([110574 + dc, 1120 + dm]);
        // The session's reach: √w_max·Σ max|xⱼ||Δβⱼ| (max|x| per column ≤ 1), plus rounding slack.
        const reach = (weighted ? Math.sqrt(1.5) : 1) * (Math.abs(dc) + Math.abs(dm)) + 1e-9;
        const got = madFromReference(head(full, m), beta, ref, reach);
        expect(got, `rows ${m}, Δβ = (${dc}, ${dm})`).toBe(bruteMad(whitenedAt(head(full, m), beta)));
      }
    });
  }

  it('refuses (null) when more rows were added than it recomputes, so the caller rebuilds', () => {
    const full = degreeProblem(93, 1200, false);
    const ref = sortResiduals(head(full, 600), Float64Array.from([110574, 1120]));
    expect(madFromReference(full, Float64Array.from([110574, 1120]), ref, 0)).toBeNull();
  });
});
