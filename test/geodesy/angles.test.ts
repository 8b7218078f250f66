// Angle parsing and formatting: every accepted form, every refusal with its words, and round trips.
// Expected values are hand arithmetic: 41°12'33.25" = 41 + 12/60 + 33.25/3600 = 41.209236111…°.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import {
  ARCSEC_PER_DEG, degToGon, formatDecimalDeg, formatSexagesimal, gonToDeg, parseAngleDeg, parseLatitudeDeg,
} from '../../src/geodesy/index.ts';
import { within } from '../helpers/within.ts';
import { announceSeed } from './seed.ts';

const D41 = 41 + 12 / 60 + 33.25 / 3600;
/** Parsed values are sums of a few exact parts: 2 ulp of 180°. */
const PARSE_TOLERANCE_DEG = 2 * 2 ** -45;

function refusal(run: () => unknown): InputError {
  try {
    run();
  } catch (error) {
    expect(error).toBeInstanceOf(InputError);
    return error as InputError;
  }
  throw new Error('expected an InputError, nothing was thrown');
}

describe('parseAngleDeg: accepted forms', () => {
  const cases: [string, number][] = [
    ['41.2092', 41.2092], ['-41.2092', -41.2092], ['+41.2092', 41.2092], ['.5', 0.5], ['41.', 41],
    ['41.2092N', 41.2092], ['41.2092 S', -41.2092],
    [`41°12'33.25"N`, D41], [`41°12'33.25"S`, -D41], [`41° 12' 33.25" N`, D41], [`41°12'33.25"`, D41],
    [`41°12'33.25`, D41], [`41°12.5'`, 41 + 12.5 / 60], ['41°12', 41.2], ['41°', 41],
    ['41º12′33.25″N', D41], ['41°12’33.25”N', D41], [`41°12'33.25''N`, D41], ['−41°12′33.25″', -D41],
    ['41 12 33.25 N', D41], ['N 41 12 33.25', D41], ['n41 12 33.25', D41], ['41 12 33.25 s', -D41], ['41 12.5', 41 + 12.5 / 60],
    ['-41:12:33.25', -D41], ['41:12.5', 41 + 12.5 / 60], ['41 : 12 : 33.25', D41],
    ['45.5gon', 40.95], ['45.5 g', 40.95], ['-12 gon', -10.8], ['100 GON', 90], ['400gon', 360],
    ['12 30 00 E', 12.5], ['12 30 00 W', -12.5], ['  7.25  ', 7.25],
  ];
  for (const [text, expected] of cases) {
    it(`${JSON.stringify(text)} is ${expected}°`, () => {
      within(parseAngleDeg(text), expected, PARSE_TOLERANCE_DEG, '°', text, { source: 'hand arithmetic' });
    });
  }
  it('keeps −0 for "-0" and "0 S"', () => {
    expect(Object.is(parseAngleDeg('-0'), -0)).toBe(true);
    expect(Object.is(parseAngleDeg('0 S'), -0)).toBe(true);
  });
});

describe('parseAngleDeg: refusals say why', () => {
  const cases: [string, string][] = [
    ['', 'empty: no angle given'],
    ['   ', 'empty: no angle given'],
    ['41 60 00', 'minutes must be below 60'],
    ['41 12 60', 'seconds must be below 60'],
    [`41°75'`, 'minutes must be below 60'],
    ['41 N S', 'two hemisphere letters; give one of N, S, E or W'],
    ['N41S', 'two hemisphere letters; give one of N, S, E or W'],
    ['41 N 12', 'the hemisphere letter belongs at the start or the end'],
    ['-41 S', 'give either a sign or a hemisphere letter, not both'],
    ['+41 N', 'give either a sign or a hemisphere letter, not both'],
    ['41,5', 'use a decimal point, not a comma'],
    ['41.5 30', 'degrees must be whole when minutes follow'],
    ['41 30.5 12', 'minutes must be whole when seconds follow'],
    ['41 -12 00', 'only the whole angle may carry a sign; minutes and seconds are never negative'],
    ['--41', 'only the whole angle may carry a sign; minutes and seconds are never negative'],
    ['41 12 33 44', `not an angle: expected decimal degrees, d°m's", d m s, d:m:s, or gon with a "gon" suffix`],
    ['1e5', 'exponent notation is not an angle; write the digits out'],
    ['4.1E-1', 'exponent notation is not an angle; write the digits out'],
    ['forty', `unexpected letter "f": expected decimal degrees, d°m's", d m s, d:m:s, or gon with a "gon" suffix`],
    [`41°12'33"15`, `not an angle: expected decimal degrees, d°m's", d m s, d:m:s, or gon with a "gon" suffix`],
  ];
  for (const [text, reason] of cases) {
    it(`${JSON.stringify(text)}: ${reason}`, () => {
      const error = refusal(() => parseAngleDeg(text, 'stationLatitude'));
      expect(error.field).toBe('stationLatitude');
      expect(error.value).toBe(text);
      expect(error.reason).toBe(reason);
      expect(error.message).toBe(`stationLatitude: ${JSON.stringify(text)} — ${reason}`);
    });
  }
  it('refuses a value that is not text', () => {
    expect(refusal(() => parseAngleDeg(41 as unknown as string)).reason).toBe('an angle must be given as text');
  });
});

