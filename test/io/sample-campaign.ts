// A small invented campaign for the io tests (station codes K01…K04, no real place or person).
// Values are typed by hand; nothing here is computed by the code under test.
import type { CampaignFile } from '../../src/campaign/records.ts';

export function sampleCampaign(): CampaignFile {
  return {
    format: 'arcfield-campaign',
    version: 1,
    name: 'Invented ridge season',
    stations: [
      { code: 'K01', heightM: 240, longitudeDeg: -3.25, name: 'North cairn' },
      { code: 'K02', heightM: 512.5, longitudeDeg: -3.25, notes: '=HYPERLINK("x")' },
      { code: 'K03', longitudeDeg: 151.2093, notes: 'line one\nline two' },
      { code: 'K04', heightM: -12 },
    ],
    latitudeReadings: [
      { id: 'r-001', station: 'K01', kind: 'astronomic', latitudeDeg: 12.3456789, sigmaArcsec: 0.4, observedAt: '2026-06-02T21:14:00Z', method: 'star pairs, "Talcott" style', observer: 'crew A' },
      { id: 'r-002', station: 'K01', kind: 'astronomic', latitudeDeg: 12.3456812, sigmaArcsec: 0.4, observedAt: '2026-06-02T23:14:00.125+02:00', enteredText: '12°20\'44.45"N' },
      { id: 'r-003', station: 'K02', kind: 'geodetic', latitudeDeg: -33.8688, sigmaArcsec: 0.002, observedAt: '2026-06-03T02:00:00Z', method: '=1+1',
        gnssFixes: [
          { latitudeDeg: -33.86880004, longitudeDeg: -3.2500001, accuracyM: 3.5, altitudeM: 512.1, fixTime: '2026-06-03T01:59:10Z' },
          { latitudeDeg: -33.86879996, longitudeDeg: -3.2499999, accuracyM: 4, fixTime: '2026-06-03T01:59:40Z' },
        ] },
      { id: 'r-004', station: 'K03', kind: 'astronomic', latitudeDeg: 14.0000001, sigmaArcsec: 0.35, observedAt: '2026-06-04T20:00:00Z', method: '-north star, then @south' },
    ],
    arcReadings: [
      { id: 'a-001', fromStation: 'K01', toStation: 'K02', distanceM: 221870.412, sigmaM: 0.25, enteredDistance: { value: 727921.299, unit: 'ft' }, meanHeightM: 380 },
      { id: 'a-002', fromStation: 'K02', toStation: 'K03', distanceM: 110574.5, sigmaM: 0.3, observedAt: '2026-06-05T10:00:00Z', method: 'chain, two passes' },
    ],
    exclusions: [
      { id: 'x-001', readingId: 'r-002', excludedBy: 'lead B', reason: 'cloud over the "south" star, repeat doubtful', at: '2026-06-03T08:00:00Z' },
    ],
  };
}
