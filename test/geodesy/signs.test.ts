// Exact suite for signs and special values (style.md §2), compared with Object.is so that +0 and
// −0 are told apart. The latitude policy (src/geodesy/latitude-policy.ts): |φ| > 90° and NaN are
// refused with an InputError naming the field; nothing wraps over the pole.
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import {
  ELLIPSOIDS, customEllipsoid, degreeLengthM, latitudeFromMeridianDistanceDeg, meridianArcM, meridianDistanceM,
  meridianDistancePerUnitA, meridianRadiusM, quadrantM, solveLatitudeFromMeridianDistance,
} from '../../src/geodesy/index.ts';

const W = ELLIPSOIDS.wgs84;
const SAMPLE_LATITUDES = [5e-324, 1e-300, 1e-9, 0.5, 12.3456789, 45, 60, 89.999999, 90];

function refusal(run: () => unknown): InputError {
  try {
    run();
  } catch (error) {
    expect(error).toBeInstanceOf(InputError);
    return error as InputError;
  }
  throw new Error('expected an InputError, nothing was thrown');
}

describe('G(φ) signs and special values', () => {
  it('G(0) is +0 and G(−0) is −0', () => {
    expect(Object.is(meridianDistanceM(W, 0), 0)).toBe(true);
    expect(Object.is(meridianDistanceM(W, -0), -0)).toBe(true);
    expect(Object.is(meridianDistancePerUnitA(W.flattening, -0), -0)).toBe(true);
  });
  it('G(−φ) = −G(φ) exactly', () => {
    for (const lat of SAMPLE_LATITUDES) {
      expect(Object.is(meridianDistanceM(W, -lat), -meridianDistanceM(W, lat)), `G(−${lat}°)`).toBe(true);
    }
  });
  it('G(±90°) is exactly ± the quadrant', () => {
    for (const e of Object.values(ELLIPSOIDS)) {
      expect(meridianDistanceM(e, 90)).toBe(quadrantM(e));
      expect(meridianDistanceM(e, -90)).toBe(-quadrantM(e));
    }
  });
  it('M(φ) and the degree length are even', () => {
    for (const lat of SAMPLE_LATITUDES) {
      expect(meridianRadiusM(W, -lat)).toBe(meridianRadiusM(W, lat));
      expect(degreeLengthM(W, -lat)).toBe(degreeLengthM(W, lat));
    }
  });
  it('an arc from a latitude to itself is 0, and reversing an arc negates it exactly', () => {
    expect(meridianArcM(W, 41.5, 41.5)).toBe(0);
    expect(Object.is(meridianArcM(W, 12, 47), -meridianArcM(W, 47, 12))).toBe(true);
  });
  it('on a sphere (1/f = Infinity) the meridian is a circle: G = a·φ', () => {
    // Elementary geometry: no series terms survive at n = 0.
    const sphere = customEllipsoid(6371000, Infinity);
    expect(sphere.flattening).toBe(0);
    for (const lat of SAMPLE_LATITUDES) {
      expect(meridianDistanceM(sphere, lat)).toBe(6371000 * (lat === 90 ? Math.PI / 2 : lat * (Math.PI / 180)));
    }
    expect(meridianRadiusM(sphere, 33)).toBe(6371000);
  });
});

describe('latitude policy: refused, never wrapped', () => {
  for (const bad of [90.000000000001, -90.5, 180, 1e308, Infinity, -Infinity, NaN]) {
    it(`refuses latitude ${bad} naming the field and the value`, () => {
      const error = refusal(() => meridianDistanceM(W, bad));
      expect(error.field).toBe('latitudeDeg');
      expect(Object.is(error.value, bad)).toBe(true);
    });
  }
  it('says why: beyond the pole', () => {
    expect(refusal(() => meridianRadiusM(W, 95)).reason).toBe('latitude 95° is beyond the pole (|latitude| ≤ 90°)');
  });
  it('names which end of an arc is wrong', () => {
    expect(refusal(() => meridianArcM(W, 91, 10)).field).toBe('fromLatitudeDeg');
    expect(refusal(() => meridianArcM(W, 10, NaN)).field).toBe('toLatitudeDeg');
  });
  it('refuses a flattening outside ±0.05 or not finite in the per-unit-a form', () => {
    expect(refusal(() => meridianDistancePerUnitA(0.06, 10)).field).toBe('flattening');
    expect(refusal(() => meridianDistancePerUnitA(NaN, 10)).field).toBe('flattening');
    expect(meridianDistancePerUnitA(-0.02, 10)).toBeGreaterThan(0); // prolate accepted within the range
  });
});

describe('inverse signs and special values', () => {
  const q = quadrantM(W);
  it('0 gives +0, −0 gives −0', () => {
    expect(Object.is(latitudeFromMeridianDistanceDeg(W, 0), 0)).toBe(true);
    expect(Object.is(latitudeFromMeridianDistanceDeg(W, -0), -0)).toBe(true);
  });
  it('± the quadrant gives ± 90° exactly, with zero iterations', () => {
    expect(latitudeFromMeridianDistanceDeg(W, q)).toBe(90);
    expect(latitudeFromMeridianDistanceDeg(W, -q)).toBe(-90);
    expect(solveLatitudeFromMeridianDistance(W, q).iterations).toBe(0);
  });
  it('is odd exactly', () => {
    for (const s of [1e-6, 1234.5, 5e6, q * 0.999999]) {
      expect(Object.is(latitudeFromMeridianDistanceDeg(W, -s), -latitudeFromMeridianDistanceDeg(W, s))).toBe(true);
    }
  });
  it('refuses a distance past the pole, naming the distance', () => {
    const error = refusal(() => latitudeFromMeridianDistanceDeg(W, q + 1));
    expect(error.field).toBe('distanceM');
    expect(error.reason).toMatch(/^beyond the pole: \|distance\| exceeds the quadrant 10001965\.7293 m of WGS 84$/);
  });
  it('refuses NaN and Infinity', () => {
    expect(refusal(() => latitudeFromMeridianDistanceDeg(W, NaN)).field).toBe('distanceM');
    expect(refusal(() => latitudeFromMeridianDistanceDeg(W, Infinity)).field).toBe('distanceM');
  });
  it('reports its iterations, convergence and reason', () => {
    const solution = solveLatitudeFromMeridianDistance(W, 4.5e6);
    expect(solution.converged).toBe(true);
    expect(solution.iterations).toBeGreaterThanOrEqual(1);
    expect(solution.iterations).toBeLessThanOrEqual(2);
    expect(solution.reason).toMatch(/^converged: Newton step below 1e-12 rad/);
  });
});
