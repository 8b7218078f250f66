// The parametric bootstrap's replicates: campaigns simulated from the campaign's own solution, so
// that the shared-station correlation is reproduced (the pairs bootstrap resamples arcs as
// independent cases and cannot).
//
// Method (Efron & Tibshirani, "An Introduction to the Bootstrap", 1993, §6.5 — from memory): the
// "truth" of every replicate is the fitted figure (a, f) with the adjusted station latitudes φ̂ⱼ;
// each replicate draws ONE latitude error per station, φ*ⱼ = φ̂ⱼ + σⱼ·N(0, 1) (σⱼ the station's
// standard error), used by every arc through that station, and one distance error per arc,
// s*ᵢ = a·|g(φ̂_t; f) − g(φ̂_s; f)| + σ_sᵢ·N(0, 1), on the reference ellipsoid's surface (heights
// are already reduced away). The replicate is then solved by solveCampaign itself with the same
// model, estimator and weighting (one reading per station at σⱼ, so its station sigma is σⱼ).
// It assumes the a-priori sigmas are right and the model exact: it measures the spread the sigmas
// imply (as the a-priori covariance does), not extra scatter in the data (which the pairs
// bootstrap sees). Normal draws: seededRandom's normal() (seeded-random.ts).
import { meridianDistancePerUnitA } from '../geodesy/index.ts';
import type { ArcReading, CampaignRecords, EstimatorId, LatitudeKind, LatitudeReading, ModelId, WeightingId } from './records.ts';
import type { CampaignResult, Figure } from './result.ts';
import type { ArcNetwork } from './reliability-network.ts';
import type { SeededRandom } from './seeded-random.ts';
import { solveCampaign } from './solve-campaign.ts';

export interface ParametricSettings {
  model: ModelId;
  estimator: EstimatorId;
  weighting: WeightingId;
  latitudeKind: LatitudeKind;
  referenceEllipsoid: string;
}

/** A fixed time stamp for the simulated readings (not shown anywhere; the solve ignores it). */
const SIMULATED_AT = '2000-01-01T00:00:00Z';

/** A sampler of replicate figures from the base solution on `network` (the arcs in the fit). */
export function parametricSampler(
  network: ArcNetwork, base: CampaignResult, settings: ParametricSettings, rng: SeededRandom,
): () => { figure: Figure; converged: boolean } | null {
  const fig = base.figure;
  if (!fig) return () => null;
  const trueArcs = network.arcs.map((arc) => fig.semiMajorAxisM * Math.abs(
    meridianDistancePerUnitA(fig.flattening, network.stations[arc.to].latitudeDeg) - meridianDistancePerUnitA(fig.flattening, network.stations[arc.from].latitudeDeg)));
  const stations = network.stations.map((s) => ({ code: s.code }));
  return () => {
    const latitudeReadings: LatitudeReading[] = network.stations.map((s) => ({
      id: `simulated-${s.code}`, station: s.code, kind: settings.latitudeKind,
      latitudeDeg: s.latitudeDeg + (s.sigmaArcsec * rng.normal()) / 3600, sigmaArcsec: s.sigmaArcsec, observedAt: SIMULATED_AT,
    }));
    const arcReadings: ArcReading[] = network.arcs.map((arc, i) => ({
      id: arc.id, fromStation: arc.fromStation, toStation: arc.toStation,
      distanceM: trueArcs[i] + arc.sigmaDistanceM * rng.normal(), sigmaM: arc.sigmaDistanceM,
    }));
    const replicate: CampaignRecords = { name: 'parametric bootstrap replicate', stations, latitudeReadings, arcReadings };
    const r = solveCampaign(replicate, { ...settings, previous: base });
    if (!r.figure || r.status === 'too-few-arcs' || r.status === 'rank-deficient' || r.status === 'one-latitude') return null;
    return { figure: r.figure, converged: r.status !== 'not-converged' };
  };
}
