// Test campaigns whose arcs come from GeographicLib (geographiclib-geodesic, the outside reference
// for meridian distances): stations on one meridian, one astronomic reading each (zero deflection),
// arcs between consecutive stations, optional seeded noise and blunders.
import geodesic from 'geographiclib-geodesic';
import type { CampaignRecords, LatitudeReading, ArcReading } from '../../../src/campaign/index.ts';
import { seededRandom } from '../../../src/campaign/seeded-random.ts';

export interface ExactCampaignOptions {
  a: number;
  f: number;
  latitudesDeg: readonly number[];
  sigmaArcsec?: number;
  sigmaM?: number;
  /** Seeded Gaussian noise at the stated sigmas (latitudes and distances); none when absent. */
  seed?: number;
  /** Added to the distance of arc i (metres). */
  arcBlunders?: Record<number, number>;
  heightM?: number;
}

/** Meridian arc length between two latitudes from GeographicLib's inverse problem along longitude 0. */
export function geographicLibArcM(a: number, f: number, lat1: number, lat2: number): number {
  const g = new geodesic.Geodesic.Geodesic(a, f);
  return g.Inverse(lat1, 0, lat2, 0).s12 ?? Number.NaN;
}

export function exactCampaign(o: ExactCampaignOptions): CampaignRecords {
  const sigmaArcsec = o.sigmaArcsec ?? 0.01;
  const sigmaM = o.sigmaM ?? 0.01;
  const rng = o.seed !== undefined ? seededRandom(o.seed) : null;
  const code = (i: number): string => `K${String(i + 1).padStart(2, '0')}`;
  const latitudeReadings: LatitudeReading[] = o.latitudesDeg.map((lat, i) => ({
    id: `r-${i + 1}`, station: code(i), kind: 'astronomic',
    latitudeDeg: lat + (rng ? (sigmaArcsec * rng.normal()) / 3600 : 0), sigmaArcsec, observedAt: '2026-06-02T21:14:00Z',
  }));
  const arcReadings: ArcReading[] = [];
  for (let i = 0; i + 1 < o.latitudesDeg.length; i++) {
    const s = geographicLibArcM(o.a, o.f, o.latitudesDeg[i], o.latitudesDeg[i + 1]);
    arcReadings.push({
      id: `a-${i + 1}`, fromStation: code(i), toStation: code(i + 1),
      distanceM: s + (rng ? sigmaM * rng.normal() : 0) + (o.arcBlunders?.[i] ?? 0), sigmaM,
      ...(o.heightM !== undefined ? { meanHeightM: o.heightM } : {}),
    });
  }
  return {
    name: 'exact test campaign (invented)',
    stations: o.latitudesDeg.map((_, i) => ({ code: code(i) })),
    latitudeReadings,
    arcReadings,
  };
}
