// Angles as people type them, and as we show them. Degrees are the unit everywhere inside.
//
// Accepted (one angle per text, whitespace around parts allowed):
//   decimal degrees           41.2092   -41.2092   +41.2092   41.2092N
//   sexagesimal with symbols  41°12'33.25"N   41°12.5'   41°   (also º, ′ ″, ’ ”, and '' for ";
//                             the last mark may be left off: 41°12'33.25)
//   space separated           41 12 33.25 N   N 41 12 33.25   41 12.5
//   colon separated           -41:12:33.25   41:12.5
//   gon (400 per turn)        45.5gon   45.5 g   -12 gon        (1 gon = 0.9°, ISO 80000-3)
// Hemisphere letters N/S/E/W (either case) go first or last, once; S and W are negative. A sign
// and a letter together are refused as ambiguous ("-41 S"). Minutes and seconds must be below 60;
// a part followed by a smaller part must be whole ("41.5 30" is refused). A decimal comma is refused
// rather than guessed (it also separates CSV fields). Every refusal is an InputError naming the
// field, the text and the reason.
import { InputError } from '../errors.ts';
import { MAX_LATITUDE_DEG } from './latitude-policy.ts';

export const ARCSEC_PER_DEG = 3600;
const ARCMIN_PER_DEG = 60;
/** Largest number of decimals the formatters accept (1e-10″ ≈ 3 µm on the ground). */
export const MAX_FORMAT_DECIMALS = 10;

type Hemisphere = 'N' | 'S' | 'E' | 'W';

interface ParsedAngle {
  deg: number;
  hemisphere: Hemisphere | undefined;
}

const NUMBER = String.raw`(?:\d+(?:\.\d*)?|\.\d+)`;
// The mark after the last part may be left off ("41°12", "41°12'33.25"): unambiguous, and what a
// person has typed half-way through an entry.
const SYMBOLS = new RegExp(String.raw`^(${NUMBER})\s*°\s*(?:(${NUMBER})\s*(?:'\s*(?:(${NUMBER})\s*"?)?)?)?$`);
const COLONS = new RegExp(String.raw`^(${NUMBER})(?:\s*:\s*(${NUMBER})(?:\s*:\s*(${NUMBER}))?)?$`);
const SPACES = new RegExp(String.raw`^(${NUMBER})(?:\s+(${NUMBER})(?:\s+(${NUMBER}))?)?$`);
const GON = new RegExp(String.raw`^([+-]?)\s*(${NUMBER})\s*(?:gon|g)$`, 'i');
const FORMATS = "expected decimal degrees, d°m's\", d m s, d:m:s, or gon with a \"gon\" suffix";

function normalise(text: string): string {
  return text.trim()
    .replace(/[\u2212\u2012\u2013]/g, '-')     // minus sign, figure dash, en dash
    .replace(/º/g, '°')                        // masculine ordinal, often typed for degree
    .replace(/[″”]|''/g, '"')
    .replace(/[′’]/g, "'");
}

function parseParts(body: string, text: string, field: string): number {
  const match = SYMBOLS.exec(body) ?? COLONS.exec(body) ?? SPACES.exec(body);
  if (match === null) throw new InputError(field, text, `not an angle: ${FORMATS}`);
  const [d, m, s] = [match[1], match[2], match[3]].map((part) => (part === undefined ? undefined : Number(part)));
  if (d === undefined || !Number.isFinite(d)) throw new InputError(field, text, 'the degrees are not a finite number');
  if (m !== undefined) {
    if (!Number.isInteger(d)) throw new InputError(field, text, 'degrees must be whole when minutes follow');
    if (m >= ARCMIN_PER_DEG) throw new InputError(field, text, 'minutes must be below 60');
  }
  if (s !== undefined) {
    if (m !== undefined && !Number.isInteger(m)) throw new InputError(field, text, 'minutes must be whole when seconds follow');
    if (s >= 60) throw new InputError(field, text, 'seconds must be below 60');
  }
  // (m + s/60)/60 keeps whole-second inputs exact in the minutes before the last division.
  return d + ((m ?? 0) + (s ?? 0) / 60) / ARCMIN_PER_DEG;
}

