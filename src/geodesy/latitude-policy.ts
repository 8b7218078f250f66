// The one policy for latitudes entering the geodesy functions (degrees, north positive):
// a latitude must be a finite number with |φ| ≤ 90°. NaN, ±Infinity and |φ| > 90° are refused
// with an InputError naming the field — never wrapped over the pole and never passed on as NaN,
// because a latitude beyond the pole is a reading or typing error, not a place. −0 is kept as −0
// so that odd functions stay exactly odd (G(−0) is −0).
import { InputError } from '../errors.ts';

export const MAX_LATITUDE_DEG = 90;

/** Returns `latitudeDeg` unchanged when it obeys the policy above; InputError otherwise. */
export function checkedLatitudeDeg(latitudeDeg: number, field = 'latitudeDeg'): number {
  if (typeof latitudeDeg !== 'number' || Number.isNaN(latitudeDeg)) {
    throw new InputError(field, latitudeDeg, 'a latitude must be a number of degrees');
  }
  if (!Number.isFinite(latitudeDeg)) {
    throw new InputError(field, latitudeDeg, 'a latitude must be finite');
  }
  if (Math.abs(latitudeDeg) > MAX_LATITUDE_DEG) {
    throw new InputError(field, latitudeDeg, `latitude ${latitudeDeg}° is beyond the pole (|latitude| ≤ 90°)`);
  }
  return latitudeDeg;
}
