// Record tables to CSV and back, and the import's refusals: every bad row named with row, column,
// value and reason, and nothing returned from a rejected file.
import { describe, expect, it } from 'vitest';
import { recordTableCsv } from '../../src/io/record-csv.ts';
import { importCsvTable, matchColumns } from '../../src/io/csv-import.ts';
import { RECORD_TABLE_IDS, type RecordTableId } from '../../src/io/record-tables.ts';
import { readCsv } from '../../src/io/csv-reader.ts';
import { ValidationError, type Problem } from '../../src/errors.ts';
import type { CampaignFile } from '../../src/campaign/records.ts';
import { sampleCampaign } from './sample-campaign.ts';

function problemsOf(fn: () => unknown): Problem[] {
  try {
    fn();
  } catch (err) {
    if (err instanceof ValidationError) return [...err.problems];
    throw err;
  }
  return expect.fail('expected a ValidationError');
}

/** The sample with every instant in Z form, as a CSV export writes them (an offset form is converted). */
function sampleInZ(): CampaignFile {
  const c = sampleCampaign();
  c.latitudeReadings[1].observedAt = '2026-06-02T21:14:00.125Z';
  return c;
}

function emptyOf(c: CampaignFile, table: RecordTableId): CampaignFile {
  const e = structuredClone(c);
  if (table === 'stations') e.stations = [];
  if (table === 'latitude') e.latitudeReadings = [];
  if (table === 'arc') e.arcReadings = [];
  if (table === 'exclusions') e.exclusions = [];
  if (table === 'gnss-fixes') for (const r of e.latitudeReadings) delete r.gnssFixes;
  return e;
}

describe('record tables as CSV', () => {
  it('writes the arc table with unit-named headers, typed numbers and UTC times', () => {
    expect(recordTableCsv(sampleCampaign(), 'arc')).toBe(
      'id,from_station,to_station,distance_m,sigma_m,entered_distance_value,entered_distance_unit,mean_height_m,observed_at,method\r\n' +
      'a-001,K01,K02,221870.412,0.25,727921.299,ft,380,,\r\n' +
      'a-002,K02,K03,110574.5,0.3,,,,2026-06-05T10:00:00Z,"chain, two passes"\r\n');
  });

  it('guards formula-like free text, leaves the negative latitude alone, converts the offset time to Z', () => {
    const t = readCsv(recordTableCsv(sampleCampaign(), 'latitude'));
    const col = (name: string): number => t.header.indexOf(name);
    expect(t.records[2].cells[col('latitude_deg')]).toBe('-33.8688');
    expect(t.records[2].cells[col('method')]).toBe("'=1+1");
    expect(t.records[3].cells[col('method')]).toBe("'-north star, then @south");
    expect(t.records[1].cells[col('observed_at')]).toBe('2026-06-02T21:14:00.125Z');
    expect(t.records[0].cells[col('method')]).toBe('star pairs, "Talcott" style');
  });

  it('flattens GNSS fixes into their own table keyed by reading id', () => {
    expect(recordTableCsv(sampleCampaign(), 'gnss-fixes')).toBe(
      'reading_id,fix_time,latitude_deg,longitude_deg,accuracy_m,altitude_m\r\n' +
      'r-003,2026-06-03T01:59:10Z,-33.86880004,-3.2500001,3.5,512.1\r\n' +
      'r-003,2026-06-03T01:59:40Z,-33.86879996,-3.2499999,4,\r\n');
  });

  for (const table of RECORD_TABLE_IDS) {
    it(`round-trips the ${table} table: export, import into the campaign without it, same records`, () => {
      const original = sampleInZ();
      const csv = recordTableCsv(original, table);
      // Stations are replaced (the readings need them); the others are imported into an emptied table.
      let { file } = importCsvTable(emptyOf(original, table), csv, { table, mode: table === 'stations' ? 'replace' : 'append' });
      // The latitude table does not carry the nested GNSS fixes: they come back with their own table.
      if (table === 'latitude') file = importCsvTable(file, recordTableCsv(original, 'gnss-fixes'), { table: 'gnss-fixes' }).file;
      expect(file).toEqual(original);
    });
  }
});

