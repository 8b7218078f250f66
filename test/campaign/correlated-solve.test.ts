// solveCampaign's default least squares accounts for arcs that share a station: over many seeded
// simulated campaigns (a chain of arcs, so every inner station's latitude error enters two arcs)
// the spread of its 1/f and a matches the standard errors it reports, and the old treatment of the
// arcs as independent rows (the same weighted least squares with a diagonal covariance) does not.
// Arcs from GeographicLib (test/decisions/helpers/simulated-campaign.ts), invented stations K01….
import { describe, expect, it } from 'vitest';
import { ellipsoidById } from '../../src/geodesy/index.ts';
import { fitEllipsoidToArcs, prepareArcs, reduceStationLatitudes, solveCampaign } from '../../src/campaign/index.ts';
import type { CampaignFile, ModelId } from '../../src/campaign/index.ts';
import { within } from '../helpers/within.ts';
import { simulatedCampaign, WGS84_A, WGS84_INVERSE_F } from '../decisions/helpers/simulated-campaign.ts';

const LATITUDES = [5, 11, 17.5, 23, 29, 35.5, 41, 47, 53.5, 60];
const SEEDS = 300;
const FIRST_SEED = 91000;
const SIM = 'seeded simulation on GeographicLib 2.2 arcs (geographiclib-geodesic), WGS 84 from NIMA TR8350.2 (from memory)';

const mean = (v: readonly number[]): number => v.reduce((s, x) => s + x, 0) / v.length;
const sd = (v: readonly number[]): number => {
  const m = mean(v);
  return Math.sqrt(v.reduce((s, x) => s + (x - m) ** 2, 0) / (v.length - 1));
};
/** Root mean square: E[se²] = E[σ̂₀²]·Q = Q, so this is the unbiased average of reported standard errors. */
const rms = (v: readonly number[]): number => Math.sqrt(v.reduce((s, x) => s + x * x, 0) / v.length);

/**
 * Tolerance on the ratio spread / RMS(reported se), from the χ² distribution of a sample variance:
 * the sample sd of N normal draws has relative sd 1/√(2(N−1)); the RMS of N reported errors, each
 * σ√(χ²_ν/ν), has relative sd ≈ ½·√(2/ν)/√N. Three combined standard errors (≈ 13 % for N = 300,
 * ν = 8).
 */
function ratioTolerance(n: number, dof: number): number {
  return 3 * Math.hypot(1 / Math.sqrt(2 * (n - 1)), 0.5 * Math.sqrt(2 / dof) / Math.sqrt(n));
}

/** The old engine path: arcs as independent rows with the diagonal weights 1/σ² (σ² = σ_s² + Σ(Mσ_φ)²). */
function independentRowsFit(file: CampaignFile): { invF: number; a: number; seInvF: number; seA: number } {
  const latitudes = reduceStationLatitudes(file.stations, file.latitudeReadings, {});
  const arcs = prepareArcs(file.arcReadings, file.stations, latitudes, 'astronomic', 'propagated', ellipsoidById('wgs84'), new Set());
  const r = fitEllipsoidToArcs(arcs.map((arc) => {
    const g = arc.geometry;
    if (!g) throw new Error(`${arc.id} has no geometry`);
    return { id: arc.id, latitude1Deg: g.latitude1Deg, latitude2Deg: g.latitude2Deg, distanceM: g.reducedDistanceM, weight: g.weightM };
  }), 'least-squares');
  const cov = r.covariance;
  if (r.status !== 'ok' || !cov) throw new Error(`independent-rows fit: ${r.status} ${r.reason}`);
  return { invF: 1 / r.flattening, a: r.semiMajorAxisM, seInvF: Math.sqrt(cov[3]) / r.flattening ** 2, seA: Math.sqrt(cov[0]) };
}

