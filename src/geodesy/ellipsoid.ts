// Reference ellipsoids: each is fixed by its semi-major axis a and one second constant (1/f, or
// the polar semi-axis b for the two classical ones defined that way, where f = (a − b)/a is
// derived). Derived quantities: e² = f(2 − f), third flattening n = f/(2 − f) = (a − b)/(a + b)
// (Helmert 1880; the expansion parameter of every series in meridian.ts).
//
// Policy for user-defined ellipsoids: a is finite and positive; 1/f is either +Infinity (a sphere)
// or finite with |1/f| ≥ MIN_ABS_INVERSE_FLATTENING, so |f| ≤ MAX_ABS_FLATTENING. Negative 1/f (a
// prolate figure) is allowed, because a fit with bad data can produce one and it must still be
// shown; the series of meridian.ts stay sub-millimetre up to that bound (see meridian.ts).
import { InputError } from '../errors.ts';
import { MAX_ABS_FLATTENING } from './flattening.ts';

export interface Ellipsoid {
  /** Stable identifier ('wgs84', …, or 'custom'). */
  id: string;
  /** Display name. */
  name: string;
  /** a, metres. */
  semiMajorAxisM: number;
  /** f = (a − b)/a, dimensionless. */
  flattening: number;
  /** 1/f (Infinity for a sphere). */
  inverseFlattening: number;
  /** The defining document, marked "from memory" where it was not re-read. */
  source: string;
}

/** |1/f| below this is refused for a user-defined figure (|f| ≤ 0.05: see flattening.ts). */
export const MIN_ABS_INVERSE_FLATTENING = 1 / MAX_ABS_FLATTENING;

function byInverseFlattening(id: string, name: string, a: number, inverseFlattening: number, source: string): Ellipsoid {
  return Object.freeze({ id, name, semiMajorAxisM: a, flattening: 1 / inverseFlattening, inverseFlattening, source });
}

// a − b is exact in binary floating point here (Sterbenz: b > a/2), so f and 1/f are each one
// correctly rounded division of the defining numbers.
function byPolarAxis(id: string, name: string, a: number, b: number, source: string): Ellipsoid {
  return Object.freeze({ id, name, semiMajorAxisM: a, flattening: (a - b) / a, inverseFlattening: a / (a - b), source });
}

export const ELLIPSOIDS = Object.freeze({
  wgs84: byInverseFlattening('wgs84', 'WGS 84', 6378137, 298.257223563,
    'NIMA TR8350.2, 3rd edition (2000): a = 6 378 137 m, 1/f = 298.257 223 563 — from memory'),
  grs80: byInverseFlattening('grs80', 'GRS 80', 6378137, 298.257222101,
    'H. Moritz, "Geodetic Reference System 1980", J. Geodesy 74 (2000): a = 6 378 137 m, derived 1/f = 298.257 222 101 — from memory'),
  intl1924: byInverseFlattening('intl1924', 'International 1924 (Hayford)', 6378388, 297,
    'classical definition: a = 6 378 388 m, 1/f = 297 — from memory'),
  clarke1866: byPolarAxis('clarke1866', 'Clarke 1866', 6378206.4, 6356583.8,
    'classical definition: a = 6 378 206.4 m, b = 6 356 583.8 m — from memory'),
  airy1830: byPolarAxis('airy1830', 'Airy 1830', 6377563.396, 6356256.909,
    'Ordnance Survey, "A guide to coordinate systems in Great Britain": a = 6 377 563.396 m, b = 6 356 256.909 m — from memory'),
} satisfies Record<string, Ellipsoid>) as Readonly<Record<'wgs84' | 'grs80' | 'intl1924' | 'clarke1866' | 'airy1830', Ellipsoid>>;

export type EllipsoidId = keyof typeof ELLIPSOIDS;

export const ELLIPSOID_IDS: readonly EllipsoidId[] = Object.freeze(Object.keys(ELLIPSOIDS) as EllipsoidId[]);

export function isEllipsoidId(id: string): id is EllipsoidId {
  return Object.prototype.hasOwnProperty.call(ELLIPSOIDS, id);
}

/** The named reference ellipsoid; InputError naming the id and the known ids otherwise. */
export function ellipsoidById(id: string): Ellipsoid {
  if (typeof id === 'string' && isEllipsoidId(id)) return ELLIPSOIDS[id];
  throw new InputError('ellipsoid', id, `unknown ellipsoid; use one of ${ELLIPSOID_IDS.join(', ')}`);
}

/** A user-defined figure from a (metres) and 1/f, validated by the policy in the file header. */
export function customEllipsoid(semiMajorAxisM: number, inverseFlattening: number, name = 'custom'): Ellipsoid {
  if (typeof semiMajorAxisM !== 'number' || !Number.isFinite(semiMajorAxisM) || semiMajorAxisM <= 0) {
    throw new InputError('semiMajorAxisM', semiMajorAxisM, 'the semi-major axis must be a finite number of metres above 0');
  }
  if (typeof inverseFlattening !== 'number' || Number.isNaN(inverseFlattening) || inverseFlattening === -Infinity) {
    throw new InputError('inverseFlattening', inverseFlattening, 'the inverse flattening must be a number (Infinity for a sphere)');
  }
  if (Math.abs(inverseFlattening) < MIN_ABS_INVERSE_FLATTENING) {
    throw new InputError('inverseFlattening', inverseFlattening,
      `|1/f| must be at least ${MIN_ABS_INVERSE_FLATTENING} (Earth-like figures have about 298); the meridian series are not accurate beyond`);
  }
  const flattening = inverseFlattening === Infinity ? 0 : 1 / inverseFlattening;
  return Object.freeze({
    id: 'custom', name, semiMajorAxisM, flattening, inverseFlattening,
    source: 'user-defined (a, 1/f)',
  });
}

/** First eccentricity squared e² = f(2 − f). */
export function eccentricitySquared(f: number): number {
  return f * (2 - f);
}

/** Third flattening n = f/(2 − f) = (a − b)/(a + b). */
export function thirdFlattening(f: number): number {
  return f / (2 - f);
}

/** Polar semi-axis b = a(1 − f), metres. */
export function semiMinorAxisM(e: Ellipsoid): number {
  return e.semiMajorAxisM * (1 - e.flattening);
}
