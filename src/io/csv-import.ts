// CSV import of one campaign table with a column mapping. Every cell is checked by the same record
// schema as the app and the sync server (src/campaign/records.ts), then the merged campaign passes
// the cross-record checks (unique ids, stations that exist, exclusions that point at a reading).
// Every problem is reported with the spreadsheet row, the file's column, the value and the reason;
// if there is any problem, nothing is returned to store — the caller writes only a whole, valid
// campaign (the CLI through a temporary file and a rename; the app in one transaction).
//
// Conventions (DEVELOPERS.md "CSV"): an empty cell is a missing value; code, number and instant
// cells are trimmed, free text is kept verbatim except for removing our own formula guard; a
// number is written with a decimal point and no thousands separator; a header the table does not
// know is refused unless it is mapped or listed as ignored, so a misspelt column never vanishes.
import { ValidationError, type Problem } from '../errors.ts';
import {
  GnssFixSchema, RECORD_SCHEMAS, StationSchema,
  type CampaignFile, type GnssFix, type LatitudeReading, type Station,
} from '../campaign/records.ts';
import { checkCampaignFile, formatFieldPath } from '../campaign/validate-campaign.ts';
import { readCsv, type CsvRecord } from './csv-reader.ts';
import { unguardFormula } from './formula-guard.ts';
import { RECORD_TABLES, type RecordColumn, type RecordTableId } from './record-tables.ts';

export type ImportMode = 'append' | 'replace';

export interface CsvImportOptions {
  table: RecordTableId;
  /** Our column name → the header name in the file. Columns not listed are matched by name (case and surrounding spaces ignored). */
  mapping?: Readonly<Record<string, string>>;
  /** Header names in the file to leave out on purpose. */
  ignore?: readonly string[];
  /** `append` (default) adds the rows to the table; `replace` replaces the whole table. */
  mode?: ImportMode;
  /** Create a bare station for every station code the rows use that the campaign lacks. */
  addMissingStations?: boolean;
  /** Makes a record id when the file has no id column (the app and the CLI pass a UUIDv7 maker). */
  newId?: () => string;
  /** A file name for the messages. */
  source?: string;
}

export interface CsvImportResult {
  file: CampaignFile;
  imported: number;
  addedStations: string[];
}

export interface ColumnMatch {
  /** Our column name → the index of the file column that feeds it. */
  columns: Map<string, number>;
  /** File headers that feed nothing (not mapped, not known, not ignored). */
  unmatchedHeaders: string[];
  /** Required columns with no file column. */
  missingRequired: string[];
}

const norm = (s: string): string => s.trim().toLowerCase();

/** Match the file's header to a table's columns: explicit mapping first, then by name. For the app's mapping step too. */
export function matchColumns(header: readonly string[], table: RecordTableId, mapping: Readonly<Record<string, string>> = {}, ignore: readonly string[] = []): ColumnMatch & { problems: Problem[] } {
  const def = RECORD_TABLES[table];
  const problems: Problem[] = [];
  const byHeader = new Map<string, number>();
  header.forEach((h, i) => {
    const key = norm(h);
    if (key === '') return;
    if (byHeader.has(key)) problems.push({ field: `row 1, column ${i + 1}`, value: h, reason: `duplicate column header (also column ${(byHeader.get(key) ?? 0) + 1})` });
    else byHeader.set(key, i);
  });
  const columns = new Map<string, number>();
  const used = new Set<number>();
  for (const [ours, theirs] of Object.entries(mapping)) {
    if (!def.columns.some((c) => c.name === ours)) {
      problems.push({ field: `mapping ${ours}`, value: ours, reason: `not a column of the ${table} table (columns: ${def.columns.map((c) => c.name).join(', ')})` });
      continue;
    }
    const index = byHeader.get(norm(theirs));
    if (index === undefined) {
      problems.push({ field: `mapping ${ours}`, value: theirs, reason: 'no column with this header in the file' });
      continue;
    }
    columns.set(ours, index);
    used.add(index);
  }
  for (const c of def.columns) {
    if (columns.has(c.name)) continue;
    const index = byHeader.get(norm(c.name));
    if (index !== undefined && !used.has(index)) {
      columns.set(c.name, index);
      used.add(index);
    }
  }
  const ignored = new Set(ignore.map(norm));
  const unmatchedHeaders = header.filter((h, i) => norm(h) !== '' && !used.has(i) && !ignored.has(norm(h)));
  const missingRequired = def.columns.filter((c) => c.required && !columns.has(c.name)).map((c) => c.name);
  return { columns, unmatchedHeaders, missingRequired, problems };
}

