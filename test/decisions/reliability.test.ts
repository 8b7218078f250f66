// Reliability of readings: the redundancy numbers sum to n − 2; the minimal detectable bias is the
// blunder that drives Baarda's w to δ₀ = 4.13 (checked by planting it in exact GeographicLib arcs —
// brute force of the definition, also with correlated arcs); the leave-one-out influence matches
// Cook's closed form for independent arcs; latitude readings by hand.
import { describe, expect, it } from 'vitest';
import { campaignReliability } from '../../src/campaign/reliability.ts';
import { arcNetwork } from '../../src/campaign/reliability-network.ts';
import { fitCorrelatedArcs } from '../../src/campaign/reliability-gls.ts';
import { within } from '../helpers/within.ts';
import { simulatedCampaign } from './helpers/simulated-campaign.ts';

const DELTA0 = 4.13; // Baarda 1968, β₀ = 0.80 at α₀ = 0.001 — from memory (check-values.md)
const LATS = [6, 12, 18.5, 25, 31, 37.5, 44, 50, 56.5, 63];

describe('reliability', () => {
  const exact = simulatedCampaign({ latitudesDeg: LATS, sigmaArcsec: 0.3, sigmaM: 0.5, repeats: 3 });
  const rel = campaignReliability(exact, { influence: false });
  const arcs = rel.readings.filter((r) => r.kind === 'arc');

  it('redundancy numbers of the arcs sum to n − p = 9 − 2 (trace of the residual projector)', () => {
    within(arcs.reduce((s, r) => s + (r.redundancy ?? 0), 0), 7, 1e-9, '', 'Σ rᵢ', { source: 'trace(I − H) = n − p' });
    for (const r of arcs) within((r.redundancy ?? 0) + (r.leverage ?? 0), 1, 1e-15, '', 'r + h');
  });

  it('planting the MDB in an exact arc drives its w-test to δ₀ = 4.13 (correlated arcs, brute force of the definition)', () => {
    for (const k of [0, 4, 8]) {
      const mdb = arcs[k].minimalDetectableBias ?? NaN;
      const planted = structuredClone(exact);
      planted.arcReadings[k].distanceM += mdb;
      const again = campaignReliability(planted, { influence: false });
      within(again.readings.filter((r) => r.kind === 'arc')[k].wTest ?? NaN, DELTA0, 2e-3, '', `w of arc ${k} with its MDB planted`, { source: 'Baarda δ₀ (from memory); GeographicLib arcs' });
    }
  });

  it('states the MDB in metres on the arc, in words', () => {
    expect(arcs[0].statement).toMatch(/^a blunder under \d+\.\d+ m on arc K01–K02 would go unnoticed$/);
    expect(arcs[0].mdbUnit).toBe('m');
  });

  it('latitude readings: three repeats of 0.3″ give r = 2/3 and MDB = 4.13·0.3/√(2/3) (by hand)', () => {
    const lat = rel.readings.find((r) => r.id === 'r-K01-1');
    within(lat?.redundancy ?? NaN, 2 / 3, 1e-12, '', 'r of a repeat', { source: 'by hand: 1 − w/Σw' });
    within(lat?.minimalDetectableBias ?? NaN, DELTA0 * 0.3 / Math.sqrt(2 / 3), 1e-3, 'arcsec', 'MDB of a repeat', { source: 'δ₀σ/√r by hand' });
    expect(lat?.statement).toMatch(/a blunder under 1\.52″ \(\d+\.\d+ m on the ground\) in reading r-K01-1 at K01 would go unnoticed/);
    const single = campaignReliability(simulatedCampaign({ latitudesDeg: [10, 15, 20], sigmaArcsec: 0.3, sigmaM: 0.5 }), { influence: false });
    expect(single.readings[0].minimalDetectableBias).toBeNull();
    expect(single.readings[0].statement).toMatch(/only astronomic reading at K01: a blunder of any size would go unnoticed/);
  });

  it('leave-one-out influence on 1/f matches Cook\'s closed form for independent arcs', () => {
    // Disjoint pairs: no shared station, so the engine's independent rows and the GLS coincide.
    const indep = simulatedCampaign({ latitudesDeg: Array.from({ length: 16 }, (_, i) => 4 + i * 4), sigmaArcsec: 0.3, sigmaM: 0.5, seed: 4, layout: 'pairs' });
    const r = campaignReliability(indep, { estimator: 'least-squares', model: 'ellipsoid' });
    const fit = fitCorrelatedArcs(arcNetwork(indep));
    const d = fit.design;
    const Q = fit.covarianceApriori;
    if (!d || !Q) throw new Error('no fit');
    const n = d.n;
    const f = fit.flattening;
    indep.arcReadings.forEach((arc, i) => {
      // Cook (1977): β₍ᵢ₎ − β = −Q jᵢ wᵢ eᵢ / rᵢ with wᵢ = 1/Σᵢᵢ, rᵢ = 1 − wᵢ jᵢᵀQjᵢ.
      const w = 1 / d.sigma[i * n + i];
      const j0 = d.J[2 * i];
      const j1 = d.J[2 * i + 1];
      const h = w * (j0 * (Q[0] * j0 + Q[1] * j1) + j1 * (Q[2] * j0 + Q[3] * j1));
      const e = fit.residualsM[i];
      const df = -(Q[2] * j0 + Q[3] * j1) * w * e / (1 - h);
      const dInv = 1 / (f + df) - 1 / f;
      const got = r.readings.find((x) => x.id === arc.id)?.influence?.inverseFlattening ?? NaN;
      // The closed form is first order in a nonlinear model: agreement to a few per cent of the change, or 2e-4 absolute.
      within(got, dInv, Math.max(0.03 * Math.abs(dInv), 2e-4), '', `Δ(1/f) leaving out ${arc.id}`, { source: 'Cook 1977 leave-one-out formula (from memory)' });
    });
    expect(r.mostInfluential.length).toBeGreaterThan(0);
  });
});
