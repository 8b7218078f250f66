// Station sufficiency by the σ/√n rule (checked by hand) and the comparison against the reference
// ellipsoids (constants from check-values.md; χ² quantile from published tables).
import { describe, expect, it } from 'vitest';
import { stationSufficiency } from '../../src/campaign/sufficiency.ts';
import { compareWithEllipsoids } from '../../src/campaign/compare-ellipsoids.ts';
import { within } from '../helpers/within.ts';
import { simulatedCampaign } from './helpers/simulated-campaign.ts';

describe('station sufficiency', () => {
  // Exact repeats (no noise): the station error is the a-priori σ/√n (station-latitudes.ts floors the scale at 1).
  const records = simulatedCampaign({ latitudesDeg: [20, 25], sigmaArcsec: 0.3, sigmaM: 0.4, repeats: 4 });

  it('four repeats of 0.3″ give 0.15″; 0.1″ needs nine in all (0.3/√9 = 0.1, by hand), so five more', () => {
    const [k01] = stationSufficiency(records, { targetSigmaArcsec: 0.1 });
    expect(k01.code).toBe('K01');
    within(k01.standardErrorArcsec ?? NaN, 0.15, 1e-12, 'arcsec', 'station standard error', { source: 'σ/√n by hand' });
    expect(k01.meetsTarget).toBe(false);
    expect(k01.repeatsNeeded).toBe(9);
    expect(k01.moreRepeats).toBe(5);
    expect(k01.statement).toBe('K01: 4 astronomic repeats give 0.150″; about 5 more for 0.1″ (σ/√n rule; systematic errors do not average down)');
  });

  it('a target already met needs no more; a kind without readings is said so', () => {
    const ok = stationSufficiency(records, { targetSigmaArcsec: 0.15 });
    expect(ok.every((s) => s.meetsTarget && s.moreRepeats === 0)).toBe(true);
    const geo = stationSufficiency(records, { latitudeKind: 'geodetic' });
    expect(geo[0].statement).toBe('K01: no geodetic latitude reading in the fit yet');
  });

  it('refuses a non-positive target, naming the field', () => {
    expect(() => stationSufficiency(records, { targetSigmaArcsec: 0 })).toThrow(/targetSigmaArcsec: 0 — must be a positive number/);
  });
});

describe('comparison with the reference ellipsoids', () => {
  // A hand-made figure (values typed): a = 6 378 100 ± 40 m, 1/f = 298.0 ± 0.5, uncorrelated.
  const f = 1 / 298;
  const sigF = 0.5 * f * f; // σ_f = σ(1/f)·f²
  const fig = { semiMajorAxisM: 6378100, inverseFlattening: 298, semiMajorAxisStdM: 40, inverseFlatteningStd: 0.5, covarianceAF: new Float64Array([1600, 0, 0, sigF * sigF]) };
  const rows = compareWithEllipsoids(fig);

  it('covers WGS 84, GRS 80, International 1924, Clarke 1866 and Airy 1830 with their defining constants', () => {
    expect(rows.map((r) => r.name)).toEqual(['WGS 84', 'GRS 80', 'International 1924 (Hayford)', 'Clarke 1866', 'Airy 1830']);
    // check-values.md (from memory): Clarke 1866 a = 6 378 206.4, b = 6 356 583.8 → 1/f = a/(a − b) = 294.978 698…
    within(rows[3].inverseFlattening, 6378206.4 / (6378206.4 - 6356583.8), 1e-12, '', 'Clarke 1866 1/f', { relative: true, source: 'check-values.md' });
    within(rows[4].semiMajorAxisM, 6377563.396, 0, 'm', 'Airy 1830 a', { source: 'check-values.md' });
  });

  it('gives the differences in standard errors and the joint χ² (uncorrelated: z_a² + z_f², by hand)', () => {
    const wgs = rows[0];
    within(wgs.deltaSemiMajorAxisM, -37, 1e-9, 'm', 'Δa WGS 84', { source: 'by hand: 6 378 100 − 6 378 137' });
    within(wgs.semiMajorAxisZ ?? NaN, -0.925, 1e-12, 'σ', 'z_a', { source: 'by hand: −37/40' });
    within(wgs.inverseFlatteningZ ?? NaN, (298 - 298.257223563) / 0.5, 1e-12, 'σ', 'z_1/f', { source: 'by hand' });
    within(wgs.jointChiSquare ?? NaN, 0.925 ** 2 + ((298 - 298.257223563) / 0.5) ** 2, 1e-6, '', 'χ²', { relative: true, source: 'by hand' });
    expect(wgs.distinguishable).toBe(false);
  });

  it('the joint test rejects at χ²₂ ≥ 5.991 (95 % quantile of χ² with 2 degrees of freedom, statistical tables — from memory)', () => {
    // Put 1/f exactly √5.991 σ from WGS 84 with a equal: p must be 0.05 to table precision.
    const z = Math.sqrt(5.991);
    const at = compareWithEllipsoids({ ...fig, semiMajorAxisM: 6378137, inverseFlattening: 298.257223563 + 0.5 * z,
      covarianceAF: new Float64Array([1600, 0, 0, (0.5 / (298.257223563 + 0.5 * z) ** 2) ** 2]) })[0];
    within(at.jointPValue ?? NaN, 0.05, 2e-4, '', 'p at the 95 % quantile', { source: 'χ² table (from memory)' });
  });

  it('uses the correlation: a strongly correlated pair along the error ellipse is not distinguishable', () => {
    // ρ(a, 1/f) = +0.95; a difference of (+2σ, +2σ) lies along the ellipse: χ² = 8/(1 + ρ) = 4.10 (by hand, 2×2 inverse).
    const rho = 0.95;
    const sa = 40;
    const sInv = 0.5;
    const inv = 298.257223563 + 2 * sInv;
    const fr = 1 / inv;
    const covAF = new Float64Array([sa * sa, -rho * sa * sInv * fr * fr, -rho * sa * sInv * fr * fr, (sInv * fr * fr) ** 2]);
    const r = compareWithEllipsoids({ semiMajorAxisM: 6378137 + 2 * sa, inverseFlattening: inv, semiMajorAxisStdM: sa, inverseFlatteningStd: sInv, covarianceAF: covAF })[0];
    within(r.jointChiSquare ?? NaN, 8 / (1 + rho), 1e-9, '', 'χ² along the ellipse', { relative: true, source: 'by hand' });
    expect(r.distinguishable).toBe(false);
  });
});
