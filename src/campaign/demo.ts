// The demo campaign: an invented meridian survey whose answer is known.
//
// Scenario (invented; no real place, crew or person): twelve stations K01…K12 on one meridian,
// geodetic latitudes from 8°07′ to 61°54′ N, heights 150–1900 m. The truth is the WGS 84 ellipsoid
// (a = 6 378 137 m, 1/f = 298.257 223 563). Arc distances between consecutive stations are made
// EXACTLY from that ellipsoid — meridian distance G(φ₂) − G(φ₁) from src/geodesy (checked against
// GeographicLib to 0.1 mm) — then carried up to the line's mean height (s = s₀·(M + h)/M, the
// inverse of the reduction in reduce-arc.ts) and given seeded Gaussian noise at their stated sigma.
// Astronomic latitudes are the geodetic ones plus a small invented deflection of the vertical
// (|ξ| ≤ 0.06″ — real deflections are often several arcseconds and would dominate the error of a
// campaign this size; they are kept small here so that the recovery can be checked tightly) plus
// seeded noise at the stated sigma of each repeat (0.2–0.25″, zenith-camera grade, 10–12 repeats);
// four stations also have a GNSS (geodetic) reading. One reading is excluded by the crew (a normal
// reading, cloud).
//
// Planted blunders (DEMO_BLUNDERS): one astronomic repeat at K04 read 3.0″ too far north, one at
// K09 2.6″ too far south, and the arc K06–K07 25 m too long. `arcfield fit` on this file must
// flag exactly these and recover WGS 84 within the tolerance stated in README.md.
import { ellipsoidById, meridianArcM, meridianRadiusM } from '../geodesy/index.ts';
import { CAMPAIGN_FILE_FORMAT, CAMPAIGN_FILE_VERSION, type ArcReading, type CampaignFile, type LatitudeReading, type Station } from './records.ts';
import { seededRandom } from './seeded-random.ts';

/**
 * Noise seed. Chosen (by trying seeds 20260600…20260639 in order) as one whose noise alone puts no
 * reading beyond 2.5σ, so that the planted blunders are exactly the readings a correct fit flags.
 */
export const DEMO_SEED = 20260615;
export const DEMO_ELLIPSOID_ID = 'wgs84';

/** Reading ids of the planted blunders (scenario constants, not results). */
export const DEMO_BLUNDERS = {
  latitudeReadingIds: ['r-K04-3', 'r-K09-5'],
  arcReadingIds: ['a-K06-K07'],
} as const;

/** A scenario station: inputs of the generator (invented), exported for the tests. */
export interface DemoStation {
  code: string;
  /** Geodetic latitude: degrees, minutes, seconds north. */
  dms: [number, number, number];
  heightM: number;
  /** Invented north–south deflection ξ = Φ − φ, arcseconds. */
  deflectionArcsec: number;
  repeats: number;
  sigmaArcsec: number;
  gnss: boolean;
}

export const DEMO_STATIONS: readonly DemoStation[] = [
  { code: 'K01', dms: [8, 7, 12.4], heightM: 152, deflectionArcsec: 0.04, repeats: 10, sigmaArcsec: 0.2, gnss: true },
  { code: 'K02', dms: [12, 51, 3.9], heightM: 318, deflectionArcsec: -0.03, repeats: 11, sigmaArcsec: 0.2, gnss: false },
  { code: 'K03', dms: [17, 27, 40.2], heightM: 611, deflectionArcsec: 0.05, repeats: 12, sigmaArcsec: 0.2, gnss: false },
  { code: 'K04', dms: [22, 18, 55.7], heightM: 1240, deflectionArcsec: -0.05, repeats: 12, sigmaArcsec: 0.25, gnss: true },
  { code: 'K05', dms: [27, 1, 8.1], heightM: 1896, deflectionArcsec: 0.06, repeats: 10, sigmaArcsec: 0.25, gnss: false },
  { code: 'K06', dms: [31, 46, 30.6], heightM: 1422, deflectionArcsec: 0.0, repeats: 12, sigmaArcsec: 0.2, gnss: false },
  { code: 'K07', dms: [36, 34, 47.3], heightM: 905, deflectionArcsec: -0.04, repeats: 10, sigmaArcsec: 0.2, gnss: true },
  { code: 'K08', dms: [41, 12, 14.8], heightM: 488, deflectionArcsec: 0.02, repeats: 11, sigmaArcsec: 0.2, gnss: false },
  { code: 'K09', dms: [46, 3, 2.5], heightM: 270, deflectionArcsec: -0.05, repeats: 12, sigmaArcsec: 0.25, gnss: false },
  { code: 'K10', dms: [51, 19, 49.0], heightM: 633, deflectionArcsec: 0.04, repeats: 10, sigmaArcsec: 0.2, gnss: false },
  { code: 'K11', dms: [56, 44, 21.7], heightM: 1107, deflectionArcsec: -0.02, repeats: 11, sigmaArcsec: 0.2, gnss: true },
  { code: 'K12', dms: [61, 54, 5.3], heightM: 742, deflectionArcsec: 0.03, repeats: 10, sigmaArcsec: 0.25, gnss: false },
];