describe('solveCampaign with arcs that share a station', () => {
  it(`over ${SEEDS} seeded simulations the spread of 1/f and a matches the reported standard errors; independent rows do not`, () => {
    console.log(`correlated-solve seeds ${FIRST_SEED}…${FIRST_SEED + SEEDS - 1}`);
    const byModel = new Map<ModelId, { invF: number[]; a: number[]; seInvF: number[]; seA: number[]; s0: number[] }>();
    for (const model of ['ellipsoid', 'degree'] as const) byModel.set(model, { invF: [], a: [], seInvF: [], seA: [], s0: [] });
    const old = { invF: [] as number[], a: [] as number[], seInvF: [] as number[], seA: [] as number[] };
    for (let k = 0; k < SEEDS; k++) {
      const file = simulatedCampaign({ latitudesDeg: LATITUDES, sigmaArcsec: 0.3, sigmaM: 0.5, seed: FIRST_SEED + k });
      for (const [model, acc] of byModel) {
        const r = solveCampaign(file, { model });
        expect(r.status).toBe('ok');
        const fig = r.figure;
        if (!fig || fig.inverseFlatteningStd === null || fig.semiMajorAxisStdM === null || r.quality.varianceFactor === null) throw new Error(`seed ${FIRST_SEED + k}: no standard errors`);
        acc.invF.push(fig.inverseFlattening);
        acc.a.push(fig.semiMajorAxisM);
        acc.seInvF.push(fig.inverseFlatteningStd);
        acc.seA.push(fig.semiMajorAxisStdM);
        acc.s0.push(r.quality.varianceFactor);
      }
      const o = independentRowsFit(file);
      old.invF.push(o.invF);
      old.a.push(o.a);
      old.seInvF.push(o.seInvF);
      old.seA.push(o.seA);
    }
    const dof = LATITUDES.length - 1 - 2;
    const tol = ratioTolerance(SEEDS, dof);
    for (const [model, acc] of byModel) {
      console.log(`${model}: 1/f spread ${sd(acc.invF).toFixed(4)} vs reported ${rms(acc.seInvF).toFixed(4)}; a spread ${sd(acc.a).toFixed(2)} m vs reported ${rms(acc.seA).toFixed(2)} m; mean σ̂₀² ${mean(acc.s0).toFixed(3)}`);
      within(sd(acc.invF) / rms(acc.seInvF), 1, tol, '', `${model}: spread of 1/f / reported σ(1/f)`, { source: SIM });
      within(sd(acc.a) / rms(acc.seA), 1, tol, '', `${model}: spread of a / reported σ(a)`, { source: SIM });
    }
    // σ̂₀² = vᵀΣ⁻¹v/ν is χ²_ν/ν under an exact model: mean 1, standard error √(2/ν)/√N. Only for the
    // rigorous model: the degree model's e⁴ error (≈ 1 m/degree) adds to its residuals (σ̂₀² ≈ 1.1 here).
    const ellS0 = byModel.get('ellipsoid')?.s0 ?? [];
    within(mean(ellS0), 1, 3 * Math.sqrt(2 / dof) / Math.sqrt(SEEDS), '', 'ellipsoid: mean variance factor', { source: 'χ² distribution of vᵀΣ⁻¹v' });
    // The rigorous model is unbiased on exact arcs: the mean 1/f within 3 standard errors of the mean of WGS 84.
    const ell = byModel.get('ellipsoid');
    if (!ell) throw new Error('no ellipsoid results');
    within(mean(ell.invF), WGS84_INVERSE_F, 3 * sd(ell.invF) / Math.sqrt(SEEDS), '', 'mean 1/f', { source: SIM });
    within(mean(ell.a), WGS84_A, 3 * sd(ell.a) / Math.sqrt(SEEDS), 'm', 'mean a', { source: SIM });
    // The old treatment's own reported errors fail the same check (they overstate the spread).
    const oldRatio = sd(old.invF) / rms(old.seInvF);
    console.log(`independent rows: 1/f spread ${sd(old.invF).toFixed(4)} vs reported ${rms(old.seInvF).toFixed(4)} (ratio ${oldRatio.toFixed(3)}); a spread ${sd(old.a).toFixed(2)} vs ${rms(old.seA).toFixed(2)} m`);
    expect(Math.abs(oldRatio - 1)).toBeGreaterThan(tol);
    // And the GLS is the more precise estimator: its spread is the smaller.
    expect(sd(ell.invF)).toBeLessThan(sd(old.invF));
  });
});

describe('which fits are whitened with the full arc covariance', () => {
  const file = simulatedCampaign({ latitudesDeg: LATITUDES, sigmaArcsec: 0.3, sigmaM: 0.5, seed: 5150 });

  it('least squares under propagated weights (every model) is the GLS and says so', () => {
    for (const model of ['ellipsoid', 'degree', 'degree2'] as const) {
      const r = solveCampaign(file, { model });
      expect(r.reason).toMatch(/^generalised least squares with the full arc covariance/);
      expect(r.statusMessage).not.toMatch(/independent/);
      // Σ rᵢ = n − p: the trace of the GLS projection.
      const p = model === 'degree2' ? 3 : 2;
      const sum = r.readings.filter((x) => x.kind === 'arc').reduce((t, x) => t + (x.redundancy ?? NaN), 0);
      within(sum, LATITUDES.length - 1 - p, 1e-9, '', `${model}: Σ redundancy`, { source: 'trace of Q_vv·P = n − p' });
    }
  });

  it('equal weights stay plain least squares; robust estimators stay independent rows and say so', () => {
    const equal = solveCampaign(file, { weighting: 'equal' });
    expect(equal.reason).not.toMatch(/generalised/);
    expect(equal.statusMessage).toBe('');
    for (const estimator of ['least-absolute', 'minimax', 'huber', 'tukey'] as const) {
      const r = solveCampaign(file, { estimator });
      expect(r.reason).not.toMatch(/generalised/);
      expect(r.statusMessage).toMatch(new RegExp(`the ${estimator} fit treats arcs that share a station as independent`));
    }
  });

  it('a closed loop with near-exact distances (Σ not positive definite) falls back to independent rows and says so', () => {
    // K01–K02, K02–K03 and K01–K03: the third arc is the sum of the first two in its latitude part,
    // so with σ_s = 1e-7 m Σ is singular at double precision.
    const loop = simulatedCampaign({ latitudesDeg: [10, 20, 30, 40], sigmaArcsec: 0.3, sigmaM: 1e-7 });
    const extra = { ...loop.arcReadings[0], id: 'a-K01-K03', toStation: 'K03', distanceM: loop.arcReadings[0].distanceM + loop.arcReadings[1].distanceM };
    const r = solveCampaign({ ...loop, arcReadings: [...loop.arcReadings, extra] });
    expect(r.status).toBe('ok');
    expect(r.statusMessage).toMatch(/not positive definite.*the arcs are treated as independent/);
    expect(r.reason).not.toMatch(/generalised/);
  });
});
