// Latitude typed as decimal degrees or sexagesimal, parsed on every keystroke. The screen shows
// what the text means (both notations) or, in words, why it is refused — the parser's own reason
// (src/geodesy/angles.ts). An unfinished entry ("41°12'") is already an angle, so no special
// "still typing" state is needed beyond the empty field.
import { formatDecimalDeg, formatSexagesimal, parseLatitudeDeg } from '../../geodesy/index.ts';
import { InputError } from '../../errors.ts';

export type AngleEntry =
  | { status: 'empty' }
  | { status: 'ok'; latitudeDeg: number; sexagesimal: string; decimal: string; text: string }
  | { status: 'error'; reason: string; text: string };

/** Decimals shown in the echo: 0.01″ (≈ 0.3 m) for sexagesimal, 1e-7° (≈ 1 cm) for decimal. */
const ECHO_ARCSEC_DECIMALS = 2;
const ECHO_DEG_DECIMALS = 7;

export function readAngleEntry(text: string, field = 'latitude'): AngleEntry {
  if (text.trim() === '') return { status: 'empty' };
  try {
    const latitudeDeg = parseLatitudeDeg(text, field);
    return {
      status: 'ok', latitudeDeg, text,
      sexagesimal: formatSexagesimal(latitudeDeg, { decimals: ECHO_ARCSEC_DECIMALS, hemisphere: 'NS' }),
      decimal: `${formatDecimalDeg(latitudeDeg, ECHO_DEG_DECIMALS)}°`,
    };
  } catch (err) {
    if (err instanceof InputError) return { status: 'error', reason: err.reason, text };
    throw err;
  }
}

/** A positive finite number typed in a field, or the reason in words. */
export type NumberEntry = { status: 'empty' } | { status: 'ok'; value: number } | { status: 'error'; reason: string };

export function readNumberEntry(text: string, opts: { positive?: boolean; min?: number; max?: number; unit?: string } = {}): NumberEntry {
  const t = text.trim();
  if (t === '') return { status: 'empty' };
  if (/,/.test(t)) return { status: 'error', reason: 'use a decimal point, not a comma' };
  if (!/^[+-]?(\d+(\.\d*)?|\.\d+)(e[+-]?\d+)?$/i.test(t)) return { status: 'error', reason: `"${t}" is not a number` };
  const value = Number(t);
  const u = opts.unit ? ` ${opts.unit}` : '';
  if (!Number.isFinite(value)) return { status: 'error', reason: 'too large' };
  if (opts.positive && value <= 0) return { status: 'error', reason: 'must be greater than 0' };
  if (opts.min !== undefined && value < opts.min) return { status: 'error', reason: `must be at least ${opts.min}${u}` };
  if (opts.max !== undefined && value > opts.max) return { status: 'error', reason: `must be at most ${opts.max}${u}` };
  return { status: 'ok', value };
}
