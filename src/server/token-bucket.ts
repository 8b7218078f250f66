// Rate limits: one token bucket per key (a crew token, or a client address before authentication).
// A bucket holds up to `burst` requests and refills at `perSecond`; a request takes one or is
// refused with the wait until the next one (HTTP 429, Retry-After). Buckets idle long enough to be
// full again carry no information and are dropped, so memory stays bounded by active clients.
export interface BucketLimits {
  burst: number;
  perSecond: number;
}

interface Bucket {
  tokens: number;
  atMs: number;
}

/** Keep at most this many buckets; beyond it the least recently used are dropped (a full bucket is the default anyway). */
const MAX_BUCKETS = 50_000;

export class TokenBuckets {
  private readonly buckets = new Map<string, Bucket>();

  constructor(private readonly limits: BucketLimits, private readonly now: () => number = Date.now) {
    if (!(limits.burst >= 1) || !(limits.perSecond > 0)) throw new RangeError(`rate limit: burst ${limits.burst} and perSecond ${limits.perSecond} must be positive`);
  }

  /** Take one request for `key`: 0 when allowed, else the milliseconds until one is available. */
  take(key: string): number {
    const t = this.now();
    const b = this.buckets.get(key);
    const tokens = b ? Math.min(this.limits.burst, b.tokens + ((t - b.atMs) / 1000) * this.limits.perSecond) : this.limits.burst;
    this.buckets.delete(key); // re-insert at the end: Map order is least recently used first
    if (tokens >= 1) {
      this.buckets.set(key, { tokens: tokens - 1, atMs: t });
      this.trim();
      return 0;
    }
    this.buckets.set(key, { tokens, atMs: t });
    return Math.ceil(((1 - tokens) / this.limits.perSecond) * 1000);
  }

  private trim(): void {
    while (this.buckets.size > MAX_BUCKETS) {
      const oldest = this.buckets.keys().next().value;
      if (oldest === undefined) return;
      this.buckets.delete(oldest);
    }
  }
}
