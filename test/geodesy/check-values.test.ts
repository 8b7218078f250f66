// Published constants (from the team notes (shared/check-values.md), each source named beside its check).
// Tolerances are half a unit of the last published digit.
import { describe, expect, it } from 'vitest';
import {
  ELLIPSOIDS, degreeLengthM, eccentricitySquared, meridianRadiusM, quadrantM, semiMinorAxisM, thirdFlattening,
} from '../../src/geodesy/index.ts';
import { within } from '../helpers/within.ts';

const W = ELLIPSOIDS.wgs84;
const TR8350 = 'NIMA TR8350.2 (2000) — from memory';

describe('WGS 84 derived constants', () => {
  it('quadrant 10 001 965.7293 m', () => {
    within(quadrantM(W), 10001965.7293, 5e-5, 'm', 'WGS 84 quadrant', { source: TR8350 });
  });
  it('polar semi-axis b = 6 356 752.3142 m', () => {
    within(semiMinorAxisM(W), 6356752.3142, 5e-5, 'm', 'WGS 84 b', { source: TR8350 });
  });
  it('first eccentricity squared e² = 0.006 694 379 990 14', () => {
    within(eccentricitySquared(W.flattening), 0.00669437999014, 5e-15, '', 'WGS 84 e²', { source: TR8350 });
  });
  it('third flattening n = (a − b)/(a + b) from the published b', () => {
    // b is published to 0.1 mm, i.e. ±5e-5 m; ∂n/∂b = −2a/(a + b)², so n from it is good to that times 5e-5 m.
    const a = 6378137;
    const b = 6356752.3142;
    const tol = ((2 * a) / (a + b) ** 2) * 5e-5;
    within(thirdFlattening(W.flattening), (a - b) / (a + b), tol, '', 'WGS 84 n',
      { source: `${TR8350}, n = (a − b)/(a + b) (Helmert 1880)` });
  });
  it('meridian radius at the equator 6 335 439.327 m and at the pole 6 399 593.626 m', () => {
    const source = 'check-values.md: computed from the definition, agrees with published tables — from memory';
    within(meridianRadiusM(W, 0), 6335439.327, 5e-4, 'm', 'M(0°)', { source });
    within(meridianRadiusM(W, 90), 6399593.626, 5e-4, 'm', 'M(90°)', { source });
  });
  it('length of one degree of latitude: 110 574.276, 111 131.777, 111 693.980 m', () => {
    const source = 'check-values.md, "length of a degree" tables — from memory';
    within(degreeLengthM(W, 0), 110574.276, 5e-4, 'm', 'degree at 0°', { source });
    within(degreeLengthM(W, 45), 111131.777, 5e-4, 'm', 'degree at 45°', { source });
    within(degreeLengthM(W, 90), 111693.980, 5e-4, 'm', 'degree at 90°', { source });
  });
  it('one arcsecond of latitude is about 30.7 m at the equator and 31.0 m at the pole', () => {
    const source = 'check-values.md (computed from the degree lengths; 30.9 m is the rule of thumb — common practice)';
    within(degreeLengthM(W, 0) / 3600, 30.7, 0.05, 'm', '1″ at 0°', { source });
    within(degreeLengthM(W, 90) / 3600, 31.0, 0.05, 'm', '1″ at 90°', { source });
  });
});

describe('GRS 80', () => {
  it('quadrant 10 001 965.7292 m (computed; Moritz tabulates …7293)', () => {
    within(quadrantM(ELLIPSOIDS.grs80), 10001965.7292, 1e-4, 'm', 'GRS 80 quadrant',
      { source: 'check-values.md; H. Moritz, J. Geodesy 74 (2000) — from memory' });
  });
  it('differs from WGS 84 only in 1/f (same a)', () => {
    expect(ELLIPSOIDS.grs80.semiMajorAxisM).toBe(ELLIPSOIDS.wgs84.semiMajorAxisM);
  });
});

describe('classical ellipsoids defined by a and b', () => {
  it('Clarke 1866 keeps b = 6 356 583.8 m and Airy 1830 b = 6 356 256.909 m', () => {
    within(semiMinorAxisM(ELLIPSOIDS.clarke1866), 6356583.8, 1e-8, 'm', 'Clarke 1866 b', { source: 'classical definition — from memory' });
    within(semiMinorAxisM(ELLIPSOIDS.airy1830), 6356256.909, 1e-8, 'm', 'Airy 1830 b',
      { source: 'Ordnance Survey, "A guide to coordinate systems in Great Britain" — from memory' });
  });
  it('Clarke 1866 1/f ≈ 294.978 698; Airy 1830 1/f ≈ 299.324 96', () => {
    // Clarke: the usual tables quote 294.978698 (from memory), and a/(a − b) agrees to 1e-6.
    within(ELLIPSOIDS.clarke1866.inverseFlattening, 294.978698, 1e-6, '', 'Clarke 1866 1/f', { source: 'common tables — from memory' });
    // Airy: the often-quoted 299.3249646 (from memory) is not a/(a − b) = 299.3249613 of the defining
    // a and b (a 0.2 mm difference in b). The defining constants are a and b, so they are kept and the
    // check is to the 5 decimals both agree on.
    within(ELLIPSOIDS.airy1830.inverseFlattening, 299.3249646, 5e-6, '', 'Airy 1830 1/f', { source: 'Ordnance Survey guide — from memory' });
  });
});