function parseAngle(text: string, field: string): ParsedAngle {
  if (typeof text !== 'string') throw new InputError(field, text, 'an angle must be given as text');
  let body = normalise(text);
  if (body === '') throw new InputError(field, text, 'empty: no angle given');
  if (body.includes(',')) throw new InputError(field, text, 'use a decimal point, not a comma');

  const gon = GON.exec(body);
  if (gon !== null) {
    const value = gonToDeg(Number(gon[2]));
    if (!Number.isFinite(value)) throw new InputError(field, text, 'the gon value is not a finite number');
    return { deg: gon[1] === '-' ? -value : value, hemisphere: undefined };
  }

  // "1e5" would otherwise read as a misplaced E hemisphere letter.
  if (/\d\s*e\s*[+-]?\d/i.test(body) && !/^[EW]|[EW]$/i.test(body)) {
    throw new InputError(field, text, 'exponent notation is not an angle; write the digits out');
  }
  const letters = body.match(/[a-z]/gi) ?? [];
  const hemispheres = letters.filter((l) => /[NSEW]/i.test(l));
  if (letters.length > hemispheres.length) {
    throw new InputError(field, text, `unexpected letter "${letters.find((l) => !/[NSEW]/i.test(l)) ?? ''}": ${FORMATS}`);
  }
  if (hemispheres.length > 1) throw new InputError(field, text, 'two hemisphere letters; give one of N, S, E or W');
  let hemisphere: Hemisphere | undefined;
  if (hemispheres.length === 1) {
    const upper = body.toUpperCase();
    hemisphere = hemispheres[0].toUpperCase() as Hemisphere;
    if (/^[NSEW]/.test(upper)) body = body.slice(1).trim();
    else if (/[NSEW]$/.test(upper)) body = body.slice(0, -1).trim();
    else throw new InputError(field, text, 'the hemisphere letter belongs at the start or the end');
  }

  let negative = false;
  if (body.startsWith('-') || body.startsWith('+')) {
    if (hemisphere !== undefined) {
      throw new InputError(field, text, 'give either a sign or a hemisphere letter, not both');
    }
    negative = body.startsWith('-');
    body = body.slice(1).trim();
  }
  if (/^[+-]/.test(body) || /\s[+-]|[:°'"][+-]/.test(body)) {
    throw new InputError(field, text, 'only the whole angle may carry a sign; minutes and seconds are never negative');
  }
  const value = parseParts(body, text, field);
  if (hemisphere === 'S' || hemisphere === 'W') negative = true;
  return { deg: negative ? -value : value, hemisphere };
}

/** An angle in degrees from any form in the file header; InputError(field, text, reason) otherwise. */
export function parseAngleDeg(text: string, field = 'angle'): number {
  return parseAngle(text, field).deg;
}

/** A latitude in degrees (north positive): parseAngleDeg, plus |φ| ≤ 90° and no E/W letter. */
export function parseLatitudeDeg(text: string, field = 'latitude'): number {
  const { deg, hemisphere } = parseAngle(text, field);
  if (hemisphere === 'E' || hemisphere === 'W') {
    throw new InputError(field, text, `the hemisphere letter ${hemisphere} marks a longitude; a latitude takes N or S`);
  }
  if (Math.abs(deg) > MAX_LATITUDE_DEG) {
    throw new InputError(field, text, `latitude ${Math.abs(deg)}° is beyond the pole (|latitude| ≤ 90°)`);
  }
  return deg;
}

function checkedDecimals(decimals: number): number {
  if (!Number.isInteger(decimals) || decimals < 0 || decimals > MAX_FORMAT_DECIMALS) {
    throw new InputError('decimals', decimals, `decimals must be a whole number from 0 to ${MAX_FORMAT_DECIMALS}`);
  }
  return decimals;
}

function checkedAngle(deg: number): number {
  if (typeof deg !== 'number' || !Number.isFinite(deg)) throw new InputError('angle', deg, 'only a finite angle can be shown');
  return deg;
}

/**
 * d°mm'ss.ss" with the sign as a leading "-" or, with `hemisphere`, a trailing N/S or E/W.
 * Rounding is done once, on the whole angle in units of the last shown digit, so 59.999″ carries
 * into the minutes instead of printing 60.00″. parseAngleDeg reads the result back.
 */
export function formatSexagesimal(deg: number, opts: { decimals?: number; hemisphere?: 'NS' | 'EW' } = {}): string {
  checkedAngle(deg);
  const decimals = checkedDecimals(opts.decimals ?? 2);
  const perSecond = 10 ** decimals;
  const units = Math.round(Math.abs(deg) * ARCSEC_PER_DEG * perSecond);
  const secondUnits = units % (60 * perSecond);
  const totalMinutes = Math.round((units - secondUnits) / (60 * perSecond));
  const minutes = totalMinutes % 60;
  const degrees = (totalMinutes - minutes) / 60;
  const seconds = (secondUnits / perSecond).toFixed(decimals).padStart(decimals > 0 ? decimals + 3 : 2, '0');
  const body = `${degrees}°${String(minutes).padStart(2, '0')}'${seconds}"`;
  const negative = deg < 0 && units > 0;
  if (opts.hemisphere === 'NS') return body + (negative ? 'S' : 'N');
  if (opts.hemisphere === 'EW') return body + (negative ? 'W' : 'E');
  return (negative ? '-' : '') + body;
}

/** Decimal degrees with a fixed number of decimals (default 7, about 1 cm of latitude); never "-0.000". */
export function formatDecimalDeg(deg: number, decimals = 7): string {
  checkedAngle(deg);
  const text = deg.toFixed(checkedDecimals(decimals));
  return /^-0(?:\.0*)?$/.test(text) ? text.slice(1) : text;
}

/** Degrees to gon (400 gon per turn): deg·10/9. */
export function degToGon(deg: number): number {
  return (deg * 10) / 9;
}

/** Gon to degrees: gon·9/10. */
export function gonToDeg(gon: number): number {
  return (gon * 9) / 10;
}
