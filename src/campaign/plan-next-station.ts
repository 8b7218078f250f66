// The planner: where does one more day of work shrink the standard error of 1/f (and of a) most?
//
// Every candidate is judged by the a-priori covariance of (a, f) it would leave — design only, no
// data needed — from the generalised least squares of the arcs with their full covariance
// (reliability-gls.ts), evaluated at the campaign's current figure (the GLS solution, or the
// reference ellipsoid while the campaign cannot determine one). A-priori means σ₀ = 1: the
// campaign's stated sigmas are taken at their word, which is what planning needs (a variance
// factor estimated from a handful of arcs would only add noise to the ranking).
//
// Candidates and what each is assumed to be (DEVELOPERS.md "Planner"):
// - new station at latitude φ: a new arc from the observed station nearest in latitude, with the
//   campaign's median relative distance sigma (σ_s/s) times the new arc's length, and the new
//   station's latitude at the campaign's median station standard error. The new arc shares the
//   nearest station's latitude error with that station's other arcs (its covariance is kept).
//   Its information is a rank-one update: with c the covariance of the new arc with the existing
//   ones, P = Σ⁻¹ and s = σ_new² − cᵀPc (the Schur complement),
//       N' = N + u·uᵀ/s,  u = j_new − JᵀPc,   and  Q' = Q − Q·u·uᵀ·Q/(s + uᵀQu)  (Sherman–Morrison).
// - one more repeat at an observed station: its standard error shrinks by √(n/(n+1)) (the σ/√n
//   rule for n repeats of equal weight), recomputed in full (Σ changes in every arc of the station).
// - re-measuring an arc: its distance sigma shrinks by 1/√2 (the mean of two independent
//   measurements), recomputed in full.
import { InputError } from '../errors.ts';
import { MAX_LATITUDE_DEG } from '../geodesy/index.ts';
import type { CampaignRecords } from './records.ts';
import { arcNetwork, type ArcNetwork, type NetworkOptions } from './reliability-network.ts';
import { arcDesign, designCovariance, fitCorrelatedArcs } from './reliability-gls.ts';
import { choleskySolve } from './reliability-linear-algebra.ts';
import { MIN_ARC_SPAN_DEG } from './prepare-arcs.ts';

/** Most candidates one plan evaluates (a 0.05° step from pole to pole). */
export const MAX_CANDIDATES = 3601;
/** Relative distance sigma assumed when the campaign has no arc yet: 1 part in 100 000 (common practice for a taped or chained base). */
export const DEFAULT_RELATIVE_ARC_SIGMA = 1e-5;
/** Station standard error assumed when no station has a latitude yet, arcseconds (common practice for a night of star pairs). */
export const DEFAULT_STATION_SIGMA_ARCSEC = 0.3;

export type CandidateKind = 'new-station' | 'station-repeat' | 'arc-repeat';

export interface PlanCandidate {
  kind: CandidateKind;
  /** Plain words: "new station at 64.000° N, arc from K12". */
  label: string;
  /** The new station's latitude, the repeated station's, or the re-measured arc's mid latitude. */
  latitudeDeg: number;
  /** The observed station the new arc starts from, the repeated station, or the arc's "K06–K07". */
  anchor: string;
  inverseFlatteningStd: number;
  semiMajorAxisStdM: number;
  /** Current standard error minus this one (positive = better); null while there is no current figure. */
  inverseFlatteningGain: number | null;
  semiMajorAxisGainM: number | null;
}

export interface CampaignPlan {
  /** Standard errors now (a-priori, GLS), null while the campaign cannot determine a figure. */
  current: { inverseFlatteningStd: number; semiMajorAxisStdM: number } | null;
  /** The figure the design is evaluated at, and where it came from. */
  figure: { semiMajorAxisM: number; inverseFlattening: number; source: string };
  assumptions: { relativeArcSigma: number; stationSigmaArcsec: number; text: string[] };
  /** Ranked best first: smallest 1/f standard error, then smallest a standard error. */
  candidates: PlanCandidate[];
  /** Candidate latitudes not evaluated, with the reason. */
  skipped: { latitudeDeg: number; reason: string }[];
}

export interface PlanOptions extends NetworkOptions {
  /** Candidate latitudes for new stations (typed), decimal degrees. */
  latitudesDeg?: readonly number[];
  /** Or a range: from, to (either order) and a positive step, decimal degrees. */
  range?: { fromDeg: number; toDeg: number; stepDeg: number };
  /** Also rank one more repeat at each station and re-measuring each arc (default true). */
  includeRepeats?: boolean;
}

