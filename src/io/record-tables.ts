// The CSV tables of a campaign's records: one table per record collection, column names in
// snake_case with the unit in the name (`distance_m`, `sigma_arcsec`), and GNSS fixes (nested in
// latitude readings in the campaign file) flattened into their own table keyed by `reading_id`.
// The same definitions drive export and import, so both agree on every name and unit.
import type { CampaignFile } from '../campaign/records.ts';

/**
 * How a column is written and read:
 * - `text`: free text, formula-guarded on export and unguarded on import;
 * - `code`: ids, station codes and enum values (the schema restricts their characters);
 * - `number`: typed number, never guarded;
 * - `instant`: ISO 8601 date-time, exported in UTC with Z.
 */
export type ColumnType = 'text' | 'code' | 'number' | 'instant';

export interface RecordColumn {
  /** Header name in the CSV file. */
  name: string;
  /** Field path inside the record, e.g. ['enteredDistance', 'value']. */
  path: readonly string[];
  type: ColumnType;
  /** Shown by `--help` and the app's column-mapping step. */
  description: string;
  /** The record's schema needs a value (a hint for the mapping step; the schema has the last word). */
  required: boolean;
}

export const RECORD_TABLE_IDS = ['stations', 'latitude', 'arc', 'exclusions', 'gnss-fixes'] as const;
export type RecordTableId = (typeof RECORD_TABLE_IDS)[number];

export interface RecordTable {
  id: RecordTableId;
  /** The campaign-file collection the rows belong to. */
  collection: 'stations' | 'latitudeReadings' | 'arcReadings' | 'exclusions';
  columns: readonly RecordColumn[];
}

const col = (name: string, path: readonly string[], type: ColumnType, description: string, required = false): RecordColumn =>
  ({ name, path, type, description, required });
const req = (name: string, path: readonly string[], type: ColumnType, description: string): RecordColumn =>
  col(name, path, type, description, true);

export const RECORD_TABLES: Readonly<Record<RecordTableId, RecordTable>> = {
  stations: {
    id: 'stations',
    collection: 'stations',
    columns: [
      req('code', ['code'], 'code', 'station code, e.g. K01'),
      col('name', ['name'], 'text', 'optional name'),
      col('height_m', ['heightM'], 'number', 'height in metres'),
      col('longitude_deg', ['longitudeDeg'], 'number', 'longitude, decimal degrees, east positive'),
      col('notes', ['notes'], 'text', 'free notes'),
      col('id', ['id'], 'code', 'optional record id'),
    ],
  },
  latitude: {
    id: 'latitude',
    collection: 'latitudeReadings',
    columns: [
      req('id', ['id'], 'code', 'reading id'),
      req('station', ['station'], 'code', 'station code'),
      req('kind', ['kind'], 'code', 'astronomic or geodetic'),
      req('latitude_deg', ['latitudeDeg'], 'number', 'latitude, decimal degrees, north positive'),
      req('sigma_arcsec', ['sigmaArcsec'], 'number', 'standard deviation, arcseconds'),
      req('observed_at', ['observedAt'], 'instant', 'time of the reading, ISO 8601 with Z or an offset'),
      col('method', ['method'], 'text', 'method note'),
      col('entered_text', ['enteredText'], 'text', 'the latitude as typed'),
      col('observer', ['observer'], 'text', 'who observed'),
    ],
  },
  arc: {
    id: 'arc',
    collection: 'arcReadings',
    columns: [
      req('id', ['id'], 'code', 'reading id'),
      req('from_station', ['fromStation'], 'code', 'station code at one end'),
      req('to_station', ['toStation'], 'code', 'station code at the other end'),
      req('distance_m', ['distanceM'], 'number', 'measured distance, metres'),
      req('sigma_m', ['sigmaM'], 'number', 'standard deviation of the distance, metres'),
      col('entered_distance_value', ['enteredDistance', 'value'], 'number', 'the distance as entered, in entered_distance_unit'),
      col('entered_distance_unit', ['enteredDistance', 'unit'], 'code', 'm, km, ft, us-ft or toise'),
      col('mean_height_m', ['meanHeightM'], 'number', 'mean height of the line, metres'),
      col('observed_at', ['observedAt'], 'instant', 'time of the measurement, ISO 8601 with Z or an offset'),
      col('method', ['method'], 'text', 'method note'),
    ],
  },
  exclusions: {
    id: 'exclusions',
    collection: 'exclusions',
    columns: [
      req('id', ['id'], 'code', 'exclusion id'),
      req('reading_id', ['readingId'], 'code', 'id of the excluded reading'),
      req('excluded_by', ['excludedBy'], 'text', 'who excluded it'),
      req('reason', ['reason'], 'text', 'why'),
      req('excluded_at', ['at'], 'instant', 'when, ISO 8601 with Z or an offset'),
    ],
  },
  'gnss-fixes': {
    id: 'gnss-fixes',
    collection: 'latitudeReadings',
    columns: [
      req('reading_id', ['readingId'], 'code', 'id of the geodetic latitude reading the fix belongs to'),
      req('fix_time', ['fixTime'], 'instant', 'time of the fix, ISO 8601 with Z or an offset'),
      req('latitude_deg', ['latitudeDeg'], 'number', 'latitude, decimal degrees'),
      req('longitude_deg', ['longitudeDeg'], 'number', 'longitude, decimal degrees'),
      req('accuracy_m', ['accuracyM'], 'number', 'horizontal accuracy, metres (platform estimate; confidence level varies by OS)'),
      col('altitude_m', ['altitudeM'], 'number', 'altitude, metres, as the device reports it'),
    ],
  },
};

/** The flat rows of one table as plain objects (GNSS fixes carry their reading's id). */
export function tableRecords(file: CampaignFile, table: RecordTableId): readonly object[] {
  switch (table) {
    case 'stations': return file.stations;
    case 'latitude': return file.latitudeReadings;
    case 'arc': return file.arcReadings;
    case 'exclusions': return file.exclusions ?? [];
    case 'gnss-fixes':
      return file.latitudeReadings.flatMap((r) => (r.gnssFixes ?? []).map((f) => ({ readingId: r.id, ...f })));
  }
}

export function isRecordTableId(value: string): value is RecordTableId {
  return (RECORD_TABLE_IDS as readonly string[]).includes(value);
}
