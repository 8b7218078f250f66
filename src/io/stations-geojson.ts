// Stations as a GeoJSON FeatureCollection (RFC 7946): one Feature per station, a Point at
// [longitude, latitude] in decimal degrees on WGS 84 (RFC 7946 §4; the only place arcfield writes
// longitude first), the latitude being the station's adjusted latitude from the solve.
// Coordinates carry at most 7 decimals (about 1 cm on the ground, RFC 7946 §11.2's advice against
// false precision); the full-precision latitude and its summary are properties. No altitude is
// written: station heights have no stated vertical reference, so `heightM` stays a property.
// A station without a longitude, or without a latitude reading, gets `geometry: null` — RFC 7946
// §3.2's "unlocated" feature — so no station silently drops out of the export.
import type { CampaignFile, Station } from '../campaign/records.ts';
import type { StationSummary } from '../campaign/result.ts';

export const GEOJSON_DECIMALS = 7;

export interface StationProperties {
  code: string;
  name: string | null;
  stationId: string | null;
  heightM: number | null;
  /** The adjusted latitude at full precision (the Point rounds it to 7 decimals). */
  latitudeDeg: number | null;
  latitudeKind: string | null;
  latitudeSigmaArcsec: number | null;
  latitudeReadingCount: number;
  latitudeSpreadArcsec: number | null;
  deflectionNorthArcsec: number | null;
  suspect: boolean;
  suspectReadingIds: string[];
  excludedReadingIds: string[];
  /** Why the feature has no geometry, when it has none. */
  unlocatedReason: string | null;
}

export interface StationFeature {
  type: 'Feature';
  id: string;
  geometry: { type: 'Point'; coordinates: [number, number] } | null;
  properties: StationProperties;
}

export interface StationCollection {
  type: 'FeatureCollection';
  features: StationFeature[];
}

function round(value: number): number {
  const r = Math.round(value * 10 ** GEOJSON_DECIMALS) / 10 ** GEOJSON_DECIMALS;
  return r === 0 ? 0 : r; // no "-0" in the file
}

function feature(station: Station, summary: StationSummary | undefined, excludedIds: ReadonlySet<string>, readingIds: readonly string[]): StationFeature {
  const lon = station.longitudeDeg;
  let unlocatedReason: string | null = null;
  if (lon === undefined) unlocatedReason = 'no longitude recorded for this station';
  else if (!summary) unlocatedReason = 'no latitude reading for this station';
  const geometry = unlocatedReason === null && summary && lon !== undefined
    ? { type: 'Point' as const, coordinates: [round(lon), round(summary.latitudeDeg)] as [number, number] }
    : null;
  return {
    type: 'Feature',
    id: station.code,
    geometry,
    properties: {
      code: station.code,
      name: station.name ?? null,
      stationId: station.id ?? null,
      heightM: station.heightM ?? null,
      latitudeDeg: summary?.latitudeDeg ?? null,
      latitudeKind: summary?.kind ?? null,
      latitudeSigmaArcsec: summary?.sigmaArcsec ?? null,
      latitudeReadingCount: summary?.readingCount ?? 0,
      latitudeSpreadArcsec: summary?.spreadArcsec ?? null,
      deflectionNorthArcsec: summary?.deflectionNorthArcsec ?? null,
      suspect: (summary?.suspectReadingIds.length ?? 0) > 0,
      suspectReadingIds: summary ? [...summary.suspectReadingIds] : [],
      excludedReadingIds: readingIds.filter((id) => excludedIds.has(id)),
      unlocatedReason,
    },
  };
}

/** The campaign's stations with their adjusted latitudes (`summaries` from solveCampaign's result). */
export function stationsGeoJson(file: CampaignFile, summaries: readonly StationSummary[]): StationCollection {
  const byCode = new Map(summaries.map((s) => [s.code, s]));
  const excluded = new Set((file.exclusions ?? []).map((e) => e.readingId));
  const readingsOf = new Map<string, string[]>();
  for (const r of file.latitudeReadings) {
    const list = readingsOf.get(r.station) ?? [];
    list.push(r.id);
    readingsOf.set(r.station, list);
  }
  return {
    type: 'FeatureCollection',
    features: file.stations.map((s) => feature(s, byCode.get(s.code), excluded, readingsOf.get(s.code) ?? [])),
  };
}

/** The GeoJSON text (media type application/geo+json), two-space indented with a final newline. */
export function stationsGeoJsonText(file: CampaignFile, summaries: readonly StationSummary[]): string {
  return JSON.stringify(stationsGeoJson(file, summaries), null, 2) + '\n';
}
