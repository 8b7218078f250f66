// The parametric bootstrap reproduces the shared-station correlation: on a chain of arcs (every
// inner station in two arcs) its standard errors match the GLS a-priori standard errors of the
// campaign's own solve, and not the independent-rows ones (about 2× larger). Arcs from GeographicLib.
import { describe, expect, it } from 'vitest';
import { bootstrapFigure } from '../../src/campaign/bootstrap.ts';
import { solveCampaign } from '../../src/campaign/solve-campaign.ts';
import { arcNetwork } from '../../src/campaign/reliability-network.ts';
import { fitCorrelatedArcs } from '../../src/campaign/reliability-gls.ts';
import { InputError } from '../../src/errors.ts';
import { within } from '../helpers/within.ts';
import { simulatedCampaign } from './helpers/simulated-campaign.ts';

const LATITUDES = [5, 11, 17.5, 23, 29, 35.5, 41, 47, 53.5, 60];
const REPLICATES = 300;
const SOURCE = 'GLS a-priori covariance (σ₀ = 1) of the same campaign, seeded simulation on GeographicLib arcs';

describe('parametric bootstrap', () => {
  const c = simulatedCampaign({ latitudesDeg: LATITUDES, sigmaArcsec: 0.3, sigmaM: 0.5, seed: 4711 });

  it(`over ${REPLICATES} replicates matches the GLS a-priori standard errors of a chain, not the independent-rows ones`, () => {
    const r = solveCampaign(c);
    const b = bootstrapFigure(c, { method: 'parametric', replicates: REPLICATES, seed: 21 });
    expect(b.method).toBe('parametric');
    expect(b.replicates).toBe(REPLICATES);
    expect(b.note).toMatch(/one error per station \(shared by its arcs\)/);
    const s0 = Math.sqrt(r.quality.varianceFactor ?? NaN);
    const aprioriInvF = (r.figure?.inverseFlatteningStd ?? NaN) / s0;
    const aprioriA = (r.figure?.semiMajorAxisStdM ?? NaN) / s0;
    const independent = fitCorrelatedArcs(arcNetwork(c), { independent: true }).figureApriori?.inverseFlatteningStd ?? NaN;
    console.log(`σ(1/f): parametric bootstrap ${b.inverseFlattening?.standardError.toFixed(4)}, GLS a priori ${aprioriInvF.toFixed(4)}, independent rows ${independent.toFixed(4)}; σ(a) ${b.semiMajorAxisM?.standardError.toFixed(2)} vs ${aprioriA.toFixed(2)} m`);
    // The sd of N replicates has relative sampling error 1/√(2(N−1)) ≈ 4.1 % for N = 300: allow three.
    const tol = 3 / Math.sqrt(2 * (REPLICATES - 1));
    within(b.inverseFlattening?.standardError ?? NaN, aprioriInvF, tol, '', 'σ(1/f) parametric vs GLS', { relative: true, source: SOURCE });
    within(b.semiMajorAxisM?.standardError ?? NaN, aprioriA, tol, 'm', 'σ(a) parametric vs GLS', { relative: true, source: SOURCE });
    expect(Math.abs((b.inverseFlattening?.standardError ?? NaN) / independent - 1)).toBeGreaterThan(tol);
    // Centred on the campaign's own estimate (the bias is within 3 of its standard errors σ/√N).
    within(b.inverseFlattening?.bias ?? NaN, 0, 3 * aprioriInvF / Math.sqrt(REPLICATES), '', 'bootstrap bias of 1/f', { source: 'unbiased least squares' });
  });

  it('is deterministic for a seed, runs robust estimators, and refuses an unknown method', () => {
    const one = bootstrapFigure(c, { method: 'parametric', replicates: 20, seed: 3, estimator: 'huber' });
    const two = bootstrapFigure(c, { method: 'parametric', replicates: 20, seed: 3, estimator: 'huber' });
    expect(one.inverseFlattening).toEqual(two.inverseFlattening);
    expect(one.replicates).toBe(20);
    expect(() => bootstrapFigure(c, { method: 'jackknife' as 'pairs' })).toThrow(InputError);
  });
});
