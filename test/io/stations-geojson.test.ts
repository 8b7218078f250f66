// GeoJSON export of stations (RFC 7946): longitude first, ≤ 7 decimals, unlocated stations kept.
import { describe, expect, it } from 'vitest';
import { stationsGeoJson, stationsGeoJsonText } from '../../src/io/stations-geojson.ts';
import type { StationSummary } from '../../src/campaign/result.ts';
import { sampleCampaign } from './sample-campaign.ts';

// Hand-made summaries standing in for solveCampaign's station table (values typed, not computed).
const summaries: StationSummary[] = [
  { code: 'K01', latitudeDeg: 12.345680012345, sigmaArcsec: 0.28, kind: 'astronomic', readingCount: 2, spreadArcsec: 0.1, deflectionNorthArcsec: null, suspectReadingIds: [] },
  { code: 'K02', latitudeDeg: -33.86880000004, sigmaArcsec: 0.002, kind: 'geodetic', readingCount: 1, spreadArcsec: 0, deflectionNorthArcsec: 0.3, suspectReadingIds: ['r-003'] },
  { code: 'K04', latitudeDeg: 14.5, sigmaArcsec: 0.3, kind: 'astronomic', readingCount: 1, spreadArcsec: 0, deflectionNorthArcsec: null, suspectReadingIds: [] },
];

describe('stations as GeoJSON', () => {
  const fc = stationsGeoJson(sampleCampaign(), summaries);

  it('is a FeatureCollection with one Feature per station, in station order', () => {
    expect(fc.type).toBe('FeatureCollection');
    expect(fc.features.map((f) => f.properties.code)).toEqual(['K01', 'K02', 'K03', 'K04']);
  });

  it('puts the longitude first, in [-180, 180], and the adjusted latitude second (RFC 7946 §3.1.1)', () => {
    const k01 = fc.features[0].geometry;
    expect(k01).toEqual({ type: 'Point', coordinates: [-3.25, 12.34568] });
    for (const f of fc.features) {
      if (!f.geometry) continue;
      const [lon, lat] = f.geometry.coordinates;
      expect(lon).toBeGreaterThanOrEqual(-180);
      expect(lon).toBeLessThanOrEqual(180);
      expect(lat).toBeGreaterThanOrEqual(-90);
      expect(lat).toBeLessThanOrEqual(90);
      expect(lon).toBe(sampleCampaign().stations.find((s) => s.code === f.properties.code)?.longitudeDeg);
    }
    expect(fc.features[1].geometry?.coordinates).toEqual([-3.25, -33.8688]);
  });

  it('writes at most 7 decimals in coordinates and keeps full precision in properties', () => {
    const text = stationsGeoJsonText(sampleCampaign(), summaries);
    const coordinateNumbers = [...text.matchAll(/"coordinates": \[\s*([^\]]+)\]/g)].flatMap((m) => m[1].split(',').map((s) => s.trim()));
    expect(coordinateNumbers.length).toBe(4);
    for (const n of coordinateNumbers) expect((n.split('.')[1] ?? '').length).toBeLessThanOrEqual(7);
    expect(fc.features[0].properties.latitudeDeg).toBe(12.345680012345);
  });

  it('keeps a station with no latitude or no longitude as an unlocated feature (geometry null, RFC 7946 §3.2)', () => {
    expect(fc.features[2].geometry).toBeNull();
    expect(fc.features[2].properties.unlocatedReason).toBe('no latitude reading for this station');
    expect(fc.features[3].geometry).toBeNull();
    expect(fc.features[3].properties.unlocatedReason).toBe('no longitude recorded for this station');
  });

  it('carries latitude summaries and flags as properties', () => {
    expect(fc.features[1].properties).toMatchObject({ code: 'K02', latitudeKind: 'geodetic', latitudeSigmaArcsec: 0.002, suspect: true, suspectReadingIds: ['r-003'], deflectionNorthArcsec: 0.3, heightM: 512.5 });
    expect(fc.features[0].properties.excludedReadingIds).toEqual(['r-002']);
  });
});
