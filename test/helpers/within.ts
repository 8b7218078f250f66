// One tolerance helper for every numeric check: names the quantity, the unit and the source,
// and prints actual, expected, difference and tolerance on failure (style.md §1).
import { expect } from 'vitest';

export interface WithinOptions {
  /** Where the expected value comes from, e.g. "GeographicLib 2.2 (scripts/gen-geodesy-fixtures.ts)". */
  source?: string;
  /** Tolerance is relative to |expected| instead of absolute. */
  relative?: boolean;
}

export function within(actual: number, expected: number, tol: number, unit: string, what = 'value', opts: WithinOptions = {}): void {
  const diff = actual - expected;
  const scaled = opts.relative ? Math.abs(diff) / Math.max(Math.abs(expected), Number.MIN_VALUE) : Math.abs(diff);
  const ok = Number.isFinite(actual) && scaled <= tol;
  if (!ok) {
    const msg = `${what}: actual ${actual} ${unit}, expected ${expected} ${unit}, difference ${diff} ${unit}` +
      ` (${opts.relative ? 'relative ' + scaled.toExponential(3) : 'absolute'}), tolerance ${tol}${opts.relative ? ' relative' : ' ' + unit}` +
      (opts.source ? `; expected from ${opts.source}` : '');
    expect.fail(msg);
  }
}
