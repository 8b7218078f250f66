// The fit layer's reused work arrays: small p×p views carved from a shared chunk
// (src/fit/small-array.ts) must behave as fresh zeroed arrays, and the L1 descent on scratch slots
// (DescentStart.reuse, src/fit/least-absolute-descent.ts) must give the answer of brute force over
// every p-row vertex (the L1 optimum is attained at one: Barrodale & Roberts 1973), whatever ran
// on the slots before it. Seeded invented rows.
import { describe, expect, it } from 'vitest';
import { descendLeastAbsolute, type CompactLeastAbsolute } from '../../src/fit/least-absolute-descent.ts';
import { smallCopy, smallFloat64 } from '../../src/fit/small-array.ts';
import { bruteForceL1, degreeRows, objectiveAt, objectiveTolerance } from './least-absolute-reference.ts';
import type { LinearProblem } from '../../src/fit/types.ts';

describe('smallFloat64', () => {
  it('hands out zeroed, independent views, across chunk boundaries', () => {
    const views: Float64Array[] = [];
    // 3000 × 72 bytes is more than three 64 KiB chunks.
    for (let k = 0; k < 3000; k++) {
      const v = smallFloat64(9);
      expect(v.length).toBe(9);
      expect(v.every((x) => x === 0)).toBe(true);
      v.fill(k);
      views.push(v);
    }
    views.forEach((v, k) => expect(v.every((x) => x === k)).toBe(true));
  });

  it('leaves on-heap sizes and large arrays to the ordinary allocation (own buffer)', () => {
    for (const n of [0, 1, 8, 257, 1000]) {
      const v = smallFloat64(n);
      expect(v.length).toBe(n);
      expect(v.buffer.byteLength).toBe(n * 8);
    }
  });

  it('smallCopy copies the first n values, and later writes do not reach the source', () => {
    const a = Float64Array.from([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11]);
    const c = smallCopy(a, 9);
    expect(Array.from(c)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9]);
    c[0] = -1;
    expect(a[0]).toBe(1);
  });
});

/** The whitened rows as the descent's compact problem (no linear term), frame = identity. */
function compact(pr: LinearProblem): CompactLeastAbsolute {
  const { n, p, X, y } = pr;
  return { m: n, p, A: Float64Array.from(X), b: Float64Array.from(y), c: new Float64Array(p) };
}

describe('descendLeastAbsolute on reused scratch slots', () => {
  it('matches brute force over every vertex, with slots left dirty by larger and smaller solves', () => {
    const sizes = [14, 40, 9, 25, 14];
    for (const [k, m] of sizes.entries()) {
      for (const p of [2, 3]) {
        const pr = degreeRows(m, p, 9100 + 10 * k + p);
        const best = bruteForceL1(pr);
        const reused = descendLeastAbsolute(compact(pr), { gamma: new Float64Array(p), reuse: true }, 200);
        expect(reused.status).toBe('optimal');
        expect(Math.abs(objectiveAt(pr, reused.gamma) - best)).toBeLessThanOrEqual(objectiveTolerance(pr, best));
        const fresh = descendLeastAbsolute(compact(pr), { gamma: new Float64Array(p) }, 200);
        expect(Array.from(reused.basis)).toEqual(Array.from(fresh.basis));
      }
    }
  });
});
