// Reliability of each reading for the current campaign (Baarda's theory, W. Baarda, "A testing
// procedure for use in geodetic networks", 1968 — from memory; with correlated observations as in
// P. J. G. Teunissen, "Testing theory", Delft, 2000 — from memory):
//
// Arc readings — from the generalised least squares of (a, f) with the full arc covariance Σ
// (reliability-gls.ts), P = Σ⁻¹, Q_vv = Σ − J Q Jᵀ the covariance of the residuals:
//     redundancy   rᵢ = (Q_vv P)ᵢᵢ            (Σ rᵢ = n − 2)
//     leverage     hᵢ = 1 − rᵢ
//     w-test       wᵢ = (P v)ᵢ / √(P Q_vv P)ᵢᵢ
//     MDB          ∇ᵢ = δ₀ / √(P Q_vv P)ᵢᵢ   metres of distance, δ₀ = 4.13 (α₀ = 0.001, β₀ = 0.80)
// (computed in gls-diagnostics.ts, shared with solveCampaign's own least squares).
// With a diagonal Σ these reduce to the textbook rᵢ = 1 − hᵢᵢ and ∇ᵢ = δ₀σᵢ/√rᵢ. They are
// properties of the geometry and the a-priori sigmas (σ₀ = 1), so they are computed on the rigorous
// model whatever model or estimator the campaign displays.
//
// Latitude readings — checked by the other repeats at their station (where the station reduction
// tests them): for a weighted mean of n repeats, rᵢ = 1 − wᵢ/Σw and ∇ᵢ = δ₀σᵢ/√rᵢ in arcseconds,
// also given in metres on the ground (× M(φ)·π/648000). A single reading has rᵢ = 0: it cannot be
// checked at all. (A blunder there also shows in the arcs; the station test is the sharper one.)
//
// Influence — exact, not linearised: the campaign is solved again with the reading left out
// (solveCampaign with the campaign's own model and estimator), and the change in 1/f and a is
// reported (without − with).
import { meridianRadiusM } from '../geodesy/index.ts';
import { MDB_NONCENTRALITY, REDUNDANCY_FLOOR } from '../fit/index.ts';
import type { CampaignRecords, EstimatorId, LatitudeKind, ModelId } from './records.ts';
import type { CampaignResult } from './result.ts';
import { solveCampaign } from './solve-campaign.ts';
import { arcNetwork, type NetworkOptions } from './reliability-network.ts';
import { fitCorrelatedArcs, type CorrelatedFit } from './reliability-gls.ts';
import { glsDiagnostics } from './gls-diagnostics.ts';

const RAD_PER_ARCSEC = Math.PI / 648000;

export interface ReadingReliability {
  id: string;
  kind: 'arc' | 'latitude';
  /** The arc "K04–K05" or the station code of a latitude reading. */
  label: string;
  inFit: boolean;
  redundancy: number | null;
  leverage: number | null;
  /** Baarda's w (arcs, from the GLS), null for latitude readings (their station test is the standardized residual). */
  wTest: number | null;
  /** Smallest blunder found with power 0.80, in `mdbUnit` (m for arcs, arcsec for latitude readings); null when the reading cannot be checked. */
  minimalDetectableBias: number | null;
  mdbUnit: 'm' | 'arcsec';
  /** The same bias as metres on the ground. */
  minimalDetectableBiasM: number | null;
  /** Change when the reading is left out (without − with), with the campaign's model and estimator; null if not computed or no figure either way. */
  influence: { inverseFlattening: number; semiMajorAxisM: number } | null;
  /** Plain words, e.g. "a blunder under 6.2 m on arc K04–K05 would go unnoticed". */
  statement: string;
}

export interface CampaignReliability {
  model: ModelId;
  estimator: EstimatorId;
  /** The correlated GLS the arc numbers come from. */
  correlatedFit: CorrelatedFit;
  readings: ReadingReliability[];
  /** Reading ids by |influence on 1/f|, largest first (only readings with an influence). */
  mostInfluential: string[];
}

export interface ReliabilityOptions extends NetworkOptions {
  model?: ModelId;
  estimator?: EstimatorId;
  /** Compute the leave-one-out influence (one extra solve per reading; default true). */
  influence?: boolean;
  /** Progress of the influence solves, for the worker. */
  onProgress?: (done: number, total: number) => void;
}

function fmt(value: number, unit: string): string {
  const digits = value >= 100 ? 0 : value >= 10 ? 1 : 2;
  return `${value.toFixed(digits)}${unit === '″' ? '″' : ' ' + unit}`;
}

function signed(value: number, digits: number): string {
  return `${value >= 0 ? '+' : '−'}${Math.abs(value).toFixed(digits)}`;
}

function influenceWords(inf: ReadingReliability['influence']): string {
  if (!inf) return '';
  return `; leaving it out moves 1/f by ${signed(inf.inverseFlattening, 3)} and a by ${signed(inf.semiMajorAxisM, 1)} m`;
}

