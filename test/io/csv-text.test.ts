// CSV text layer: writer and reader against Python's csv module (RFC 4180 dialect), the formula
// guard's cases and its exact inverse, and UTC instants.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { writeCsv, type CsvCell } from '../../src/io/csv-writer.ts';
import { readCsv } from '../../src/io/csv-reader.ts';
import { guardFormula, unguardFormula } from '../../src/io/formula-guard.ts';
import { toUtcInstant } from '../../src/io/utc-instant.ts';
import { ValidationError } from '../../src/errors.ts';

// Expected text written by Python's csv module: test/io/fixtures/gen-csv-reference.py.
const reference = JSON.parse(readFileSync(new URL('./fixtures/csv-reference.json', import.meta.url), 'utf8')) as { rows: string[][]; csv: string };

describe('CSV writer (RFC 4180)', () => {
  it('writes byte-for-byte what Python csv writes for the same cells (fixtures/gen-csv-reference.py)', () => {
    const [header, ...rows] = reference.rows;
    const cells = rows.map((r) => r.map((v): CsvCell => (v === '' ? null : { kind: 'code', value: v })));
    expect(writeCsv(header, cells)).toBe(reference.csv);
  });

  it('ends every record with CRLF, quotes only when needed, doubles quotes (RFC 4180 §2)', () => {
    const text = writeCsv(['a', 'b'], [[{ kind: 'code', value: 'x' }, { kind: 'text', value: 'say "hi"' }], [null, { kind: 'number', value: 2 }]]);
    expect(text).toBe('a,b\r\nx,"say ""hi"""\r\n,2\r\n');
  });

  it('never prefixes numbers; guards free text that starts like a formula (field-traps R-6.3)', () => {
    const text = writeCsv(['latitude_deg', 'note', 'code'], [
      [{ kind: 'number', value: -33.8688 }, { kind: 'text', value: '=1+1' }, { kind: 'code', value: 'K01' }],
      [{ kind: 'number', value: -0 }, { kind: 'text', value: 'first\nsecond' }, { kind: 'code', value: 'K02' }],
      [{ kind: 'number', value: 1e-7 }, { kind: 'text', value: 'a "quoted" word' }, { kind: 'code', value: 'K03' }],
    ]);
    expect(text).toBe(
      'latitude_deg,note,code\r\n' +
      "-33.8688,'=1+1,K01\r\n" +
      '-0,"first\nsecond",K02\r\n' +
      '1e-7,"a ""quoted"" word",K03\r\n');
    const back = readCsv(text);
    expect(back.records.map((r) => r.cells[0])).toEqual(['-33.8688', '-0', '1e-7']);
    expect(Object.is(Number(back.records[1].cells[0]), -0)).toBe(true);
  });

  it('writes numbers that read back to the same double (shortest round-trip form)', () => {
    const seed = 6061;
    console.log(`fast-check seed ${seed}`);
    fc.assert(fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (x) => {
      const text = writeCsv(['x'], [[{ kind: 'number', value: x }]]);
      return Object.is(Number(readCsv(text).records[0].cells[0]), x);
    }), { seed, numRuns: 500 });
  });
});

describe('CSV reader', () => {
  it('reads the Python-written text back to the same cells', () => {
    const t = readCsv(reference.csv);
    expect([t.header, ...t.records.map((r) => r.cells)]).toEqual(reference.rows);
  });

  it('counts rows like a spreadsheet and lines like an editor across quoted line breaks', () => {
    const t = readCsv('id,note\r\nr-1,"two\nlines"\r\nr-2,x\r\n');
    expect(t.records.map((r) => [r.row, r.line])).toEqual([[2, 2], [3, 4]]);
  });

  it('accepts LF line ends, a byte-order mark, no final line end, and skips blank lines', () => {
    const t = readCsv('\uFEFFa,b\n1,2\n\n3,4');
    expect(t.header).toEqual(['a', 'b']);
    expect(t.records.map((r) => r.cells)).toEqual([['1', '2'], ['3', '4']]);
  });

  it('refuses an unclosed quote, naming row and column', () => {
    try {
      readCsv('a,b\r\n1,"open\r\n2,3\r\n', 'x.csv');
      expect.fail('should throw');
    } catch (err) {
      expect(err).toBeInstanceOf(ValidationError);
      const p = (err as ValidationError).problems[0];
      expect(p.field).toBe('row 2, column 2');
      expect(p.reason).toMatch(/never closed/);
    }
  });

  it('refuses a stray quote inside an unquoted field and text after a closing quote', () => {
    expect(() => readCsv('a\r\nab"c\r\n')).toThrow(/quote inside an unquoted field/);
    expect(() => readCsv('a,b\r\n"x"y,1\r\n')).toThrow(/text after a closing quote/);
  });

  it('refuses an empty file', () => {
    expect(() => readCsv('')).toThrow(/header row is needed/);
  });
});

describe('formula guard', () => {
  it('guards the trigger characters = + - @ TAB CR (OWASP CSV injection list) and nothing else', () => {
    expect(guardFormula('=1+1')).toBe("'=1+1");
    expect(guardFormula('+44')).toBe("'+44");
    expect(guardFormula('-north')).toBe("'-north");
    expect(guardFormula('@SUM(A1)')).toBe("'@SUM(A1)");
    expect(guardFormula('\tx')).toBe("'\tx");
    expect(guardFormula('\rx')).toBe("'\rx");
    expect(guardFormula('plain')).toBe('plain');
    expect(guardFormula('')).toBe('');
    expect(guardFormula("'quoted'")).toBe("'quoted'");
    expect(guardFormula("'=x")).toBe("''=x");
  });

  it('is exactly undone by unguardFormula for every string', () => {
    const seed = 4180;
    console.log(`fast-check seed ${seed}`);
    const piece = fc.constantFrom("'", '=', '+', '-', '@', '\t', '\r', 'a', ' ', '"', '\n');
    fc.assert(fc.property(fc.array(piece, { maxLength: 6 }).map((a) => a.join('')), (s) => unguardFormula(guardFormula(s)) === s), { seed, numRuns: 2000 });
  });
});

describe('UTC instants (RFC 3339 with Z)', () => {
  it('converts offsets to Z and keeps fractional digits', () => {
    expect(toUtcInstant('2026-06-02T23:14:00.125+02:00')).toBe('2026-06-02T21:14:00.125Z');
    expect(toUtcInstant('2026-06-02T00:30:00.1234567-05:30')).toBe('2026-06-02T06:00:00.1234567Z');
    expect(toUtcInstant('2026-12-31T23:30:00-01:00')).toBe('2027-01-01T00:30:00Z');
    expect(toUtcInstant('2026-06-02T21:14:00Z')).toBe('2026-06-02T21:14:00Z');
  });

  it('refuses a local time without an offset, naming the field', () => {
    expect(() => toUtcInstant('2026-06-02T21:14:00', 'observed_at')).toThrow(/observed_at: "2026-06-02T21:14:00" — not an ISO 8601/);
  });
});