/** The candidate latitudes of a range, inclusive of both ends (to 1e-9° rounding). */
export function candidateLatitudes(range: { fromDeg: number; toDeg: number; stepDeg: number }): number[] {
  const { fromDeg, toDeg, stepDeg } = range;
  for (const [field, v] of [['from', fromDeg], ['to', toDeg]] as const) {
    if (!Number.isFinite(v) || Math.abs(v) > MAX_LATITUDE_DEG) throw new InputError(field, v, 'a latitude in decimal degrees within [-90, 90]');
  }
  if (!Number.isFinite(stepDeg) || stepDeg <= 0) throw new InputError('step', stepDeg, 'must be a positive number of degrees');
  const lo = Math.min(fromDeg, toDeg);
  const hi = Math.max(fromDeg, toDeg);
  const count = Math.floor((hi - lo) / stepDeg + 1e-9) + 1;
  if (count > MAX_CANDIDATES) throw new InputError('step', stepDeg, `gives ${count} candidates; at most ${MAX_CANDIDATES} (use a larger step)`);
  // Multiply, never accumulate: lo + k·step keeps each candidate within one rounding of its exact value.
  return Array.from({ length: count }, (_, k) => Number((lo + k * stepDeg).toFixed(9)));
}

function median(values: readonly number[]): number | null {
  if (values.length === 0) return null;
  const s = [...values].sort((x, y) => x - y);
  const m = s.length >> 1;
  return s.length % 2 === 1 ? s[m] : (s[m - 1] + s[m]) / 2;
}

const stdOf = (Q: Float64Array, f: number): { inverseFlatteningStd: number; semiMajorAxisStdM: number } =>
  ({ inverseFlatteningStd: Math.sqrt(Math.max(0, Q[3])) / (f * f), semiMajorAxisStdM: Math.sqrt(Math.max(0, Q[0])) });

function withNewStation(network: ArcNetwork, latitudeDeg: number, nearest: number, stationSigmaArcsec: number, sigmaM: number): ArcNetwork {
  const code = '(new)';
  const stations = [...network.stations, { code, latitudeDeg, sigmaArcsec: stationSigmaArcsec, readingCount: 1, readingSigmaArcsec: stationSigmaArcsec, spreadArcsec: 0 }];
  const near = network.stations[nearest];
  const arc = {
    id: '(candidate)', fromStation: near.code, toStation: code, from: nearest, to: stations.length - 1,
    distanceM: 0, reducedDistanceM: 0, sigmaDistanceM: sigmaM,
  };
  return { ...network, stations, arcs: [...network.arcs, arc] };
}

