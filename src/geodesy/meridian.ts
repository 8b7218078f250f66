// Meridian radius of curvature, meridian arc distance and its inverse (degrees in, metres out).
//
// Meridian radius:  M(φ) = a(1 − e²)/(1 − e² sin²φ)^{3/2}, e² = f(2 − f)  (closed form, exact).
//
// Meridian distance from the equator, Helmert's series in the third flattening n = f/(2 − f)
// (F. R. Helmert, "Die mathematischen und physikalischen Theorieen der höheren Geodäsie", 1880;
// written to n⁶ as in H. Kawase, GSI Journal 2011, and C. F. F. Karney, J. Geodesy 85, 2011):
//
//   G(φ) = a/(1 + n) · A₀ · (φ + Σ_{k=1..6} h_k sin 2kφ),   A₀ = 1 + n²/4 + n⁴/64 + n⁶/256
//   h₁ = −3n/2 + 9n³/16 − 3n⁵/32     h₂ = 15n²/16 − 15n⁴/32 + 135n⁶/2048
//   h₃ = −35n³/48 + 105n⁵/256        h₄ = 315n⁴/512 − 189n⁶/512
//   h₅ = −693n⁵/1280                 h₆ = 1001n⁶/2048
//
// (φ + Σ h_k sin 2kφ is the rectifying latitude μ; a/(1 + n)·A₀ the rectifying radius.) The
// coefficients were re-derived from M = a(1 − n)²(1 + n)(1 + 2n cos 2φ + n²)^{−3/2} by binomial
// expansion; test/geodesy/series-coefficients.test.ts repeats that derivation in exact rationals.
// Truncation error: O(a·n⁷) — about 2e-13 m for the Earth, ≤ 5e-5 m at |f| = 0.05 (flattening.ts).
//
// Inverse (latitude from distance): the reverse series φ = μ + Σ d_k sin 2kμ (same sources)
//   d₁ = 3n/2 − 27n³/32 + 269n⁵/512   d₂ = 21n²/16 − 55n⁴/32 + 6759n⁶/4096
//   d₃ = 151n³/96 − 417n⁵/128         d₄ = 1097n⁴/512 − 15543n⁶/2560
//   d₅ = 8011n⁵/2560                  d₆ = 293393n⁶/61440
// then Newton steps dφ = (s − G(φ))/M(φ) (dG/dφ = M) until |dφ| < LATITUDE_TOLERANCE_RAD. The
// reverse series alone is good to O(n⁷) rad, so one step normally lands on double rounding; the
// step whose size is below the tolerance is still applied, so the error left is quadratic in it.
//
// Signs: every function works on |φ| and restores the sign, so G(−φ) = −G(φ) exactly and G(−0)
// is −0. G(±90°) returns the quadrant exactly. Latitudes obey latitude-policy.ts.
import { ArcfieldError, InputError } from '../errors.ts';
import { type Ellipsoid, eccentricitySquared, thirdFlattening } from './ellipsoid.ts';
import { assertFlattening } from './flattening.ts';
import { checkedLatitudeDeg } from './latitude-policy.ts';

const RAD_PER_DEG = Math.PI / 180;
const HALF_PI = Math.PI / 2;

/** Newton stops once a step is below this; a·1e-12 rad ≈ 6 µm on the ground. */
export const LATITUDE_TOLERANCE_RAD = 1e-12;
/** Iteration cap for the inverse: the reverse series starts within ~n⁷ rad, so 1–2 steps suffice. */
export const MAX_LATITUDE_ITERATIONS = 8;
/** A distance this far (relative) past the quadrant is still taken as the pole: 4 ulp of rounding. */
const QUADRANT_SLACK = 4 * Number.EPSILON;

interface MeridianSeries {
  /** Rectifying radius per unit a: A₀/(1 + n). */
  rectifyingPerUnitA: number;
  forward: readonly number[];
  reverse: readonly number[];
}

