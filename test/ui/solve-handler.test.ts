// The worker's request handler on the demo campaign (invented; WGS 84 truth — NIMA TR8350.2,
// a = 6 378 137 m, 1/f = 298.257 223 563, from memory): the answer equals a direct solveCampaign
// call, the second request of a campaign is warm-started from the first, and the chart puts every
// arc exactly its residual away from the fitted curve.
import { describe, expect, it } from 'vitest';
import { demoCampaign, solveCampaign } from '../../src/campaign/index.ts';
import { customEllipsoid, degreeLengthM } from '../../src/geodesy/index.ts';
import { handleSolveRequest, SOLVE_PROTOCOL_VERSION, type SolveRequest, type WarmStartCache } from '../../src/worker/index.ts';
import { within } from '../helpers/within.ts';

const demo = demoCampaign();
const records = { name: demo.name, settings: demo.settings, stations: demo.stations, latitudeReadings: demo.latitudeReadings, arcReadings: demo.arcReadings, exclusions: demo.exclusions };
const req = (requestId: number, estimator: 'least-squares' | 'huber' = 'least-squares'): SolveRequest => ({
  type: 'solve', protocol: SOLVE_PROTOCOL_VERSION, requestId, campaignId: 'demo', records, options: { model: 'ellipsoid', estimator }, warmStart: true,
});

describe('handleSolveRequest', () => {
  it('answers what solveCampaign answers, then warm-starts the next request of the same campaign', () => {
    const cache: WarmStartCache = new Map();
    const first = handleSolveRequest(req(1), cache, () => 0);
    expect(first.type).toBe('result');
    if (first.type !== 'result') return;
    expect(first.warmStarted).toBe(false);
    const direct = solveCampaign(records, { model: 'ellipsoid', estimator: 'least-squares' });
    within(first.result.figure?.semiMajorAxisM ?? NaN, direct.figure?.semiMajorAxisM ?? NaN, 1e-6, 'm', 'a via the worker handler', { source: 'direct solveCampaign call' });
    within(first.result.figure?.semiMajorAxisM ?? NaN, 6378137, 50, 'm', 'demo a', { source: 'WGS 84 (NIMA TR8350.2, from memory); README tolerance' });
    const second = handleSolveRequest(req(2), cache, () => 0);
    expect(second.type === 'result' && second.warmStarted).toBe(true);
    // The warm start lands on the same optimum to within the engine's search tolerance, which is
    // far below the standard error (here 1/1000 of σ(1/f)).
    const sd = first.result.figure?.inverseFlatteningStd ?? NaN;
    if (second.type === 'result') within(second.result.figure?.inverseFlattening ?? NaN, first.result.figure?.inverseFlattening ?? NaN, 1e-3 * sd, '', 'warm-started 1/f', { source: 'the cold-started answer' });
    // A different estimator is not warm-started from a least-squares answer.
    const third = handleSolveRequest(req(3, 'huber'), cache, () => 0);
    expect(third.type === 'result' && third.warmStarted).toBe(false);
  });

  it('charts each arc its residual (per degree of latitude) above the fitted degree-length curve', () => {
    const out = handleSolveRequest(req(1), new Map(), () => 0);
    if (out.type !== 'result' || !out.result.figure) throw new Error('expected a figure');
    const fig = customEllipsoid(out.result.figure.semiMajorAxisM, out.result.figure.inverseFlattening);
    expect(out.chart.points.length).toBe(demo.arcReadings.length);
    for (const p of out.chart.points) {
      const phi = (Math.asin(Math.sqrt(p.x)) * 180) / Math.PI;
      within(p.y - p.residualPerDeg, degreeLengthM(fig, phi), 1e-6, 'm/°', `${p.label} sits on the curve plus its residual`);
    }
    expect(out.chart.points.filter((p) => p.suspect).map((p) => p.label)).toContain('K06–K07');
  });

  it('returns a failure message instead of throwing when the options are wrong', () => {
    const bad = handleSolveRequest({ ...req(9), options: { estimator: 'no-such' as 'huber' } }, new Map(), () => 0);
    expect(bad).toMatchObject({ type: 'error', requestId: 9 });
    if (bad.type === 'error') expect(bad.message).toMatch(/no-such/);
  });
});