/** Rank candidate new stations and repeats for the campaign (see the file comment). */
export function planCampaign(records: CampaignRecords, options: PlanOptions = {}): CampaignPlan {
  const network = arcNetwork(records, options);
  const fit = fitCorrelatedArcs(network);
  const haveFit = fit.status === 'ok' && Number.isFinite(fit.flattening);
  const a = haveFit ? fit.semiMajorAxisM : network.reference.semiMajorAxisM;
  const f = haveFit ? fit.flattening : network.reference.flattening;
  const figureSource = haveFit ? 'the campaign\'s least-squares figure (arcs with their full covariance)' : `the reference ellipsoid ${network.reference.name} (the campaign cannot determine a figure yet: ${fit.reason})`;

  const rel = median(network.arcs.map((arc) => arc.sigmaDistanceM / arc.reducedDistanceM)) ?? DEFAULT_RELATIVE_ARC_SIGMA;
  const stationSigma = median(network.stations.map((s) => s.sigmaArcsec)) ?? DEFAULT_STATION_SIGMA_ARCSEC;
  const text = [
    'standard errors are a-priori (the campaign\'s sigmas taken at their word, σ₀ = 1), from least squares of the arcs with their full covariance',
    `a new station is joined by one new arc from the observed station nearest in latitude, measured to ${(rel * 1e6).toFixed(2)} parts per million (the campaign's median σ_s/s), its latitude to ${stationSigma.toFixed(3)}″ (the campaign's median station standard error)`,
    'one more repeat at a station shrinks its standard error by √(n/(n+1)) (σ/√n rule)',
    're-measuring an arc shrinks its distance sigma by 1/√2 (mean of two independent measurements)',
  ];

  const base = designCovariance(network, a, f);
  const current = base.ok && network.arcs.length >= 2 ? stdOf(base.covariance, f) : null;
  const candidates: PlanCandidate[] = [];
  const skipped: CampaignPlan['skipped'] = [];
  const push = (c: Omit<PlanCandidate, 'inverseFlatteningGain' | 'semiMajorAxisGainM'>): void => {
    candidates.push({
      ...c,
      inverseFlatteningGain: current ? current.inverseFlatteningStd - c.inverseFlatteningStd : null,
      semiMajorAxisGainM: current ? current.semiMajorAxisStdM - c.semiMajorAxisStdM : null,
    });
  };

  const latitudes = [...(options.latitudesDeg ?? []), ...(options.range ? candidateLatitudes(options.range) : [])];
  for (const [k, v] of latitudes.entries()) {
    if (!Number.isFinite(v) || Math.abs(v) > MAX_LATITUDE_DEG) throw new InputError(`latitudesDeg[${k}]`, v, 'a latitude in decimal degrees within [-90, 90]');
  }
  // Shared pieces of the rank-one update: P·J and the current Q (when the campaign has a figure).
  const PJ = base.ok && base.factor ? choleskySolve(base.factor, base.design.J, 2) : null;
  for (const phi of latitudes) {
    if (network.stations.length === 0) {
      skipped.push({ latitudeDeg: phi, reason: 'no observed station to start an arc from' });
      continue;
    }
    let nearest = 0;
    network.stations.forEach((s, i) => { if (Math.abs(s.latitudeDeg - phi) < Math.abs(network.stations[nearest].latitudeDeg - phi)) nearest = i; });
    const near = network.stations[nearest];
    if (Math.abs(near.latitudeDeg - phi) < MIN_ARC_SPAN_DEG) {
      skipped.push({ latitudeDeg: phi, reason: `station ${near.code} is already there` });
      continue;
    }
    const lengthGuess = Math.abs(phi - near.latitudeDeg) * (Math.PI / 180) * a; // only scales σ_s: a spherical length is ample
    const aug = withNewStation(network, phi, nearest, stationSigma, rel * lengthGuess);
    let Q: Float64Array | null = null;
    if (PJ && base.factor && current) {
      const d = arcDesign(aug, a, f);
      const n = network.arcs.length;
      const N1 = n + 1;
      const c = new Float64Array(n);
      for (let i = 0; i < n; i++) c[i] = d.sigma[i * N1 + n];
      const Pc = choleskySolve(base.factor, c, 1);
      let cPc = 0;
      const u = [d.J[2 * n], d.J[2 * n + 1]];
      for (let i = 0; i < n; i++) {
        cPc += c[i] * Pc[i];
        u[0] -= Pc[i] * base.design.J[2 * i];
        u[1] -= Pc[i] * base.design.J[2 * i + 1];
      }
      const s = d.sigma[n * N1 + n] - cPc;
      const Q0 = base.covariance;
      const Qu = [Q0[0] * u[0] + Q0[1] * u[1], Q0[2] * u[0] + Q0[3] * u[1]];
      const denom = s + u[0] * Qu[0] + u[1] * Qu[1];
      if (s > 0 && denom > 0) Q = new Float64Array([Q0[0] - Qu[0] * Qu[0] / denom, Q0[1] - Qu[0] * Qu[1] / denom, Q0[2] - Qu[1] * Qu[0] / denom, Q0[3] - Qu[1] * Qu[1] / denom]);
    }
    if (!Q) {
      const full = designCovariance(aug, a, f);
      if (!full.ok) {
        skipped.push({ latitudeDeg: phi, reason: `even with this arc the figure is undetermined: ${full.reason}` });
        continue;
      }
      Q = full.covariance;
    }
    const hemi = phi >= 0 ? 'N' : 'S';
    push({ kind: 'new-station', label: `new station at ${Math.abs(phi).toFixed(3)}° ${hemi}, arc from ${near.code}`, latitudeDeg: phi, anchor: near.code, ...stdOf(Q, f) });
  }

  if (options.includeRepeats !== false && network.arcs.length > 0) {
    network.stations.forEach((st, j) => {
      if (!network.arcs.some((arc) => arc.from === j || arc.to === j)) return;
      const nRep = st.readingCount;
      const stations = network.stations.map((s, k) => (k === j ? { ...s, sigmaArcsec: s.sigmaArcsec * Math.sqrt(nRep / (nRep + 1)) } : s));
      const dc = designCovariance({ ...network, stations }, a, f);
      if (dc.ok) push({ kind: 'station-repeat', label: `one more latitude repeat at ${st.code} (${nRep} → ${nRep + 1})`, latitudeDeg: st.latitudeDeg, anchor: st.code, ...stdOf(dc.covariance, f) });
    });
    network.arcs.forEach((arc, i) => {
      const arcs = network.arcs.map((x, k) => (k === i ? { ...x, sigmaDistanceM: x.sigmaDistanceM / Math.SQRT2 } : x));
      const dc = designCovariance({ ...network, arcs }, a, f);
      const mid = (network.stations[arc.from].latitudeDeg + network.stations[arc.to].latitudeDeg) / 2;
      if (dc.ok) push({ kind: 'arc-repeat', label: `re-measure arc ${arc.fromStation}–${arc.toStation}`, latitudeDeg: mid, anchor: `${arc.fromStation}–${arc.toStation}`, ...stdOf(dc.covariance, f) });
    });
  }

  candidates.sort((x, y) => x.inverseFlatteningStd - y.inverseFlatteningStd || x.semiMajorAxisStdM - y.semiMajorAxisStdM);
  return {
    current,
    figure: { semiMajorAxisM: a, inverseFlattening: 1 / f, source: figureSource },
    assumptions: { relativeArcSigma: rel, stationSigmaArcsec: stationSigma, text },
    candidates,
    skipped,
  };
}
