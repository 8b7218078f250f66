// Simulated campaigns for the decision tests: stations on one meridian (invented codes K01…), true
// arcs from GeographicLib's inverse problem (geographiclib-geodesic 2.2 — the outside reference for
// meridian distances), station latitudes observed with seeded Gaussian noise at their stated sigma
// (`repeats` readings each, so a station's latitude error is shared by both arcs that use it), and
// distances with seeded noise at theirs. No heights: the reduction to the ellipsoid is the identity.
import geodesic from 'geographiclib-geodesic';
import type { ArcReading, CampaignFile, LatitudeReading } from '../../../src/campaign/records.ts';
import { seededRandom } from '../../../src/campaign/seeded-random.ts';

export const WGS84_A = 6378137; // NIMA TR8350.2 — from memory
export const WGS84_INVERSE_F = 298.257223563; // NIMA TR8350.2 — from memory

export interface SimulationOptions {
  latitudesDeg: readonly number[];
  sigmaArcsec: number;
  sigmaM: number;
  repeats?: number;
  seed?: number;
  /** Arcs between consecutive stations (default) or between disjoint pairs (0–1, 2–3, …: no shared station). */
  layout?: 'chain' | 'pairs';
  /** Added to the distance of arc i (metres). */
  arcBlunders?: Record<number, number>;
  a?: number;
  inverseFlattening?: number;
}

export function geographicLibArcM(a: number, f: number, lat1: number, lat2: number): number {
  const g = new geodesic.Geodesic.Geodesic(a, f);
  return g.Inverse(lat1, 0, lat2, 0).s12 ?? Number.NaN;
}

export const stationCode = (i: number): string => `K${String(i + 1).padStart(2, '0')}`;

export function simulatedCampaign(o: SimulationOptions): CampaignFile {
  const a = o.a ?? WGS84_A;
  const f = 1 / (o.inverseFlattening ?? WGS84_INVERSE_F);
  const rng = o.seed !== undefined ? seededRandom(o.seed) : null;
  const repeats = o.repeats ?? 1;
  const latitudeReadings: LatitudeReading[] = [];
  o.latitudesDeg.forEach((lat, i) => {
    for (let k = 0; k < repeats; k++) {
      latitudeReadings.push({
        id: `r-${stationCode(i)}-${k + 1}`, station: stationCode(i), kind: 'astronomic',
        latitudeDeg: lat + (rng ? (o.sigmaArcsec * rng.normal()) / 3600 : 0), sigmaArcsec: o.sigmaArcsec,
        observedAt: `2026-06-${String(2 + (k % 20)).padStart(2, '0')}T21:14:00Z`,
      });
    }
  });
  const pairs: [number, number][] = [];
  if ((o.layout ?? 'chain') === 'chain') for (let i = 0; i + 1 < o.latitudesDeg.length; i++) pairs.push([i, i + 1]);
  else for (let i = 0; i + 1 < o.latitudesDeg.length; i += 2) pairs.push([i, i + 1]);
  const arcReadings: ArcReading[] = pairs.map(([i, j], k) => ({
    id: `a-${stationCode(i)}-${stationCode(j)}`, fromStation: stationCode(i), toStation: stationCode(j),
    distanceM: geographicLibArcM(a, f, o.latitudesDeg[i], o.latitudesDeg[j]) + (rng ? o.sigmaM * rng.normal() : 0) + (o.arcBlunders?.[k] ?? 0),
    sigmaM: o.sigmaM,
  }));
  return {
    format: 'arcfield-campaign', version: 1, name: 'simulated campaign (invented)',
    stations: o.latitudesDeg.map((_, i) => ({ code: stationCode(i) })),
    latitudeReadings, arcReadings,
  };
}