/** Every reading's reliability and influence for the campaign (see the file comment). */
export function campaignReliability(records: CampaignRecords, options: ReliabilityOptions = {}): CampaignReliability {
  const model = options.model ?? records.settings?.model ?? 'ellipsoid';
  const estimator = options.estimator ?? records.settings?.estimator ?? 'least-squares';
  const network = arcNetwork(records, options);
  const fit = fitCorrelatedArcs(network);
  const excluded = new Set((records.exclusions ?? []).map((e) => e.readingId));

  // Arc numbers from the GLS.
  const arcNumbers = new Map<string, { r: number; w: number; mdb: number }>();
  if (fit.design && fit.factor && fit.covarianceApriori) {
    const d = glsDiagnostics(fit.design.J, 2, fit.covarianceApriori, fit.design.sigma, fit.factor, fit.residualsM);
    network.arcs.forEach((arc, i) => {
      arcNumbers.set(arc.id, { r: d.redundancy[i], w: d.wTest[i], mdb: d.minimalDetectableBias[i] });
    });
  }

  // Influence: one solve per reading in the fit, with it left out.
  const base = solveCampaign(records, { model, estimator, latitudeKind: network.kind, referenceEllipsoid: network.reference.id, suspectThreshold: options.suspectThreshold });
  const candidates = [...records.latitudeReadings.filter((r) => r.kind === network.kind).map((r) => r.id), ...records.arcReadings.map((a) => a.id)].filter((id) => !excluded.has(id));
  const influence = new Map<string, ReadingReliability['influence']>();
  if (options.influence !== false && base.figure) {
    candidates.forEach((id, k) => {
      const without = solveWithout(records, id, base, model, estimator, network.kind, network.reference.id, options.suspectThreshold);
      if (without?.figure && base.figure) {
        influence.set(id, {
          inverseFlattening: without.figure.inverseFlattening - base.figure.inverseFlattening,
          semiMajorAxisM: without.figure.semiMajorAxisM - base.figure.semiMajorAxisM,
        });
      }
      options.onProgress?.(k + 1, candidates.length);
    });
  }

  const readings: ReadingReliability[] = [];
  const stationOf = new Map(network.stations.map((s) => [s.code, s]));
  for (const r of records.latitudeReadings) {
    const st = stationOf.get(r.station);
    const inFit = r.kind === network.kind && !excluded.has(r.id) && st !== undefined;
    const peers = records.latitudeReadings.filter((o) => o.station === r.station && o.kind === r.kind && !excluded.has(o.id));
    const sumW = peers.reduce((s, o) => s + 1 / (o.sigmaArcsec * o.sigmaArcsec), 0);
    const redundancy = excluded.has(r.id) ? null : 1 - 1 / (r.sigmaArcsec * r.sigmaArcsec) / sumW;
    const controlled = redundancy !== null && redundancy > REDUNDANCY_FLOOR;
    const mdb = controlled ? MDB_NONCENTRALITY * r.sigmaArcsec / Math.sqrt(redundancy) : null;
    const groundPerArcsec = meridianRadiusM(network.reference, r.latitudeDeg) * RAD_PER_ARCSEC;
    const mdbM = mdb !== null ? mdb * groundPerArcsec : null;
    const inf = influence.get(r.id) ?? null;
    let statement: string;
    if (excluded.has(r.id)) statement = `reading ${r.id} at ${r.station} is excluded`;
    else if (mdb === null || mdbM === null) statement = `reading ${r.id} is the only ${r.kind} reading at ${r.station}: a blunder of any size would go unnoticed — observe ${r.station} again`;
    else statement = `a blunder under ${fmt(mdb, '″')} (${fmt(mdbM, 'm')} on the ground) in reading ${r.id} at ${r.station} would go unnoticed`;
    readings.push({
      id: r.id, kind: 'latitude', label: r.station, inFit, redundancy, leverage: redundancy === null ? null : 1 - redundancy, wTest: null,
      minimalDetectableBias: mdb, mdbUnit: 'arcsec', minimalDetectableBiasM: mdbM, influence: inf,
      statement: statement + (inFit ? influenceWords(inf) : ''),
    });
  }
  for (const a of records.arcReadings) {
    const nums = arcNumbers.get(a.id);
    const label = `${a.fromStation}–${a.toStation}`;
    const inf = influence.get(a.id) ?? null;
    let statement: string;
    if (excluded.has(a.id)) statement = `arc ${label} is excluded`;
    else if (!nums) statement = `arc ${label} is not in the fit`;
    else if (!Number.isFinite(nums.mdb)) statement = `arc ${label} is not checked by any other reading: a blunder of any size would go unnoticed — measure another arc through ${a.fromStation} or ${a.toStation}`;
    else statement = `a blunder under ${fmt(nums.mdb, 'm')} on arc ${label} would go unnoticed`;
    readings.push({
      id: a.id, kind: 'arc', label, inFit: nums !== undefined,
      redundancy: nums ? nums.r : null, leverage: nums ? 1 - nums.r : null,
      wTest: nums && Number.isFinite(nums.w) ? nums.w : null,
      minimalDetectableBias: nums && Number.isFinite(nums.mdb) ? nums.mdb : null, mdbUnit: 'm',
      minimalDetectableBiasM: nums && Number.isFinite(nums.mdb) ? nums.mdb : null,
      influence: inf, statement: statement + (nums ? influenceWords(inf) : ''),
    });
  }
  const mostInfluential = [...influence.entries()]
    .sort((x, y) => Math.abs(y[1]?.inverseFlattening ?? 0) - Math.abs(x[1]?.inverseFlattening ?? 0))
    .map(([id]) => id);
  return { model, estimator, correlatedFit: fit, readings, mostInfluential };
}

function solveWithout(
  records: CampaignRecords, id: string, previous: CampaignResult, model: ModelId, estimator: EstimatorId,
  latitudeKind: LatitudeKind,
  referenceEllipsoid: string, suspectThreshold: number | undefined,
): CampaignResult | null {
  const whatIf: CampaignRecords = {
    ...records,
    exclusions: [...(records.exclusions ?? []), { id: `what-if-${id}`, readingId: id, excludedBy: 'reliability analysis', reason: 'left out to measure its influence', at: '1970-01-01T00:00:00Z' }],
  };
  const r = solveCampaign(whatIf, { model, estimator, latitudeKind, referenceEllipsoid, suspectThreshold, previous });
  return r.figure ? r : null;
}
