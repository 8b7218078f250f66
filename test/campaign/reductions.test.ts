// Reductions against hand-computed values (formulas written out in the test, numbers on paper):
// the arc height reduction s₀ = s·R/(R + h), the mean height rule, and the degree-length row
// y = s/|Δφ|, x = sin²φ_mid with σ_y² = (σ_s/Δφ)² + (s/Δφ²)²(σ_φ₁² + σ_φ₂²).
import { describe, expect, it } from 'vitest';
import { arcMeanHeight, degreeRow, reduceArcToEllipsoid } from '../../src/campaign/index.ts';
import { within } from '../helpers/within.ts';

const HAND = 'hand computation (see comment)';

describe('reduceArcToEllipsoid', () => {
  it('s = 100 000 m at h = 637.8137 m on R = 6 378 137 m gives s·R/(R + h) = 100 000/1.0001 m', () => {
    // R/(R + h) = 1/(1 + 1e-4) exactly for h = R·1e-4; 100 000/1.0001 = 99 990.000 999 900 01… m.
    within(reduceArcToEllipsoid(100_000, 637.8137, 6_378_137), 100_000 / 1.0001, 1e-9, 'm', 's₀', { source: HAND });
  });
  it('h = 0 leaves the distance unchanged; negative heights lengthen it', () => {
    expect(reduceArcToEllipsoid(12_345.678, 0, 6.4e6)).toBe(12_345.678);
    expect(reduceArcToEllipsoid(1000, -100, 6.4e6)).toBeGreaterThan(1000);
  });
  it('mean height: the arc’s own, else the two stations’ mean, else none', () => {
    expect(arcMeanHeight(812, 100, 200)).toEqual({ heightM: 812, source: 'arc' });
    expect(arcMeanHeight(undefined, 100, 250)).toEqual({ heightM: 175, source: 'stations' });
    expect(arcMeanHeight(undefined, 100, undefined)).toEqual({ heightM: 0, source: 'none' });
  });
});

describe('degreeRow', () => {
  // Arc 30° → 32°, s₀ = 222 000 m, σ_s = 2 m, σ_φ = 0.36″ = 1e-4° at each end.
  // y = 222 000/2 = 111 000 m/degree; x = sin²31° = 0.265 291 6…;
  // σ_y² = (2/2)² + (222 000/4)²·(1e-8 + 1e-8) = 1 + 55 500²·2e-8 = 1 + 61.605 = 62.605.
  const arc = { id: 'a', latitude1Deg: 32, latitude2Deg: 30, sigmaLatitude1Arcsec: 0.36, sigmaLatitude2Arcsec: 0.36, reducedDistanceM: 222_000, sigmaM: 2 };
  it('propagated: y, x, σ_y and weight 1/σ_y²', () => {
    const r = degreeRow(arc, 'propagated');
    within(r.y, 111_000, 1e-9, 'm/degree', 'y', { source: HAND });
    within(r.x, Math.sin((31 * Math.PI) / 180) ** 2, 1e-15, '', 'x', { source: HAND });
    within(r.midLatitudeDeg, 31, 0, 'deg', 'mid latitude', { source: HAND });
    within(r.sigmaY ** 2, 62.605, 1e-9, '(m/degree)²', 'σ_y²', { source: HAND });
    within(r.weight, 1 / 62.605, 1e-15, '', 'weight', { source: HAND });
  });
  it('equal: weight 1, same y and x', () => {
    const r = degreeRow(arc, 'equal');
    expect(r.weight).toBe(1);
    within(r.y, 111_000, 1e-9, 'm/degree', 'y', { source: HAND });
  });
});