/** Sigma of the GNSS geodetic readings: 0.002″ ≈ 6 cm on the ground. */
const GNSS_SIGMA_ARCSEC = 0.002;
/** The demo's arc blunders in metres (scenario constants). */
export const DEMO_ARC_BLUNDERS_M: Readonly<Record<string, number>> = { 'a-K06-K07': 25 };
/** Arc distance sigma: 1 part in 500 000 of the distance (triangulation-grade chain), rounded to cm. */
const ARC_RELATIVE_SIGMA = 2e-6;
const DEMO_LONGITUDE_DEG = 21.5;

const BLUNDER_LATITUDE_ARCSEC: Record<string, number> = { 'r-K04-3': 3.0, 'r-K09-5': -2.6 };
/** The crew's own exclusion: a normal reading, left out for cloud. */
const EXCLUDED_READING = 'r-K02-6';

const toDeg = ([d, m, s]: [number, number, number]): number => d + m / 60 + s / 3600;
const round = (v: number, decimals: number): number => Number(v.toFixed(decimals));

function instant(dayOffset: number, minuteOfNight: number): string {
  const start = Date.UTC(2026, 5, 2, 19, 30, 0);
  return new Date(start + dayOffset * 86_400_000 + minuteOfNight * 60_000).toISOString().replace('.000Z', 'Z');
}

/** The demo campaign file (deterministic for a given seed). */
export function demoCampaign(seed = DEMO_SEED): CampaignFile {
  const rng = seededRandom(seed);
  const ellipsoid = ellipsoidById(DEMO_ELLIPSOID_ID);
  const stations: Station[] = DEMO_STATIONS.map((s) => ({
    code: s.code, heightM: s.heightM, longitudeDeg: DEMO_LONGITUDE_DEG,
    name: `Demo station ${s.code} (invented)`,
  }));
  const latitudeReadings: LatitudeReading[] = [];
  DEMO_STATIONS.forEach((s, si) => {
    const geodeticDeg = toDeg(s.dms);
    for (let k = 1; k <= s.repeats; k++) {
      const id = `r-${s.code}-${k}`;
      const errorArcsec = s.sigmaArcsec * rng.normal() + (BLUNDER_LATITUDE_ARCSEC[id] ?? 0);
      latitudeReadings.push({
        id, station: s.code, kind: 'astronomic',
        latitudeDeg: round(geodeticDeg + (s.deflectionArcsec + errorArcsec) / 3600, 9),
        sigmaArcsec: s.sigmaArcsec,
        observedAt: instant(si * 6 + Math.floor((k - 1) / 4), 20 * ((k - 1) % 4)),
        method: 'zenith distances of a north–south star pair',
        observer: si % 2 === 0 ? 'crew A' : 'crew B',
      });
    }
    if (s.gnss) {
      latitudeReadings.push({
        id: `g-${s.code}`, station: s.code, kind: 'geodetic',
        latitudeDeg: round(geodeticDeg + (GNSS_SIGMA_ARCSEC * rng.normal()) / 3600, 9),
        sigmaArcsec: GNSS_SIGMA_ARCSEC,
        observedAt: instant(si * 6 + 3, 600),
        method: 'GNSS static, 4 h session',
        observer: 'crew C',
      });
    }
  });
  const arcReadings: ArcReading[] = [];
  for (let i = 0; i + 1 < DEMO_STATIONS.length; i++) {
    const from = DEMO_STATIONS[i];
    const to = DEMO_STATIONS[i + 1];
    const id = `a-${from.code}-${to.code}`;
    const phi1 = toDeg(from.dms);
    const phi2 = toDeg(to.dms);
    const onEllipsoid = meridianArcM(ellipsoid, phi1, phi2);
    // Every other arc carries its own mean height; the rest rely on the two station heights.
    const ownHeight = i % 2 === 0 ? Math.round((from.heightM + to.heightM) / 2 + 80 * Math.sin(i)) : undefined;
    const h = ownHeight ?? (from.heightM + to.heightM) / 2;
    const radius = meridianRadiusM(ellipsoid, (phi1 + phi2) / 2);
    const atHeight = (onEllipsoid * (radius + h)) / radius;
    const sigmaM = round(ARC_RELATIVE_SIGMA * atHeight, 2);
    arcReadings.push({
      id, fromStation: from.code, toStation: to.code,
      distanceM: round(atHeight + sigmaM * rng.normal() + (DEMO_ARC_BLUNDERS_M[id] ?? 0), 3),
      sigmaM,
      ...(ownHeight !== undefined ? { meanHeightM: ownHeight } : {}),
      observedAt: instant(i * 6 + 5, 0),
      method: 'triangulation chain, reduced to the meridian',
    });
  }
  return {
    format: CAMPAIGN_FILE_FORMAT,
    version: CAMPAIGN_FILE_VERSION,
    id: 'demo-k-meridian',
    name: 'Demo: K-meridian arc (invented)',
    description:
      'An invented campaign generated by arcfield from the WGS 84 ellipsoid with seeded noise and three ' +
      'planted blunders (r-K04-3, r-K09-5, a-K06-K07). Stations, crews and places are fictitious.',
    settings: { model: 'ellipsoid', estimator: 'least-squares', weighting: 'propagated', suspectThreshold: 3, referenceEllipsoid: DEMO_ELLIPSOID_ID, latitudeKind: 'astronomic' },
    stations,
    latitudeReadings,
    arcReadings,
    exclusions: [{
      id: 'x-001', readingId: EXCLUDED_READING, excludedBy: 'crew B lead',
      reason: 'cloud passed during the set', at: instant(8, 900),
    }],
  };
}