function meridianSeries(f: number): MeridianSeries {
  const n = thirdFlattening(f);
  const n2 = n * n;
  const a0 = 1 + n2 * (1 / 4 + n2 * (1 / 64 + n2 / 256));
  const forward = [
    n * (-3 / 2 + n2 * (9 / 16 - n2 * (3 / 32))),
    n2 * (15 / 16 + n2 * (-15 / 32 + n2 * (135 / 2048))),
    n2 * n * (-35 / 48 + n2 * (105 / 256)),
    n2 * n2 * (315 / 512 - n2 * (189 / 512)),
    n2 * n2 * n * (-693 / 1280),
    n2 * n2 * n2 * (1001 / 2048),
  ];
  const reverse = [
    n * (3 / 2 + n2 * (-27 / 32 + n2 * (269 / 512))),
    n2 * (21 / 16 + n2 * (-55 / 32 + n2 * (6759 / 4096))),
    n2 * n * (151 / 96 - n2 * (417 / 128)),
    n2 * n2 * (1097 / 512 - n2 * (15543 / 2560)),
    n2 * n2 * n * (8011 / 2560),
    n2 * n2 * n2 * (293393 / 61440),
  ];
  return { rectifyingPerUnitA: a0 / (1 + n), forward, reverse };
}

/** Σ_{k=1..K} c_k sin 2kx by Clenshaw's recurrence (one sin and one cos, stable). */
function sineSeries(c: readonly number[], x: number): number {
  const y = 2 * Math.cos(2 * x);
  let b1 = 0;
  let b2 = 0;
  for (let k = c.length - 1; k >= 0; k--) {
    const b0 = c[k] + y * b1 - b2;
    b2 = b1;
    b1 = b0;
  }
  return b1 * Math.sin(2 * x);
}

/** G(|φ|)/a for φ in radians, 0 ≤ φ ≤ π/2; the pole gives the quadrant per unit a exactly. */
function distancePerUnitAAbs(s: MeridianSeries, phiRad: number, isPole: boolean): number {
  if (isPole) return s.rectifyingPerUnitA * HALF_PI;
  return s.rectifyingPerUnitA * (phiRad + sineSeries(s.forward, phiRad));
}

/** M(φ)/a. */
function radiusPerUnitA(f: number, phiRad: number): number {
  const e2 = eccentricitySquared(f);
  const sinPhi = Math.sin(phiRad);
  const w = 1 - e2 * sinPhi * sinPhi;
  return (1 - e2) / (w * Math.sqrt(w));
}

function negative(x: number): boolean {
  return x < 0 || Object.is(x, -0);
}

/** Meridian radius of curvature M(φ), metres. */
export function meridianRadiusM(e: Ellipsoid, latitudeDeg: number): number {
  checkedLatitudeDeg(latitudeDeg);
  return e.semiMajorAxisM * radiusPerUnitA(e.flattening, Math.abs(latitudeDeg) * RAD_PER_DEG);
}

/** M(φ)/a for flattening f: the derivative of meridianDistancePerUnitA with respect to φ in radians. */
export function meridianRadiusPerUnitA(flattening: number, latitudeDeg: number): number {
  assertFlattening(flattening);
  checkedLatitudeDeg(latitudeDeg);
  return radiusPerUnitA(flattening, Math.abs(latitudeDeg) * RAD_PER_DEG);
}

/**
 * G(φ)/a: the meridian distance from the equator for a unit semi-major axis. G is linear in a for
 * fixed f, so a fit of (a, f) can search over f alone and solve a in closed form.
 */
export function meridianDistancePerUnitA(flattening: number, latitudeDeg: number): number {
  assertFlattening(flattening);
  checkedLatitudeDeg(latitudeDeg);
  const abs = Math.abs(latitudeDeg);
  const g = distancePerUnitAAbs(meridianSeries(flattening), abs * RAD_PER_DEG, abs === 90);
  return negative(latitudeDeg) ? -g : g;
}

/** G(φ): meridian distance from the equator to latitude φ, metres, odd in φ. */
export function meridianDistanceM(e: Ellipsoid, latitudeDeg: number): number {
  return e.semiMajorAxisM * meridianDistancePerUnitA(e.flattening, latitudeDeg);
}

/** G(φ₂) − G(φ₁), metres, positive northwards. */
export function meridianArcM(e: Ellipsoid, fromLatitudeDeg: number, toLatitudeDeg: number): number {
  checkedLatitudeDeg(fromLatitudeDeg, 'fromLatitudeDeg');
  checkedLatitudeDeg(toLatitudeDeg, 'toLatitudeDeg');
  return meridianDistanceM(e, toLatitudeDeg) - meridianDistanceM(e, fromLatitudeDeg);
}