describe('parseLatitudeDeg', () => {
  it('accepts N/S and plain signs up to the poles', () => {
    expect(parseLatitudeDeg('90 N')).toBe(90);
    expect(parseLatitudeDeg('-90')).toBe(-90);
    within(parseLatitudeDeg(`41°12'33.25"S`), -D41, PARSE_TOLERANCE_DEG, '°', 'S latitude', { source: 'hand arithmetic' });
  });
  it('"latitude 95° is beyond the pole"', () => {
    const error = refusal(() => parseLatitudeDeg('95 N'));
    expect(error.field).toBe('latitude');
    expect(error.reason).toBe('latitude 95° is beyond the pole (|latitude| ≤ 90°)');
    expect(refusal(() => parseLatitudeDeg('-90 00 01')).reason).toMatch(/^latitude 90\.000277\d*° is beyond the pole/);
    expect(refusal(() => parseLatitudeDeg('101 gon')).reason).toBe('latitude 90.9° is beyond the pole (|latitude| ≤ 90°)');
  });
  it('refuses E and W', () => {
    expect(refusal(() => parseLatitudeDeg('12 30 E')).reason).toBe('the hemisphere letter E marks a longitude; a latitude takes N or S');
    expect(refusal(() => parseLatitudeDeg('W 12.5')).reason).toBe('the hemisphere letter W marks a longitude; a latitude takes N or S');
  });
});

describe('formatting', () => {
  it('sexagesimal with two decimals by default, zero-padded minutes and seconds', () => {
    expect(formatSexagesimal(D41)).toBe(`41°12'33.25"`);
    expect(formatSexagesimal(-D41)).toBe(`-41°12'33.25"`);
    expect(formatSexagesimal(D41, { hemisphere: 'NS' })).toBe(`41°12'33.25"N`);
    expect(formatSexagesimal(-D41, { hemisphere: 'NS' })).toBe(`41°12'33.25"S`);
    expect(formatSexagesimal(-12.5, { hemisphere: 'EW' })).toBe(`12°30'00.00"W`);
    expect(formatSexagesimal(5 + 3 / 60 + 2.5 / 3600, { decimals: 1 })).toBe(`5°03'02.5"`);
    expect(formatSexagesimal(5.5, { decimals: 0 })).toBe(`5°30'00"`);
  });
  it('carries a rounded 60″ into the minutes and degrees', () => {
    expect(formatSexagesimal(10 + 59 / 60 + 59.999 / 3600)).toBe(`11°00'00.00"`);
    expect(formatSexagesimal(89.9999999999, { hemisphere: 'NS' })).toBe(`90°00'00.00"N`);
  });
  it('never shows a negative zero', () => {
    expect(formatSexagesimal(-1e-9)).toBe(`0°00'00.00"`);
    expect(formatSexagesimal(-1e-9, { hemisphere: 'NS' })).toBe(`0°00'00.00"N`);
    expect(formatDecimalDeg(-1e-9)).toBe('0.0000000');
    expect(formatDecimalDeg(-0, 2)).toBe('0.00');
  });
  it('decimal degrees with 7 decimals by default', () => {
    expect(formatDecimalDeg(12.3456789)).toBe('12.3456789');
    expect(formatDecimalDeg(-41.20923611, 4)).toBe('-41.2092');
  });
  it('refuses non-finite angles and bad decimals', () => {
    expect(refusal(() => formatSexagesimal(NaN)).field).toBe('angle');
    expect(refusal(() => formatDecimalDeg(Infinity)).field).toBe('angle');
    expect(refusal(() => formatSexagesimal(1, { decimals: 11 })).field).toBe('decimals');
    expect(refusal(() => formatDecimalDeg(1, 1.5)).field).toBe('decimals');
  });
});

describe('gon and arcseconds', () => {
  it('a right angle is 100 gon, a turn 400 gon (ISO 80000-3)', () => {
    expect(degToGon(90)).toBe(100);
    expect(gonToDeg(100)).toBe(90);
    expect(degToGon(360)).toBe(400);
    expect(ARCSEC_PER_DEG).toBe(3600);
  });
});

describe('round trips (seeded)', () => {
  const options = announceSeed('angle round trips');
  it('parse(formatSexagesimal(φ, 4 decimals)) is within half the last digit of φ', () => {
    fc.assert(fc.property(fc.double({ min: -180, max: 180, noNaN: true }), fc.constantFrom<'NS' | 'EW' | undefined>('NS', 'EW', undefined),
      (deg, hemisphere) => {
        const text = formatSexagesimal(deg, { decimals: 4, hemisphere });
        within(parseAngleDeg(text), deg, 0.5e-4 / 3600 + PARSE_TOLERANCE_DEG, '°', text, { source: 'round trip' });
      }), options);
  });
  it('formatSexagesimal(parse(text)) gives the canonical text back', () => {
    const canonical = fc.tuple(fc.integer({ min: 0, max: 89 }), fc.integer({ min: 0, max: 59 }), fc.integer({ min: 0, max: 5999 }),
      fc.constantFrom('N', 'S'))
      .map(([d, m, cs, h]) => `${d}°${String(m).padStart(2, '0')}'${(cs / 100).toFixed(2).padStart(5, '0')}"${h}`);
    fc.assert(fc.property(canonical, (text) => {
      const deg = parseLatitudeDeg(text);
      // "0°00'00.00"S" parses to −0 and prints as N: the one text with no canonical sign.
      expect(formatSexagesimal(deg, { hemisphere: 'NS' })).toBe(deg === 0 ? text.replace(/S$/, 'N') : text);
    }), options);
  });
  it('gon round trip to 1 ulp', () => {
    fc.assert(fc.property(fc.double({ min: -400, max: 400, noNaN: true }), (deg) => {
      within(gonToDeg(degToGon(deg)), deg, 4 * Number.EPSILON * Math.abs(deg) + 1e-300, '°', `${deg}°`, { source: 'round trip' });
    }), options);
  });
});
