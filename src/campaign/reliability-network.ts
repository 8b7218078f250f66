// The campaign as a network for the reliability, planning and correlated-arc computations: the
// station latitudes of the chosen kind (each with its standard error) and the arcs that enter a fit
// (reduced distance with its own sigma, and which two stations it joins). Built with the engine's
// own reductions (station-latitudes.ts, prepare-arcs.ts), so the numbers are those solveCampaign
// fits; what differs is that each arc keeps the identity of its stations, so arcs that share a
// station can be given their covariance instead of being treated as independent.
import { ellipsoidById, type Ellipsoid } from '../geodesy/index.ts';
import type { CampaignRecords, LatitudeKind } from './records.ts';
import { reduceStationLatitudes, type StationLatitude } from './station-latitudes.ts';
import { prepareArcs, type PreparedArc } from './prepare-arcs.ts';

export interface NetworkStation {
  code: string;
  latitudeDeg: number;
  /** Standard error of the station latitude, arcseconds. */
  sigmaArcsec: number;
  /** Repeats used (not excluded). */
  readingCount: number;
  /** Median a-priori sigma of one repeat, arcseconds. */
  readingSigmaArcsec: number;
  /** Robust spread of the repeats, arcseconds (0 for a single reading). */
  spreadArcsec: number;
}

export interface NetworkArc {
  id: string;
  fromStation: string;
  toStation: string;
  /** Indices into `stations`. */
  from: number;
  to: number;
  /** Measured distance, metres. */
  distanceM: number;
  /** Distance reduced to the ellipsoid, metres. */
  reducedDistanceM: number;
  /** Sigma of the distance alone (no latitude part), reduced with the distance, metres. */
  sigmaDistanceM: number;
}

export interface ArcNetwork {
  kind: LatitudeKind;
  reference: Ellipsoid;
  /** Every station with a usable latitude of `kind` (others cannot enter an arc). */
  stations: NetworkStation[];
  /** Arcs in the fit, in file order. */
  arcs: NetworkArc[];
  /** Arcs left out of the network and why (excluded by a person, or no usable geometry). */
  leftOut: { id: string; reason: string }[];
}

export interface NetworkOptions {
  latitudeKind?: LatitudeKind;
  referenceEllipsoid?: string;
  suspectThreshold?: number;
  /** Readings to leave out on top of the campaign's exclusions (a what-if, e.g. influence analysis). */
  alsoExclude?: ReadonlySet<string>;
}

function median(values: readonly number[]): number {
  const s = [...values].sort((x, y) => x - y);
  const m = s.length >> 1;
  return s.length === 0 ? 0 : s.length % 2 === 1 ? s[m] : (s[m - 1] + s[m]) / 2;
}

export function arcNetwork(records: CampaignRecords, options: NetworkOptions = {}): ArcNetwork {
  const kind = options.latitudeKind ?? records.settings?.latitudeKind ?? 'astronomic';
  const reference = ellipsoidById(options.referenceEllipsoid ?? records.settings?.referenceEllipsoid ?? 'wgs84');
  const excluded = new Set((records.exclusions ?? []).map((e) => e.readingId));
  for (const id of options.alsoExclude ?? []) excluded.add(id);
  const latitudes = reduceStationLatitudes(records.stations, records.latitudeReadings, {
    excludedIds: excluded, suspectThreshold: options.suspectThreshold ?? records.settings?.suspectThreshold,
  });
  const prepared = prepareArcs(records.arcReadings, records.stations, latitudes, kind, 'propagated', reference, excluded);
  return networkFromReductions(records, latitudes, prepared, kind, reference, excluded);
}

/**
 * The network from reductions already made (solveCampaign's own station latitudes and prepared
 * arcs), so the correlated fit sees exactly the numbers the engine reduced. `excluded` holds the
 * excluded reading ids (for the repeats' median sigma).
 */
export function networkFromReductions(
  records: Pick<CampaignRecords, 'latitudeReadings' | 'arcReadings'>, latitudes: readonly StationLatitude[], prepared: readonly PreparedArc[],
  kind: LatitudeKind, reference: Ellipsoid, excluded: ReadonlySet<string>,
): ArcNetwork {
  const stations: NetworkStation[] = [];
  const index = new Map<string, number>();
  // The repeats in use per station, grouped once (campaigns carry thousands of readings).
  const sigmasOf = new Map<string, number[]>();
  for (const r of records.latitudeReadings) {
    if (r.kind !== kind || excluded.has(r.id)) continue;
    const list = sigmasOf.get(r.station);
    if (list) list.push(r.sigmaArcsec);
    else sigmasOf.set(r.station, [r.sigmaArcsec]);
  }
  for (const s of latitudes) {
    const est = s.byKind[kind];
    if (!est || est.count === 0) continue;
    index.set(s.code, stations.length);
    stations.push({
      code: s.code, latitudeDeg: est.latitudeDeg, sigmaArcsec: est.standardErrorArcsec, readingCount: est.count,
      readingSigmaArcsec: median(sigmasOf.get(s.code) ?? []), spreadArcsec: est.spreadArcsec,
    });
  }
  const byId = new Map(records.arcReadings.map((a) => [a.id, a]));
  const arcs: NetworkArc[] = [];
  const leftOut: ArcNetwork['leftOut'] = [];
  for (const p of prepared) {
    const raw = byId.get(p.id);
    const from = index.get(p.fromStation);
    const to = index.get(p.toStation);
    if (p.excluded) { leftOut.push({ id: p.id, reason: 'excluded' }); continue; }
    if (!p.geometry || !raw || from === undefined || to === undefined) { leftOut.push({ id: p.id, reason: p.unusableReason || 'no usable geometry' }); continue; }
    arcs.push({
      id: p.id, fromStation: p.fromStation, toStation: p.toStation, from, to,
      distanceM: raw.distanceM, reducedDistanceM: p.geometry.reducedDistanceM,
      sigmaDistanceM: raw.sigmaM * (p.geometry.reducedDistanceM / raw.distanceM),
    });
  }
  return { kind, reference, stations, arcs, leftOut };
}
