// Median, MAD scale and selection: against brute force (a full sort), the MAD constant against
// scipy (1/norm.ppf(0.75), test/fixtures/fit/chi-square.json from scripts/gen-fit-fixtures.sh)
// and check-values.md, plus the exact special values.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { MAD_CONSISTENCY, madScale, median, quickselect } from '../../src/fit/robust-scale.ts';
import { within } from '../helpers/within.ts';
import { FIXTURE_SOURCE, readJson, type ChiSquareFile } from './fixtures.ts';

const sorted = (v: ArrayLike<number>): number[] => Array.from(v).sort((a, b) => a - b);
function bruteMedian(v: ArrayLike<number>): number {
  const s = sorted(v);
  const n = s.length;
  return n % 2 ? s[(n - 1) / 2] : (s[n / 2 - 1] + s[n / 2]) / 2;
}

describe('MAD consistency constant', () => {
  it('is 1/Φ⁻¹(3/4): scipy to 1e-15 and 1.4826 to 4 decimals (check-values.md)', () => {
    const ref = readJson<ChiSquareFile>('chi-square.json').madFactor;
    within(MAD_CONSISTENCY, ref, 1e-15, '', '1/Φ⁻¹(3/4)', { relative: true, source: `scipy.stats.norm.ppf (${FIXTURE_SOURCE})` });
    within(MAD_CONSISTENCY, 1.4826, 5e-5, '', 'MAD factor', { source: 'check-values.md (published 1.4826)' });
  });
});

describe('median and madScale, exact cases', () => {
  it('odd, even, ties and a single value (brute force by hand)', () => {
    expect(median([3, 1, 2])).toBe(2);
    expect(median([4, 1, 3, 2])).toBe(2.5);
    expect(median([5, 5, 5, 1])).toBe(5);
    expect(median([-7.25])).toBe(-7.25);
  });
  it('identical repeats give a zero scale, +0 exactly', () => {
    expect(Object.is(madScale([110574.5, 110574.5, 110574.5, 110574.5]), 0)).toBe(true);
  });
  it('one wild value does not move the MAD: |r − 3| of [1..5, 1000] is [2,1,0,1,2,997] → median 1.5', () => {
    // median of [1,2,3,4,5,1000] = 3.5; |v − 3.5| = [2.5,1.5,0.5,0.5,1.5,996.5] → median 1.5.
    within(madScale([1, 2, 3, 4, 5, 1000]), 1.5 * MAD_CONSISTENCY, 1e-15, '', 'MAD scale', { relative: true, source: 'worked by hand in this comment' });
  });
  it('refuses empty and non-finite input, naming the element', () => {
    expect(() => median([])).toThrow(InputError);
    expect(() => madScale([1, NaN, 2])).toThrow(/values\[1\]/);
    expect(() => quickselect(new Float64Array(3), 3)).toThrow(/k/);
  });
});

describe('quickselect and median against a full sort (seeded)', () => {
  const seed = Number(process.env.ARCFIELD_SEED ?? 20260602);
  it(`random arrays up to 5000 values, with ties (seed ${seed})`, () => {
    console.log(`robust-scale property: seed ${seed} (replay with ARCFIELD_SEED=${seed})`);
    fc.assert(fc.property(
      fc.array(fc.oneof(fc.integer({ min: -5, max: 5 }), fc.double({ min: -1e6, max: 1e6, noNaN: true })), { minLength: 1, maxLength: 5000 }),
      fc.nat(),
      (values, kSeed) => {
        const a = Float64Array.from(values);
        const k = kSeed % a.length;
        const s = sorted(values);
        // + 0 folds −0 into +0: a sort may order equal −0 and +0 either way.
        expect(quickselect(a, k) + 0).toBe(s[k] + 0);
        for (let i = 0; i < k; i++) expect(a[i] <= a[k]).toBe(true);
        for (let i = k + 1; i < a.length; i++) expect(a[i] >= a[k]).toBe(true);
        expect(median(values) + 0).toBe(bruteMedian(values) + 0);
        const m = bruteMedian(values);
        expect(madScale(values) + 0).toBe(MAD_CONSISTENCY * bruteMedian(values.map((v) => Math.abs(v - m))) + 0);
      }), { seed, numRuns: Number(process.env.ARCFIELD_RUNS ?? 200) });
  });
  it('large arrays take the Floyd–Rivest sampling path (n = 100 001, sorted and reversed)', () => {
    const n = 100_001;
    const up = Float64Array.from({ length: n }, (_, i) => i * 0.5);
    const down = Float64Array.from(up).reverse();
    expect(median(up)).toBe(25_000);
    expect(median(down)).toBe(25_000);
    expect(quickselect(Float64Array.from(down), 17)).toBe(8.5);
  });
});

describe('median and madScale on large arrays (the histogram path, n ≥ HISTOGRAM_MIN_COUNT)', () => {
  it('equal the full sort on heavy-tailed, tied, clustered and two-point data', () => {
    // Invented data; brute force = a full sort. Seeded LCG so a failure replays.
    let state = 20261202;
    const rand = (): number => { state = (state * 48271) % 2147483647; return state / 2147483647; };
    const shapes: Array<(i: number) => number> = [
      () => (rand() - 0.5) * 10 + (rand() < 0.05 ? 300 * (rand() - 0.5) : 0), // noise with gross outliers
      () => Math.round(rand() * 5), // six tied values
      () => (rand() < 0.5 ? 0 : 1e-300) + rand() * 1e-310, // subnormal spread
      (i) => (i % 2 ? -1 : 1) * 1e300, // two points far apart
      () => (rand() < 0.999 ? rand() : 1e12), // one far cluster: middle bins hold most values
    ];
    for (const [s, shape] of shapes.entries()) {
      for (const n of [2048, 2049, 5000, 20001]) {
        const v = Float64Array.from({ length: n }, (_, i) => shape(i));
        const m = bruteMedian(v);
        expect(median(v), `shape ${s}, n ${n}: median`).toBe(m);
        const dev = Float64Array.from(v, (x) => Math.abs(x - m));
        expect(madScale(v), `shape ${s}, n ${n}: MAD`).toBe(MAD_CONSISTENCY * bruteMedian(dev));
      }
    }
  });
});