/** Length of one degree of latitude at φ: M(φ)·π/180, metres per degree. */
export function degreeLengthM(e: Ellipsoid, latitudeDeg: number): number {
  return meridianRadiusM(e, latitudeDeg) * RAD_PER_DEG;
}

/** The rectifying radius a·A₀/(1 + n): G(φ) = this × rectifying latitude μ (radians). */
export function rectifyingRadiusM(e: Ellipsoid): number {
  assertFlattening(e.flattening);
  return e.semiMajorAxisM * meridianSeries(e.flattening).rectifyingPerUnitA;
}

/** The meridian quadrant G(90°), equator to pole, metres. */
export function quadrantM(e: Ellipsoid): number {
  assertFlattening(e.flattening);
  return e.semiMajorAxisM * distancePerUnitAAbs(meridianSeries(e.flattening), HALF_PI, true);
}

/** The inverse's report: the latitude and how it was reached. */
export interface LatitudeSolution {
  latitudeDeg: number;
  iterations: number;
  converged: boolean;
  reason: string;
  /** s − G(φ) at the returned latitude, metres (rounding level when converged). */
  residualM: number;
}

/**
 * Latitude whose meridian distance from the equator is `distanceM` (|s| ≤ quadrant), with the
 * iteration report. Distances beyond the quadrant are refused with an InputError.
 */
export function solveLatitudeFromMeridianDistance(e: Ellipsoid, distanceM: number): LatitudeSolution {
  assertFlattening(e.flattening);
  if (typeof distanceM !== 'number' || !Number.isFinite(distanceM)) {
    throw new InputError('distanceM', distanceM, 'a meridian distance must be a finite number of metres');
  }
  const series = meridianSeries(e.flattening);
  const a = e.semiMajorAxisM;
  const quadrant = a * distancePerUnitAAbs(series, HALF_PI, true);
  const s = Math.abs(distanceM);
  if (s > quadrant * (1 + QUADRANT_SLACK)) {
    throw new InputError('distanceM', distanceM,
      `beyond the pole: |distance| exceeds the quadrant ${quadrant.toFixed(4)} m of ${e.name}`);
  }
  const sign = negative(distanceM) ? -1 : 1;
  if (s >= quadrant) {
    return { latitudeDeg: sign * 90, iterations: 0, converged: true, reason: 'at the pole (|distance| = quadrant)', residualM: 0 };
  }
  const mu = s / (a * series.rectifyingPerUnitA);
  let phi = Math.min(HALF_PI, mu + sineSeries(series.reverse, mu));
  let iterations = 0;
  let converged = false;
  while (iterations < MAX_LATITUDE_ITERATIONS) {
    iterations++;
    const step = (s - a * distancePerUnitAAbs(series, phi, false)) / (a * radiusPerUnitA(e.flattening, phi));
    phi = Math.min(HALF_PI, Math.max(0, phi + step));
    if (Math.abs(step) < LATITUDE_TOLERANCE_RAD) {
      converged = true;
      break;
    }
  }
  const latitudeDeg = Math.min(90, phi / RAD_PER_DEG);
  const residualM = s - a * distancePerUnitAAbs(series, phi, false);
  return {
    latitudeDeg: sign < 0 ? -latitudeDeg : latitudeDeg,
    iterations,
    converged,
    reason: converged
      ? `converged: Newton step below ${LATITUDE_TOLERANCE_RAD} rad after ${iterations} iteration(s)`
      : `did not converge in ${MAX_LATITUDE_ITERATIONS} Newton iterations (last residual ${residualM} m)`,
    residualM: sign < 0 ? -residualM : residualM,
  };
}

/** Latitude (degrees) from meridian distance (metres); the inverse of meridianDistanceM. */
export function latitudeFromMeridianDistanceDeg(e: Ellipsoid, distanceM: number): number {
  const solution = solveLatitudeFromMeridianDistance(e, distanceM);
  if (!solution.converged) {
    // Cannot happen for a validated ellipsoid (the start is within ~n⁷ rad); never return a guess.
    throw new ArcfieldError(`latitude from meridian distance ${distanceM} m on ${e.name}: ${solution.reason}`);
  }
  return solution.latitudeDeg;
}