describe('CSV import', () => {
  const header = 'id,station,kind,latitude_deg,sigma_arcsec,observed_at,method\r\n';

  it('appends valid rows and leaves the input campaign untouched', () => {
    const before = sampleCampaign();
    const snapshot = structuredClone(before);
    const csv = header + 'r-101,K04,astronomic,14.5,0.3,2026-06-06T20:00:00Z,"a, b"\r\n';
    const { file, imported } = importCsvTable(before, csv, { table: 'latitude' });
    expect(imported).toBe(1);
    expect(file.latitudeReadings.at(-1)).toEqual({ id: 'r-101', station: 'K04', kind: 'astronomic', latitudeDeg: 14.5, sigmaArcsec: 0.3, observedAt: '2026-06-06T20:00:00Z', method: 'a, b' });
    expect(before).toEqual(snapshot);
  });

  it('reports every bad row with row, column, value and reason, and returns nothing', () => {
    const csv = header +
      'r-101,K04,astronomic,14.5,0.3,2026-06-06T20:00:00Z,ok\r\n' +
      'r-102,K04,astronomic,"14,5",0.3,2026-06-06T20:00:00Z,comma decimal\r\n' +
      'r-103,K04,astral,14.5,0.3,2026-06-06T20:00:00Z,bad kind\r\n' +
      'r-104,K04,astronomic,14.5,-0.3,2026-06-06T20:00:00Z,negative sigma\r\n' +
      'r-105,K04,astronomic,14.5,0.3,2026-06-06 20:00,no offset\r\n' +
      'r-106,K99,astronomic,14.5,0.3,2026-06-06T20:00:00Z,unknown station\r\n' +
      'r-001,K04,astronomic,14.5,0.3,2026-06-06T20:00:00Z,duplicate id\r\n' +
      'r-108,K04,astronomic,,0.3,2026-06-06T20:00:00Z,empty latitude\r\n' +
      'r-109,K04,astronomic,95,0.3,2026-06-06T20:00:00Z,beyond the pole\r\n' +
      'r-110,K04,astronomic,14.5 deg,0.3,2026-06-06T20:00:00Z,unit in cell\r\n';
    const problems = problemsOf(() => importCsvTable(sampleCampaign(), csv, { table: 'latitude', source: 'night2.csv' }));
    const brief = problems.map((p) => [p.field, p.value, p.reason]);
    // Sorted by row: the cell checks and the cross-record checks interleave as the crew reads the sheet.
    expect(brief).toEqual([
      ['row 3, column latitude_deg', '14,5', 'use a point as the decimal separator, not a comma'],
      ['row 4, column kind', 'astral', 'astronomic or geodetic'],
      ['row 5, column sigma_arcsec', '-0.3', 'sigma must be greater than 0'],
      ['row 6, column observed_at', '2026-06-06 20:00', 'an ISO 8601 date-time with Z or an offset'],
      ['row 7, column station', 'K99', 'no station with this code in stations'],
      ['row 8, column id', 'r-001', 'duplicate id (also latitudeReadings[0].id)'],
      ['row 9, column latitude_deg', '', 'a value is required; the cell is empty or the column is missing'],
      ['row 10, column latitude_deg', '95', 'above 90°'],
      ['row 11, column latitude_deg', '14.5 deg', 'a plain number is expected; the unit belongs in the header name'],
    ]);
    expect(problems.every((p) => p.source === 'night2.csv')).toBe(true);
  });

  it('applies a column mapping from the file\'s own headers and names mapped columns in messages', () => {
    const csv = 'Reading,Stn,Type,Lat (deg),"Sigma ("")",When\r\nr-201,K04,geodetic,14.5,0,2026-06-06T20:00:00Z\r\n';
    const mapping = { id: 'Reading', station: 'Stn', kind: 'Type', latitude_deg: 'Lat (deg)', sigma_arcsec: 'Sigma (")', observed_at: 'When' };
    const problems = problemsOf(() => importCsvTable(sampleCampaign(), csv, { table: 'latitude', mapping }));
    expect(problems.map((p) => [p.field, p.value])).toEqual([['row 2, column Sigma (") (sigma_arcsec)', '0']]);
    const ok = importCsvTable(sampleCampaign(), csv.replace(',0,', ',0.002,'), { table: 'latitude', mapping });
    expect(ok.file.latitudeReadings.at(-1)?.sigmaArcsec).toBe(0.002);
  });

  it('refuses unknown and missing columns before reading any row', () => {
    const csv = 'id,station,kind,latitude_deg,sigma,observed_at\r\nr-1,K01,astronomic,1,0.3,2026-06-06T20:00:00Z\r\n';
    const problems = problemsOf(() => importCsvTable(sampleCampaign(), csv, { table: 'latitude' }));
    expect(problems.map((p) => p.field)).toEqual(['row 1, column sigma', 'column sigma_arcsec']);
    expect(problems[0].reason).toMatch(/not a column of the latitude table/);
  });

  it('a row with the wrong number of cells is named with its line', () => {
    const csv = header + 'r-1,K01,astronomic,1,0.3\r\n';
    const problems = problemsOf(() => importCsvTable(sampleCampaign(), csv, { table: 'latitude' }));
    expect(problems[0].field).toBe('row 2');
    expect(problems[0].reason).toMatch(/5 cells but the header has 7 columns \(line 2\)/);
  });

  it('creates missing stations only when asked, and ids only when the file has none', () => {
    const csv = 'station,kind,latitude_deg,sigma_arcsec,observed_at\r\nK20,astronomic,20,0.3,2026-06-06T20:00:00Z\r\nK21,astronomic,21,0.3,2026-06-06T21:00:00Z\r\n';
    expect(problemsOf(() => importCsvTable(sampleCampaign(), csv, { table: 'latitude' })).map((p) => p.field)).toEqual(['column id']);
    let n = 0;
    const newId = (): string => `gen-${++n}`;
    expect(problemsOf(() => importCsvTable(sampleCampaign(), csv, { table: 'latitude', newId })).map((p) => p.value)).toEqual(['K20', 'K21']);
    const ok = importCsvTable(sampleCampaign(), csv, { table: 'latitude', newId, addMissingStations: true });
    expect(ok.addedStations).toEqual(['K20', 'K21']);
    expect(ok.file.latitudeReadings.slice(-2).map((r) => r.id)).toEqual(['gen-3', 'gen-4']);
  });

  it('replace mode keeps the GNSS fixes of readings it re-imports by id', () => {
    const original = sampleInZ();
    const { file } = importCsvTable(original, recordTableCsv(original, 'latitude'), { table: 'latitude', mode: 'replace' });
    expect(file).toEqual(original);
  });

  it('replace mode that would orphan an exclusion is refused, naming the campaign field', () => {
    const csv = header + 'r-900,K01,astronomic,12.3,0.3,2026-06-06T20:00:00Z,\r\n';
    const problems = problemsOf(() => importCsvTable(sampleCampaign(), csv, { table: 'latitude', mode: 'replace' }));
    expect(problems.map((p) => [p.field, p.value])).toEqual([['campaign exclusions[0].readingId', 'r-002']]);
  });

  it('matchColumns proposes the mapping for the app\'s mapping step', () => {
    const m = matchColumns(['ID', ' station ', 'Distance', 'sigma_m', 'junk'], 'arc', { distance_m: 'Distance' }, ['junk']);
    expect([...m.columns.entries()]).toEqual([['distance_m', 2], ['id', 0], ['sigma_m', 3]]);
    expect(m.unmatchedHeaders).toEqual([' station ']);
    expect(m.missingRequired).toEqual(['from_station', 'to_station']);
  });
});
