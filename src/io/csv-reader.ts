// CSV reader for RFC 4180 text, tolerant of what spreadsheets and editors actually write: CRLF or
// bare LF line ends, a UTF-8 byte-order mark, no final line end, and blank lines (skipped). It is
// strict where leniency would silently change data: a quote inside an unquoted field, text after a
// closing quote, or a quote left open at the end of the file is refused, naming the row and column.
import { ValidationError, type Problem } from '../errors.ts';

export interface CsvRecord {
  /** 1-based record number as a spreadsheet shows it (the header is row 1), blank lines not counted. */
  row: number;
  /** 1-based line in the file where the record starts (differs from `row` after quoted line breaks). */
  line: number;
  cells: string[];
}

export interface CsvTable {
  header: string[];
  records: CsvRecord[];
}

/** Parse CSV text into a header and records, or throw ValidationError naming each syntax problem. */
export function readCsv(text: string, source = 'csv'): CsvTable {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const problems: Problem[] = [];
  const rows: { line: number; cells: string[] }[] = [];
  let cells: string[] = [];
  let field = '';
  let line = 1;
  let rowLine = 1;
  let i = 0;
  let fieldStarted = false;
  const endField = (): void => {
    cells.push(field);
    field = '';
    fieldStarted = false;
  };
  const endRow = (): void => {
    endField();
    // A line with one empty cell is a blank line: skip it (a trailing line end must not add a record).
    if (!(cells.length === 1 && cells[0] === '')) rows.push({ line: rowLine, cells });
    cells = [];
  };
  while (i < body.length) {
    const ch = body[i];
    if (ch === '"' && !fieldStarted) {
      // Quoted field: runs to the next quote not followed by another quote.
      const startLine = line;
      i++;
      let closed = false;
      while (i < body.length) {
        const c = body[i];
        if (c === '"') {
          if (body[i + 1] === '"') { field += '"'; i += 2; continue; }
          closed = true;
          i++;
          break;
        }
        if (c === '\n') line++;
        field += c;
        i++;
      }
      fieldStarted = true;
      if (!closed) {
        problems.push({ field: `row ${rows.length + 1}, column ${cells.length + 1}`, value: field.slice(0, 40), reason: `a quoted field opened on line ${startLine} is never closed`, source });
        break;
      }
      const next = body[i];
      if (next !== undefined && next !== ',' && next !== '\r' && next !== '\n') {
        problems.push({ field: `row ${rows.length + 1}, column ${cells.length + 1}`, value: field + next, reason: `text after a closing quote on line ${line} (quote the whole field and double the quotes inside)`, source });
        // Skip to the end of this field so later problems are still found.
        while (i < body.length && body[i] !== ',' && body[i] !== '\n') i++;
      }
      continue;
    }
    if (ch === ',') { endField(); i++; continue; }
    if (ch === '\r' && body[i + 1] === '\n') { endRow(); i += 2; line++; rowLine = line; continue; }
    if (ch === '\n') { endRow(); i++; line++; rowLine = line; continue; }
    if (ch === '"') {
      problems.push({ field: `row ${rows.length + 1}, column ${cells.length + 1}`, value: field + ch, reason: `a quote inside an unquoted field on line ${line} (quote the whole field and double the quotes inside)`, source });
    }
    field += ch;
    fieldStarted = true;
    i++;
  }
  if (fieldStarted || cells.length > 0) endRow();
  if (problems.length > 0) throw new ValidationError(problems, source);
  if (rows.length === 0) throw new ValidationError([{ field: 'row 1', value: '', reason: 'the file is empty: a header row is needed', source }], source);
  const [head, ...rest] = rows;
  return {
    header: head.cells,
    records: rest.map((r, k) => ({ row: k + 2, line: r.line, cells: r.cells })),
  };
}
