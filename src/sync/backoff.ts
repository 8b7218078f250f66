// Retry delay after `failures` consecutive failed attempts: exponential with "full jitter"
// (a uniform draw in [0, min(cap, base·2^(failures−1))]), which spreads the retries of many
// devices that lost the network together (M. Brooker, "Exponential Backoff And Jitter", AWS
// Architecture Blog, 2015). A floor of half the base keeps a retry from being instant.
export interface BackoffPolicy {
  baseMs: number;
  capMs: number;
}

export const DEFAULT_BACKOFF: BackoffPolicy = { baseMs: 2_000, capMs: 5 * 60_000 };

export function backoffDelay(failures: number, policy: BackoffPolicy, random: () => number): number {
  if (failures <= 0) return 0;
  // 2^30 already exceeds any sensible cap; clamping the exponent keeps the product finite.
  const ceiling = Math.min(policy.capMs, policy.baseMs * 2 ** Math.min(failures - 1, 30));
  return Math.min(policy.capMs, Math.max(policy.baseMs / 2, Math.floor(random() * ceiling)));
}
