// CSV writer, RFC 4180: CRLF line ends (also after the last record), one header row, a field is
// quoted only when it contains a comma, a quote, CR or LF, and a quote inside is doubled. The
// text is UTF-8 when encoded (no byte-order mark: RFC 4180 and most tools do not expect one).
//
// Cells are typed, so numbers never pass through the free-text formula guard (formula-guard.ts)
// and are written in JavaScript's shortest round-trip form (ECMA-262 Number::toString), which
// reads back to the same double; -0 is written as "-0" so its sign survives.
import { guardFormula } from './formula-guard.ts';

export type CsvCell =
  | { kind: 'text'; value: string }       // free text: formula-guarded
  | { kind: 'code'; value: string }       // ids, codes, enums, instants: already restricted by the schema
  | { kind: 'number'; value: number }
  | { kind: 'boolean'; value: boolean }
  | null;                                 // empty cell (missing value)

export const CRLF = '\r\n';

function quoteIfNeeded(field: string): string {
  return /[",\r\n]/.test(field) ? `"${field.replace(/"/g, '""')}"` : field;
}

export function formatNumberCell(value: number): string {
  if (Object.is(value, -0)) return '-0';
  return String(value);
}

function cellText(cell: CsvCell): string {
  if (cell === null) return '';
  switch (cell.kind) {
    case 'text': return guardFormula(cell.value);
    case 'code': return cell.value;
    case 'number': return formatNumberCell(cell.value);
    case 'boolean': return cell.value ? 'true' : 'false';
  }
}

/** The whole CSV document: header, then one line per row, each ended by CRLF. */
export function writeCsv(header: readonly string[], rows: readonly (readonly CsvCell[])[]): string {
  const lines = [header.map(quoteIfNeeded).join(',')];
  for (const row of rows) {
    if (row.length !== header.length) throw new RangeError(`CSV row has ${row.length} cells for ${header.length} columns`);
    lines.push(row.map((c) => quoteIfNeeded(cellText(c))).join(','));
  }
  return lines.join(CRLF) + CRLF;
}
