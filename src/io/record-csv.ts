// One campaign table as RFC 4180 CSV text (see record-tables.ts for the columns).
import { InputError } from '../errors.ts';
import type { CampaignFile } from '../campaign/records.ts';
import { writeCsv, type CsvCell } from './csv-writer.ts';
import { RECORD_TABLES, tableRecords, type RecordColumn, type RecordTableId } from './record-tables.ts';
import { toUtcInstant } from './utc-instant.ts';

function valueAt(record: object, path: readonly string[]): unknown {
  let cur: unknown = record;
  for (const key of path) {
    if (cur === null || typeof cur !== 'object') return undefined;
    cur = (cur as Record<string, unknown>)[key];
  }
  return cur;
}

function toCell(value: unknown, column: RecordColumn, where: string): CsvCell {
  if (value === undefined || value === null) return null;
  switch (column.type) {
    case 'number':
      if (typeof value === 'number' && Number.isFinite(value)) return { kind: 'number', value };
      break;
    case 'text':
      if (typeof value === 'string') return { kind: 'text', value };
      break;
    case 'code':
      if (typeof value === 'string') return { kind: 'code', value };
      break;
    case 'instant':
      if (typeof value === 'string') return { kind: 'code', value: toUtcInstant(value, where) };
      break;
  }
  // Records reaching export have passed the schema; anything else is a programmer error upstream.
  throw new InputError(where, value, `not a valid ${column.type} for column ${column.name}`);
}

/** The CSV text of one record table of the campaign. */
export function recordTableCsv(file: CampaignFile, table: RecordTableId): string {
  const def = RECORD_TABLES[table];
  const rows = tableRecords(file, table).map((record, i) =>
    def.columns.map((c) => toCell(valueAt(record, c.path), c, `${table}[${i}].${c.path.join('.')}`)));
  return writeCsv(def.columns.map((c) => c.name), rows);
}
