// Instants for export: RFC 3339 in UTC with an explicit `Z` (field-traps: never a local time
// without an offset). Records keep the instant as typed (an ISO 8601 date-time with Z or an
// offset); exports convert an offset form to Z, keeping every fractional-second digit (going
// through `Date` would cut them to milliseconds).
import { InputError } from '../errors.ts';

const RFC3339 = /^(\d{4})-(\d{2})-(\d{2})[Tt](\d{2}):(\d{2})(?::(\d{2})(\.\d+)?)?([Zz]|[+-]\d{2}:?\d{2})$/;

/** `2026-06-02T23:14:00+02:00` → `2026-06-02T21:14:00Z`; an instant already in Z is returned unchanged (upper-cased). */
export function toUtcInstant(text: string, field = 'instant'): string {
  const m = RFC3339.exec(text);
  if (!m) throw new InputError(field, text, 'not an ISO 8601 date-time with Z or an offset');
  const [, y, mo, d, h, mi, s = '00', frac = '', zone] = m;
  if (zone === 'Z' || zone === 'z') return `${y}-${mo}-${d}T${h}:${mi}:${s}${frac}Z`;
  const sign = zone[0] === '-' ? -1 : 1;
  const digits = zone.slice(1).replace(':', '');
  const offsetMinutes = sign * (Number(digits.slice(0, 2)) * 60 + Number(digits.slice(2)));
  const epochMs = Date.UTC(Number(y), Number(mo) - 1, Number(d), Number(h), Number(mi), Number(s)) - offsetMinutes * 60_000;
  if (!Number.isFinite(epochMs)) throw new InputError(field, text, 'date out of range');
  // toISOString always gives ".sssZ"; the seconds are whole here, so drop its ".000" and put back our own digits.
  return new Date(epochMs).toISOString().slice(0, 19) + frac + 'Z';
}
