// The planner: the rank-one update equals a full recomputation; a planned candidate's standard
// error is the one a campaign actually built that way (GeographicLib arcs) reports; the ranking
// prefers extending the latitude span (common practice: the flattening lives in the change of
// degree length with sin²φ, so the widest spread of sin²φ pins it best).
import { describe, expect, it } from 'vitest';
import { planCampaign, candidateLatitudes } from '../../src/campaign/plan-next-station.ts';
import { arcNetwork } from '../../src/campaign/reliability-network.ts';
import { designCovariance, fitCorrelatedArcs } from '../../src/campaign/reliability-gls.ts';
import { InputError } from '../../src/errors.ts';
import { within } from '../helpers/within.ts';
import { simulatedCampaign, geographicLibArcM, WGS84_A, WGS84_INVERSE_F, stationCode } from './helpers/simulated-campaign.ts';

const LATS = [20, 25, 30, 35, 40];
const base = (): ReturnType<typeof simulatedCampaign> => simulatedCampaign({ latitudesDeg: LATS, sigmaArcsec: 0.3, sigmaM: 0.4, repeats: 4 });

describe('planner', () => {
  it('lists candidate latitudes from a range without accumulating rounding, and refuses a bad step', () => {
    expect(candidateLatitudes({ fromDeg: 10, toDeg: 10.3, stepDeg: 0.1 })).toEqual([10, 10.1, 10.2, 10.3]);
    expect(candidateLatitudes({ fromDeg: 5, toDeg: -5, stepDeg: 5 })).toEqual([-5, 0, 5]);
    expect(() => candidateLatitudes({ fromDeg: 0, toDeg: 10, stepDeg: 0 })).toThrow(InputError);
    expect(() => candidateLatitudes({ fromDeg: 0, toDeg: 95, stepDeg: 1 })).toThrow(/within \[-90, 90\]/);
  });

  it('the rank-one update of a new arc equals recomputing the full covariance (brute force)', () => {
    const records = base();
    const plan = planCampaign(records, { latitudesDeg: [5, 22.5, 47, 63], includeRepeats: false });
    const net = arcNetwork(records);
    const a = plan.figure.semiMajorAxisM;
    const f = 1 / plan.figure.inverseFlattening;
    for (const c of plan.candidates) {
      const near = net.stations.findIndex((s) => s.code === c.anchor);
      const sigmaM = plan.assumptions.relativeArcSigma * Math.abs(c.latitudeDeg - net.stations[near].latitudeDeg) * (Math.PI / 180) * a;
      const aug = {
        ...net,
        stations: [...net.stations, { code: 'X', latitudeDeg: c.latitudeDeg, sigmaArcsec: plan.assumptions.stationSigmaArcsec, readingCount: 1, readingSigmaArcsec: 0, spreadArcsec: 0 }],
        arcs: [...net.arcs, { id: 'x', fromStation: net.stations[near].code, toStation: 'X', from: near, to: net.stations.length, distanceM: 0, reducedDistanceM: 0, sigmaDistanceM: sigmaM }],
      };
      const full = designCovariance(aug, a, f);
      within(c.inverseFlatteningStd, Math.sqrt(full.covariance[3]) / (f * f), 1e-9, '', `σ(1/f) at ${c.latitudeDeg}°`, { relative: true, source: 'full recomputation (brute force)' });
      within(c.semiMajorAxisStdM, Math.sqrt(full.covariance[0]), 1e-9, 'm', `σ(a) at ${c.latitudeDeg}°`, { relative: true, source: 'full recomputation (brute force)' });
    }
  });

  it('a planned station leaves the standard error a campaign built that way reports', () => {
    const records = base();
    const plan = planCampaign(records, { latitudesDeg: [50], includeRepeats: false });
    const [c] = plan.candidates;
    expect(c.anchor).toBe('K05');
    // Build it: station K06 at 50° with one reading at the median station sigma, arc K05–K06 from GeographicLib.
    const built = structuredClone(records);
    built.stations.push({ code: 'K06' });
    built.latitudeReadings.push({ id: 'r-K06-1', station: 'K06', kind: 'astronomic', latitudeDeg: 50, sigmaArcsec: plan.assumptions.stationSigmaArcsec, observedAt: '2026-07-01T21:00:00Z' });
    const s = geographicLibArcM(WGS84_A, 1 / WGS84_INVERSE_F, 40, 50);
    built.arcReadings.push({ id: 'a-K05-K06', fromStation: 'K05', toStation: 'K06', distanceM: s, sigmaM: plan.assumptions.relativeArcSigma * s });
    const fit = fitCorrelatedArcs(arcNetwork(built));
    // Differences: the planner's spherical length for σ_s and its evaluation at the current figure — both far below 1e-3 relative.
    within(c.inverseFlatteningStd, fit.figureApriori?.inverseFlatteningStd ?? NaN, 1e-3, '', 'planned σ(1/f)', { relative: true, source: 'GLS of the built campaign on GeographicLib arcs' });
  });

  it('ranks extending the latitude span first, and every candidate improves on the current state', () => {
    const plan = planCampaign(base(), { range: { fromDeg: 0, toDeg: 80, stepDeg: 5 } });
    expect(plan.current).not.toBeNull();
    const best = plan.candidates[0];
    expect(best.kind).toBe('new-station');
    expect([0, 80]).toContain(best.latitudeDeg);
    for (const c of plan.candidates) expect(c.inverseFlatteningGain ?? -1).toBeGreaterThan(0);
    // Occupied latitudes are skipped with a reason, not ranked.
    expect(plan.skipped.map((s) => s.latitudeDeg)).toEqual([20, 25, 30, 35, 40]);
    expect(plan.skipped[0].reason).toBe('station K01 is already there');
    // Repeats and re-measurements are ranked too.
    expect(plan.candidates.some((c) => c.kind === 'station-repeat')).toBe(true);
    expect(plan.candidates.some((c) => c.kind === 'arc-repeat')).toBe(true);
  });

  it('plans from the reference ellipsoid when the campaign has only one arc', () => {
    const one = simulatedCampaign({ latitudesDeg: [30, 35], sigmaArcsec: 0.3, sigmaM: 0.4 });
    const plan = planCampaign(one, { latitudesDeg: [45] });
    expect(plan.current).toBeNull();
    expect(plan.figure.source).toMatch(/reference ellipsoid WGS 84/);
    expect(plan.candidates[0].anchor).toBe(stationCode(1));
    expect(Number.isFinite(plan.candidates[0].inverseFlatteningStd)).toBe(true);
  });
});
