// The range of flattening the meridian series of meridian.ts serve to better than 0.1 mm.
//
// The series in the third flattening n = f/(2 − f) are kept through n⁶; the first omitted terms
// are O(n⁷) with coefficients of order one, so the truncation error of G(φ) is about a·n⁷. At
// |f| = 0.05 (n ≈ 0.0256) that is 6.4e6 m × 7.3e-12 ≈ 5e-5 m; at the Earth's f ≈ 1/298
// (n ≈ 0.00168) it is ≈ 2e-13 m, far below double rounding (≈ 2e-9 m at 1e7 m).
// A fit that searches over f (the rigorous model) must keep its bracket inside this range.
import { InputError } from '../errors.ts';

/** Largest |f| accepted by the series functions (truncation error ≤ ~5e-5 m there, see above). */
export const MAX_ABS_FLATTENING = 0.05;

/** Refuses a non-finite flattening or one outside ±MAX_ABS_FLATTENING, naming `field`. */
export function assertFlattening(f: number, field = 'flattening'): void {
  if (typeof f !== 'number' || !Number.isFinite(f)) {
    throw new InputError(field, f, 'the flattening must be a finite number');
  }
  if (Math.abs(f) > MAX_ABS_FLATTENING) {
    throw new InputError(field, f,
      `|f| must not exceed ${MAX_ABS_FLATTENING}: the meridian series (to n⁶) lose sub-millimetre accuracy beyond`);
  }
}
