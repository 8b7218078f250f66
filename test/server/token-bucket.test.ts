// Token bucket (token-bucket.ts) with an injected clock: the counts follow from the definition
// (burst B, refill r per second: after a burst, one request per 1/r s).
import { describe, expect, it } from 'vitest';
import { TokenBuckets } from '../../src/server/token-bucket.ts';

describe('TokenBuckets', () => {
  it('allows a burst, then one request per refill interval, with the wait reported', () => {
    let t = 0;
    const b = new TokenBuckets({ burst: 3, perSecond: 2 }, () => t);
    expect([b.take('k'), b.take('k'), b.take('k')]).toEqual([0, 0, 0]);
    expect(b.take('k')).toBe(500); // empty: the next token is 1/2 s away
    t = 499;
    expect(b.take('k')).toBeGreaterThan(0);
    t = 1_000; // 2 tokens' worth of time since the burst (t = 0)
    expect(b.take('k')).toBe(0);
    expect(b.take('other')).toBe(0); // keys are independent
  });

  it('never holds more than the burst however long it idles', () => {
    let t = 0;
    const b = new TokenBuckets({ burst: 2, perSecond: 1 }, () => t);
    t = 3_600_000;
    expect([b.take('k'), b.take('k'), b.take('k') > 0]).toEqual([0, 0, true]);
  });

  it('refuses limits that are not positive', () => {
    expect(() => new TokenBuckets({ burst: 0, perSecond: 1 })).toThrow(RangeError);
    expect(() => new TokenBuckets({ burst: 1, perSecond: Number.NaN })).toThrow(RangeError);
  });
});
