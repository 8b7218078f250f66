// Seeded properties of the meridian distance (style.md §11): additivity of arcs, odd symmetry,
// monotonicity, and the inverse round trip. Tolerances come from double rounding at the scale of
// the quadrant: ulp(1e7 m) = 2⁻²⁹ m ≈ 1.9e-9 m.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  ELLIPSOIDS, latitudeFromMeridianDistanceDeg, meridianArcM, meridianDistanceM, meridianRadiusM, quadrantM,
} from '../../src/geodesy/index.ts';
import { within } from '../helpers/within.ts';
import { announceSeed } from './seed.ts';

const ULP_AT_QUADRANT_M = 2 ** -29;
/** Arcs up to 2e7 m (ulp 2⁻²⁸) and three differences of four rounded G values: 8 ulp of 2e7 m. */
const ADDITIVITY_TOLERANCE_M = 8 * 2 ** -28;
/** Below this latitude step G must strictly increase: 1e-9° ≈ 0.11 mm ≫ the ~1e-8 m rounding of G. */
const MONOTONE_STEP_DEG = 1e-9;

const ellipsoid = fc.constantFrom(...Object.values(ELLIPSOIDS));
const latitude = fc.double({ min: -90, max: 90, noNaN: true });
const options = announceSeed('meridian properties');

function ulp(x: number): number {
  return x === 0 ? Number.MIN_VALUE : 2 ** (Math.floor(Math.log2(Math.abs(x))) - 52);
}

describe('meridian distance properties (seeded)', () => {
  it('arcs add: arc(φ₁, φ₃) = arc(φ₁, φ₂) + arc(φ₂, φ₃)', () => {
    fc.assert(fc.property(ellipsoid, latitude, latitude, latitude, (e, p1, p2, p3) => {
      const direct = meridianArcM(e, p1, p3);
      const chained = meridianArcM(e, p1, p2) + meridianArcM(e, p2, p3);
      within(chained, direct, ADDITIVITY_TOLERANCE_M, 'm', `arc ${p1}° → ${p2}° → ${p3}° on ${e.id}`, { source: 'additivity of arc length' });
    }), options);
  });

  it('G is odd: G(−φ) = −G(φ) exactly', () => {
    fc.assert(fc.property(ellipsoid, latitude, (e, p) => {
      expect(Object.is(meridianDistanceM(e, -p), -meridianDistanceM(e, p))).toBe(true);
    }), options);
  });

  it(`G strictly increases for latitude steps of at least ${MONOTONE_STEP_DEG}°`, () => {
    fc.assert(fc.property(ellipsoid, latitude, latitude, (e, p, q) => {
      fc.pre(Math.abs(p - q) >= MONOTONE_STEP_DEG);
      const [lo, hi] = p < q ? [p, q] : [q, p];
      expect(meridianDistanceM(e, lo)).toBeLessThan(meridianDistanceM(e, hi));
    }), options);
  });

  it('G increases at least as fast as the equatorial radius of curvature allows (M(0) is the minimum of M)', () => {
    // Mean value theorem: G(q) − G(p) = M(ξ)(q − p) with M(0) ≤ M(ξ) ≤ M(90°) for an oblate figure.
    fc.assert(fc.property(ellipsoid, latitude, latitude, (e, p, q) => {
      const dRad = (q - p) * (Math.PI / 180);
      const arc = meridianArcM(e, p, q);
      const slack = ADDITIVITY_TOLERANCE_M;
      expect(Math.abs(arc)).toBeGreaterThanOrEqual(meridianRadiusM(e, 0) * Math.abs(dRad) - slack);
      expect(Math.abs(arc)).toBeLessThanOrEqual(meridianRadiusM(e, 90) * Math.abs(dRad) + slack);
    }), options);
  });

  it('inverse round trip: G(φ(s)) = s to 1e-9 m or 4 ulp of s, whichever is larger', () => {
    // 1e-9 m is below one ulp for |s| > 8.4e6 m, so there the bound is rounding itself.
    fc.assert(fc.property(ellipsoid, fc.double({ min: -1, max: 1, noNaN: true }), (e, t) => {
      const s = t * quadrantM(e);
      const back = meridianDistanceM(e, latitudeFromMeridianDistanceDeg(e, s));
      within(back, s, Math.max(1e-9, 4 * ulp(s)), 'm', `G(φ(${s})) on ${e.id}`, { source: 'round trip' });
    }), options);
  });

  it('latitude round trip: φ(G(φ)) = φ to 1e-9 m on the ground or 4 ulp of φ', () => {
    fc.assert(fc.property(ellipsoid, latitude, (e, p) => {
      const back = latitudeFromMeridianDistanceDeg(e, meridianDistanceM(e, p));
      const tolDeg = Math.max((1e-9 + 4 * ULP_AT_QUADRANT_M) / meridianRadiusM(e, p) * (180 / Math.PI), 4 * ulp(p));
      within(back, p, tolDeg, '°', `φ(G(${p}°)) on ${e.id}`, { source: 'round trip' });
    }), options);
  });
});
