// Generalised least squares with the full arc covariance: exact arcs give the generating
// ellipsoid back; over many seeded simulations the spread of the estimates matches the reported
// a-priori standard errors within sampling error — and treating the arcs as independent does not.
import { describe, expect, it } from 'vitest';
import { arcNetwork } from '../../src/campaign/reliability-network.ts';
import { fitCorrelatedArcs, arcDesign } from '../../src/campaign/reliability-gls.ts';
import { within } from '../helpers/within.ts';
import { simulatedCampaign, WGS84_A, WGS84_INVERSE_F } from './helpers/simulated-campaign.ts';

const GLIB = 'GeographicLib 2.2 (geographiclib-geodesic) meridian arcs, WGS 84 a and 1/f from NIMA TR8350.2 (from memory)';
const LATITUDES = [5, 11, 17.5, 23, 29, 35.5, 41, 47, 53.5, 60];

describe('GLS of (a, f) with correlated arcs', () => {
  it('recovers WGS 84 from exact GeographicLib arcs', () => {
    const net = arcNetwork(simulatedCampaign({ latitudesDeg: LATITUDES, sigmaArcsec: 0.3, sigmaM: 0.5 }));
    const fit = fitCorrelatedArcs(net);
    expect(fit.status).toBe('ok');
    // Our meridian series agree with GeographicLib to well under a millimetre: a to 1 mm, 1/f to 1e-6.
    within(fit.semiMajorAxisM, WGS84_A, 1e-3, 'm', 'a', { source: GLIB });
    within(1 / fit.flattening, WGS84_INVERSE_F, 1e-6, '', '1/f', { source: GLIB });
    expect(fit.iterations).toBeLessThanOrEqual(6);
  });

  it('gives consecutive arcs the covariance −M²σ_φ² of their shared station', () => {
    const net = arcNetwork(simulatedCampaign({ latitudesDeg: [10, 15, 20], sigmaArcsec: 0.5, sigmaM: 0.2 }));
    const d = arcDesign(net, WGS84_A, 1 / WGS84_INVERSE_F);
    // M(15°) on WGS 84 = a(1−e²)/(1−e²sin²15°)^{3/2}: computed here from the definition (check-values.md).
    const e2 = (1 / WGS84_INVERSE_F) * (2 - 1 / WGS84_INVERSE_F);
    const s15 = Math.sin((15 * Math.PI) / 180);
    const M15 = (WGS84_A * (1 - e2)) / (1 - e2 * s15 * s15) ** 1.5;
    const sigPhi = (0.5 * Math.PI) / 648000;
    within(d.sigma[1], -((M15 * sigPhi) ** 2), 1e-9, 'm²', 'Σ₁₂', { relative: true, source: 'M(φ) from its definition' });
    expect(d.sigma[1]).toBe(d.sigma[2]);
  });

  it('over 400 seeded simulations the spread of 1/f and a matches the GLS a-priori standard errors', () => {
    const seeds = 400;
    const firstSeed = 71000;
    console.log(`simulation seeds ${firstSeed}…${firstSeed + seeds - 1}`);
    const inv: number[] = [];
    const as: number[] = [];
    let stdInv = 0;
    let stdA = 0;
    let stdInvIndependent = 0;
    for (let k = 0; k < seeds; k++) {
      const net = arcNetwork(simulatedCampaign({ latitudesDeg: LATITUDES, sigmaArcsec: 0.3, sigmaM: 0.5, seed: firstSeed + k }));
      const fit = fitCorrelatedArcs(net);
      expect(fit.status).toBe('ok');
      inv.push(1 / fit.flattening);
      as.push(fit.semiMajorAxisM);
      stdInv += (fit.figureApriori?.inverseFlatteningStd ?? NaN) / seeds;
      stdA += (fit.figureApriori?.semiMajorAxisStdM ?? NaN) / seeds;
      stdInvIndependent += (fitCorrelatedArcs(net, { independent: true }).figureApriori?.inverseFlatteningStd ?? NaN) / seeds;
    }
    const sd = (v: number[]): number => {
      const m = v.reduce((s, x) => s + x, 0) / v.length;
      return Math.sqrt(v.reduce((s, x) => s + (x - m) ** 2, 0) / (v.length - 1));
    };
    const mean = (v: number[]): number => v.reduce((s, x) => s + x, 0) / v.length;
    // Sampling error of a standard deviation from N draws: relative 1/√(2(N−1)) ≈ 3.5 % for N = 400; allow 3 of those.
    const relTol = 3 / Math.sqrt(2 * (seeds - 1));
    console.log(`1/f: empirical sd ${sd(inv).toFixed(4)}, GLS ${stdInv.toFixed(4)}, independent rows ${stdInvIndependent.toFixed(4)}; a: sd ${sd(as).toFixed(2)} m, GLS ${stdA.toFixed(2)} m`);
    within(sd(inv), stdInv, relTol, '', 'spread of 1/f vs GLS standard error', { relative: true, source: 'seeded simulation on GeographicLib arcs' });
    within(sd(as), stdA, relTol, 'm', 'spread of a vs GLS standard error', { relative: true, source: 'seeded simulation on GeographicLib arcs' });
    // Unbiased: the mean lands within 3 standard errors of the mean (σ/√N) of the truth.
    within(mean(inv), WGS84_INVERSE_F, 3 * stdInv / Math.sqrt(seeds), '', 'mean 1/f', { source: GLIB });
    // The independent-rows standard error misstates the spread by more than the sampling error.
    expect(Math.abs(stdInvIndependent / sd(inv) - 1)).toBeGreaterThan(relTol);
  });
});