const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** A number cell: a decimal point, no thousands separators, no unit (units live in the header). */
function parseNumber(text: string): { value: number } | { reason: string } {
  if (DECIMAL.test(text)) {
    const value = Number(text);
    return Number.isFinite(value) ? { value } : { reason: 'too large to be a finite number' };
  }
  if (/^[+-]?\d+,\d+$/.test(text)) return { reason: 'use a point as the decimal separator, not a comma' };
  if (/^[+-]?\d{1,3}([ ,']\d{3})+(\.\d*)?$/.test(text)) return { reason: 'no thousands separators' };
  if (/^[+-]?(\d+\.?\d*|\.\d+)\s*[A-Za-z°'"″′]+$/.test(text)) return { reason: 'a plain number is expected; the unit belongs in the header name' };
  if (/^[+-]?(nan|inf|infinity)$/i.test(text)) return { reason: 'not a finite number' };
  return { reason: 'not a number' };
}

function setAt(target: Record<string, unknown>, path: readonly string[], value: unknown): void {
  let cur = target;
  for (let k = 0; k < path.length - 1; k++) {
    const next = cur[path[k]];
    if (next === undefined || next === null || typeof next !== 'object') cur[path[k]] = {};
    cur = cur[path[k]] as Record<string, unknown>;
  }
  cur[path[path.length - 1]] = value;
}

const samePath = (a: readonly PropertyKey[], b: readonly PropertyKey[]): boolean => a.length === b.length && a.every((k, i) => k === b[i]);

interface RowContext { record: CsvRecord; header: readonly string[]; columns: Map<string, number>; source: string }

function cellField(ctx: RowContext, column: RecordColumn | undefined, fallback: string): string {
  if (!column) return `row ${ctx.record.row}, ${fallback}`;
  const index = ctx.columns.get(column.name);
  if (index === undefined) return `row ${ctx.record.row}, column ${column.name} (not in the file)`;
  const theirs = ctx.header[index];
  return `row ${ctx.record.row}, column ${theirs}${norm(theirs) === column.name ? '' : ` (${column.name})`}`;
}

/** One CSV record → a raw record object, or problems naming its cells. */
function rowToObject(ctx: RowContext, columnsDef: readonly RecordColumn[], problems: Problem[]): Record<string, unknown> | null {
  const out: Record<string, unknown> = {};
  let ok = true;
  if (ctx.record.cells.length !== ctx.header.length) {
    problems.push({ field: `row ${ctx.record.row}`, value: ctx.record.cells.length, reason: `has ${ctx.record.cells.length} cells but the header has ${ctx.header.length} columns (line ${ctx.record.line})`, source: ctx.source });
    return null;
  }
  for (const column of columnsDef) {
    const index = ctx.columns.get(column.name);
    if (index === undefined) continue;
    const raw = ctx.record.cells[index];
    const text = column.type === 'text' ? raw : raw.trim();
    if (text === '') continue;
    if (column.type === 'number') {
      const parsed = parseNumber(text);
      if ('reason' in parsed) {
        problems.push({ field: cellField(ctx, column, ''), value: raw, reason: parsed.reason, source: ctx.source });
        ok = false;
        continue;
      }
      setAt(out, column.path, parsed.value);
    } else {
      setAt(out, column.path, column.type === 'text' ? unguardFormula(text) : text);
    }
  }
  return ok ? out : null;
}

interface SchemaLike { safeParse(input: unknown): { success: true; data: unknown } | { success: false; error: { issues: readonly { path: readonly PropertyKey[]; message: string; code: string }[] } } }

function schemaProblems(ctx: RowContext, columnsDef: readonly RecordColumn[], input: Record<string, unknown>, schema: SchemaLike, problems: Problem[]): unknown {
  const parsed = schema.safeParse(input);
  if (parsed.success) return parsed.data;
  for (const issue of parsed.error.issues) {
    const column = columnsDef.find((c) => samePath(c.path, issue.path)) ?? columnsDef.find((c) => issue.path.length > 0 && c.path[0] === issue.path[0]);
    let value: unknown = undefined;
    if (column) {
      const index = ctx.columns.get(column.name);
      value = index === undefined ? undefined : ctx.record.cells[index];
    }
    const missing = value === undefined || (typeof value === 'string' && value.trim() === '');
    const reason = issue.code === 'invalid_type' && missing ? 'a value is required; the cell is empty or the column is missing' : issue.message;
    problems.push({ field: cellField(ctx, column, formatFieldPath(issue.path)), value: missing ? '' : value, reason, source: ctx.source });
  }
  return null;
}

const COLLECTION_OF: Record<RecordTableId, 'stations' | 'latitudeReadings' | 'arcReadings' | 'exclusions'> = {
  stations: 'stations', latitude: 'latitudeReadings', arc: 'arcReadings', exclusions: 'exclusions', 'gnss-fixes': 'latitudeReadings',
};

/**
 * Import one CSV table into a campaign. Returns the new campaign (the input is not modified), or
 * throws ValidationError listing every problem — in which case nothing must be stored.
 */
export function importCsvTable(campaign: CampaignFile, csvText: string, options: CsvImportOptions): CsvImportResult {
  const source = options.source ?? 'csv';
  const table = options.table;
  const def = RECORD_TABLES[table];
  const parsed = readCsv(csvText, source);
  const match = matchColumns(parsed.header, table, options.mapping, options.ignore);
  const problems: Problem[] = match.problems.map((p) => ({ ...p, source }));
  for (const h of match.unmatchedHeaders) {
    problems.push({ field: `row 1, column ${h}`, value: h, reason: `not a column of the ${table} table: map it to one (columns: ${def.columns.map((c) => c.name).join(', ')}) or ignore it`, source });
  }
  const idColumn = def.columns.find((c) => c.name === 'id');
  const generateIds = idColumn?.required === true && !match.columns.has('id') && options.newId !== undefined;
  for (const name of match.missingRequired) {
    if (name === 'id' && generateIds) continue;
    problems.push({ field: `column ${name}`, value: '', reason: `required column missing from the file (map one of: ${parsed.header.join(', ')})`, source });
  }
  if (problems.length > 0) throw new ValidationError(problems, source);

  const header = parsed.header;
  const valid: { row: CsvRecord; value: unknown }[] = [];
  for (const record of parsed.records) {
    const ctx: RowContext = { record, header, columns: match.columns, source };
    const obj = rowToObject(ctx, def.columns, problems);
    if (!obj) continue;
    if (generateIds && options.newId) obj.id = options.newId();
    let value: unknown;
    if (table === 'gnss-fixes') {
      const { readingId, ...fix } = obj;
      const fixValue = schemaProblems(ctx, def.columns, fix, GnssFixSchema, problems);
      if (typeof readingId !== 'string') {
        problems.push({ field: cellField(ctx, def.columns[0], 'reading_id'), value: '', reason: 'a value is required; the cell is empty or the column is missing', source });
        continue;
      }
      if (fixValue === null) continue;
      value = { readingId, fix: fixValue };
    } else {
      const schema: SchemaLike = table === 'stations' ? StationSchema : RECORD_SCHEMAS[table === 'latitude' ? 'latitudeReading' : table === 'arc' ? 'arcReading' : 'exclusion'];
      value = schemaProblems(ctx, def.columns, obj, schema, problems);
      if (value === null) continue;
    }
    valid.push({ row: record, value });
  }
  // A header with no rows is a valid, empty table (our own export of an empty table): 0 rows imported.

  // Merge into a copy of the campaign (structuredClone: the caller's object stays untouched).
  const merged = structuredClone(campaign);
  const collection = COLLECTION_OF[table];
  let base = 0;
  const rowOfIndex = new Map<number, CsvRecord>();
  if (table === 'gnss-fixes') {
    const readings = new Map(merged.latitudeReadings.map((r) => [r.id, r]));
    if (options.mode === 'replace') for (const r of merged.latitudeReadings) delete r.gnssFixes;
    for (const { row, value } of valid) {
      const { readingId, fix } = value as { readingId: string; fix: GnssFix };
      const reading = readings.get(readingId);
      if (!reading) {
        const ctx: RowContext = { record: row, header, columns: match.columns, source };
        problems.push({ field: cellField(ctx, def.columns[0], 'reading_id'), value: readingId, reason: 'no latitude reading with this id in the campaign', source });
        continue;
      }
      (reading.gnssFixes ??= []).push(fix);
    }
  } else {
    const target = (merged[collection] ?? []) as unknown[];
    const kept = options.mode === 'replace' ? [] : target;
    if (options.mode === 'replace' && table === 'latitude') carryGnssFixes(merged.latitudeReadings, valid);
    base = kept.length;
    valid.forEach(({ row, value }, k) => {
      kept.push(value);
      rowOfIndex.set(base + k, row);
    });
    (merged as Record<string, unknown>)[collection] = kept;
  }

  const addedStations: string[] = [];
  if (options.addMissingStations && (table === 'latitude' || table === 'arc')) {
    const known = new Set(merged.stations.map((s) => s.code));
    const used = table === 'latitude'
      ? merged.latitudeReadings.map((r) => r.station)
      : merged.arcReadings.flatMap((a) => [a.fromStation, a.toStation]);
    for (const code of used) {
      if (known.has(code)) continue;
      known.add(code);
      const station: Station = { code };
      if (StationSchema.safeParse(station).success) {
        merged.stations.push(station);
        addedStations.push(code);
      }
    }
  }

  const check = checkCampaignFile(merged, source);
  if (!check.ok) {
    for (const p of check.problems) problems.push(relocate(p, collection, rowOfIndex, def.columns, header, match.columns, source));
  }
  if (problems.length > 0) throw new ValidationError(byRow(problems), source);
  if (!check.ok) throw new ValidationError(check.problems, source);
  return { file: check.file, imported: valid.length, addedStations };
}

/**
 * Replacing the latitude table must not drop GNSS fixes silently: the CSV latitude table has no
 * fixes (they are their own table), so a re-imported reading keeps the fixes its namesake had.
 */
function carryGnssFixes(old: readonly LatitudeReading[], incoming: readonly { value: unknown }[]): void {
  const fixes = new Map(old.filter((r) => r.gnssFixes !== undefined).map((r) => [r.id, r.gnssFixes]));
  for (const { value } of incoming) {
    const reading = value as LatitudeReading;
    const kept = fixes.get(reading.id);
    if (kept !== undefined && reading.gnssFixes === undefined) reading.gnssFixes = kept;
  }
}

/** Problems in spreadsheet order: file-level ones first, then by row (stable within a row). */
function byRow(problems: readonly Problem[]): Problem[] {
  const rowOf = (p: Problem): number => {
    const m = /^row (\d+)/.exec(p.field);
    return m ? Number(m[1]) : 0;
  };
  return problems.map((p, i) => ({ p, i })).sort((x, y) => rowOf(x.p) - rowOf(y.p) || x.i - y.i).map((e) => e.p);
}

/** A cross-record problem on an imported record, moved from `arcReadings[12].toStation` to its CSV row and column. */
function relocate(p: Problem, collection: string, rowOfIndex: ReadonlyMap<number, CsvRecord>, columnsDef: readonly RecordColumn[], header: readonly string[], columns: Map<string, number>, source: string): Problem {
  const m = /^([A-Za-z]+)\[(\d+)\](?:\.(.+))?$/.exec(p.field);
  if (!m || m[1] !== collection) return { ...p, field: `campaign ${p.field}` };
  const record = rowOfIndex.get(Number(m[2]));
  if (!record) return { ...p, field: `campaign ${p.field}` };
  const path = (m[3] ?? '').split('.').filter((s) => s !== '');
  const column = columnsDef.find((c) => samePath(c.path, path));
  const ctx: RowContext = { record, header, columns, source };
  return { ...p, field: cellField(ctx, column, path.join('.')), source };
}
