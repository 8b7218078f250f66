// Length units accepted at the boundaries (files, forms, CLI), each with its defining value in
// metres and the document that fixes it. Conversion is one multiplication or division by that
// exact defining ratio, so a value read in a unit and written back in it round-trips to rounding.
import { InputError } from '../errors.ts';

export interface LengthUnit {
  id: string;
  name: string;
  /** Metres in one unit (defining value). */
  metres: number;
  source: string;
}

export type LengthUnitId = 'm' | 'km' | 'ft' | 'us-ft' | 'toise';

export const LENGTH_UNITS = Object.freeze({
  'm': Object.freeze({ id: 'm', name: 'metre', metres: 1, source: 'SI base unit (BIPM, SI Brochure, 9th edition, 2019)' }),
  'km': Object.freeze({ id: 'km', name: 'kilometre', metres: 1000, source: 'SI prefix kilo = 10³ (BIPM, SI Brochure)' }),
  'ft': Object.freeze({ id: 'ft', name: 'international foot', metres: 0.3048,
    source: 'international yard and pound agreement (1959): 1 ft = 0.3048 m exactly' }),
  'us-ft': Object.freeze({ id: 'us-ft', name: 'US survey foot', metres: 1200 / 3937,
    source: 'US Metric Law of 1866 value, 1 ft = 1200/3937 m (NIST; deprecated from 2023) — from memory' }),
  'toise': Object.freeze({ id: 'toise', name: 'toise (of Paris)', metres: 864 / 443.296,
    source: '1 toise = 864 lignes, the definitive metre of 1799 = 443.296 lignes, so 1 toise = 864/443.296 m ≈ 1.949 036 m (historical metrology — from memory)' }),
} satisfies Record<LengthUnitId, LengthUnit>) as Readonly<Record<LengthUnitId, LengthUnit>>;

export const LENGTH_UNIT_IDS: readonly LengthUnitId[] = Object.freeze(Object.keys(LENGTH_UNITS) as LengthUnitId[]);

export function isLengthUnitId(unit: string): unit is LengthUnitId {
  return Object.prototype.hasOwnProperty.call(LENGTH_UNITS, unit);
}

/** The unit for an id; InputError naming the id and the known ids otherwise. */
export function lengthUnit(unit: string, field = 'unit'): LengthUnit {
  if (typeof unit === 'string' && isLengthUnitId(unit)) return LENGTH_UNITS[unit];
  throw new InputError(field, unit, `unknown length unit; use one of ${LENGTH_UNIT_IDS.join(', ')}`);
}

function finiteValue(value: number, field: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new InputError(field, value, 'a length must be a finite number');
  }
  return value;
}

/** `value` given in `unit`, in metres. */
export function toMetres(value: number, unit: string): number {
  const u = lengthUnit(unit);
  const v = finiteValue(value, 'value');
  // Divide by the exact rational for the US survey foot and the toise: (v·1200)/3937 rounds once
  // less than v·(1200/3937).
  if (u.id === 'us-ft') return (v * 1200) / 3937;
  if (u.id === 'toise') return (v * 864) / 443.296;
  return v * u.metres;
}

/** `metres` expressed in `unit`. */
export function fromMetres(metres: number, unit: string): number {
  const u = lengthUnit(unit);
  const v = finiteValue(metres, 'metres');
  if (u.id === 'us-ft') return (v * 3937) / 1200;
  if (u.id === 'toise') return (v * 443.296) / 864;
  return v / u.metres;
}
