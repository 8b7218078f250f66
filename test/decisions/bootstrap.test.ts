// The seeded pairs bootstrap: deterministic for a seed, progress and early stop, and honest — its
// standard errors agree with the delta method (least squares, Huber's asymptotic covariance) on
// one simulated campaign, and on average over many seeded simulations they match the actual spread
// of the estimates (GeographicLib arcs, independent arcs so the pairs resampling's assumption holds).
import { describe, expect, it } from 'vitest';
import { bootstrapFigure } from '../../src/campaign/bootstrap.ts';
import { solveCampaign } from '../../src/campaign/solve-campaign.ts';
import { InputError } from '../../src/errors.ts';
import { within } from '../helpers/within.ts';
import { simulatedCampaign } from './helpers/simulated-campaign.ts';

const LATS = Array.from({ length: 40 }, (_, i) => 2 + i * 1.7);
const campaign = (seed: number): ReturnType<typeof simulatedCampaign> => simulatedCampaign({ latitudesDeg: LATS, sigmaArcsec: 0.3, sigmaM: 0.5, seed, layout: 'pairs' });

describe('pairs bootstrap', () => {
  it('is deterministic for a seed, differs for another, reports progress and stops on request', () => {
    const c = campaign(3);
    const seen: number[] = [];
    const one = bootstrapFigure(c, { model: 'degree', replicates: 50, seed: 9, onProgress: (done, total) => { expect(total).toBe(50); seen.push(done); } });
    const two = bootstrapFigure(c, { model: 'degree', replicates: 50, seed: 9 });
    const other = bootstrapFigure(c, { model: 'degree', replicates: 50, seed: 10 });
    expect(one.inverseFlattening).toEqual(two.inverseFlattening);
    expect(other.inverseFlattening?.standardError).not.toBe(one.inverseFlattening?.standardError);
    expect(seen.at(-1)).toBe(50);
    expect(seen).toEqual([...seen].sort((x, y) => x - y));
    let polls = 0;
    const stopped = bootstrapFigure(c, { model: 'degree', replicates: 50, seed: 9, shouldStop: () => ++polls > 20 });
    expect(stopped.stoppedEarly).toBe(true);
    expect(stopped.replicates).toBe(20);
    expect(one.method).toBe('pairs');
    expect(one.note).toMatch(/correlation through shared stations is not reproduced/);
  });

  it('refuses a bad replicate count or seed, naming the field', () => {
    expect(() => bootstrapFigure(campaign(3), { replicates: 1 })).toThrow(InputError);
    expect(() => bootstrapFigure(campaign(3), { seed: -1 })).toThrow(/seed: -1/);
  });

  it('agrees with the delta method on one campaign: least squares, rigorous model', () => {
    const c = campaign(5);
    const r = solveCampaign(c, { model: 'ellipsoid', estimator: 'least-squares' });
    const b = bootstrapFigure(c, { model: 'ellipsoid', estimator: 'least-squares', replicates: 300, seed: 11 });
    console.log(`least squares: σ(1/f) delta ${r.figure?.inverseFlatteningStd?.toFixed(3)}, bootstrap ${b.inverseFlattening?.standardError.toFixed(3)}; σ(a) delta ${r.figure?.semiMajorAxisStdM?.toFixed(1)} m, bootstrap ${b.semiMajorAxisM?.standardError.toFixed(1)} m`);
    // Both estimate the same standard error from 20 arcs; each carries ≈ 1/√(2·18) ≈ 17 % sampling error, so ±40 % is two of their combined spread.
    within(b.inverseFlattening?.standardError ?? NaN, r.figure?.inverseFlatteningStd ?? NaN, 0.4, '', 'σ(1/f) bootstrap vs delta method', { relative: true, source: 'delta method from the least-squares covariance' });
    within(b.semiMajorAxisM?.standardError ?? NaN, r.figure?.semiMajorAxisStdM ?? NaN, 0.4, 'm', 'σ(a) bootstrap vs delta method', { relative: true, source: 'delta method from the least-squares covariance' });
    within(b.quadrantM?.standardError ?? NaN, r.figure?.quadrantStdM ?? NaN, 0.4, 'm', 'σ(quadrant) bootstrap vs delta method', { relative: true, source: 'delta method' });
    expect(b.inverseFlattening?.analyticStandardError).toBe(r.figure?.inverseFlatteningStd);
  });

  it('agrees with Huber\'s asymptotic covariance and the degree model\'s delta method through the second-order inversion', () => {
    const c = campaign(6);
    for (const [model, estimator] of [['degree', 'least-squares'], ['degree', 'huber']] as const) {
      const r = solveCampaign(c, { model, estimator });
      const b = bootstrapFigure(c, { model, estimator, replicates: 300, seed: 12 });
      console.log(`${model}/${estimator}: σ(1/f) delta ${r.figure?.inverseFlatteningStd?.toFixed(3)}, bootstrap ${b.inverseFlattening?.standardError.toFixed(3)}`);
      within(b.inverseFlattening?.standardError ?? NaN, r.figure?.inverseFlatteningStd ?? NaN, 0.4, '', `σ(1/f) ${model}/${estimator}`, { relative: true, source: 'delta method / asymptotic covariance' });
    }
  });

  it('over 60 seeded simulations the mean bootstrap standard error matches the spread of the estimates', () => {
    const sims = 60;
    const first = 88000;
    console.log(`simulation seeds ${first}…${first + sims - 1}, bootstrap seed 1, 60 replicates each`);
    const est: number[] = [];
    let boot = 0;
    let delta = 0;
    for (let k = 0; k < sims; k++) {
      const c = campaign(first + k);
      const b = bootstrapFigure(c, { model: 'degree', estimator: 'least-squares', replicates: 60, seed: 1 });
      est.push(b.inverseFlattening?.estimate ?? NaN);
      boot += (b.inverseFlattening?.standardError ?? NaN) / sims;
      delta += (b.inverseFlattening?.analyticStandardError ?? NaN) / sims;
    }
    const mean = est.reduce((s, v) => s + v, 0) / sims;
    const spread = Math.sqrt(est.reduce((s, v) => s + (v - mean) ** 2, 0) / (sims - 1));
    console.log(`1/f spread over simulations ${spread.toFixed(3)}; mean bootstrap σ ${boot.toFixed(3)}; mean delta-method σ ${delta.toFixed(3)}`);
    // The spread of 60 estimates is itself uncertain by 1/√(2·59) ≈ 9 %: allow three of those.
    const tol = 3 / Math.sqrt(2 * (sims - 1));
    within(boot, spread, tol, '', 'mean bootstrap σ(1/f) vs spread', { relative: true, source: 'seeded simulations on GeographicLib arcs' });
    within(delta, spread, tol, '', 'mean delta-method σ(1/f) vs spread', { relative: true, source: 'seeded simulations on GeographicLib arcs' });
  });
});
