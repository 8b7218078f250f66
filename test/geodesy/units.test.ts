// Length units: defining values (check-values.md, sources beside each), conversions and refusals.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { LENGTH_UNITS, LENGTH_UNIT_IDS, fromMetres, lengthUnit, toMetres } from '../../src/geodesy/index.ts';
import { within } from '../helpers/within.ts';
import { announceSeed } from './seed.ts';

function refusal(run: () => unknown): InputError {
  try {
    run();
  } catch (error) {
    expect(error).toBeInstanceOf(InputError);
    return error as InputError;
  }
  throw new Error('expected an InputError, nothing was thrown');
}

describe('defining values', () => {
  it('international foot = 0.3048 m exactly', () => {
    // International yard and pound agreement (1959).
    expect(LENGTH_UNITS.ft.metres).toBe(0.3048);
    expect(toMetres(1, 'ft')).toBe(0.3048);
    expect(toMetres(10000, 'ft')).toBe(3048);
  });
  it('US survey foot = 1200/3937 m: 3937 survey feet are exactly 1200 m', () => {
    // US Metric Law of 1866 value (NIST; deprecated from 2023) — from memory.
    expect(toMetres(3937, 'us-ft')).toBe(1200);
    within(LENGTH_UNITS['us-ft'].metres, 0.3048006096, 1e-10, 'm', 'US survey foot', { source: 'NIST — from memory' });
    // Two parts per million longer than the international foot.
    within(LENGTH_UNITS['us-ft'].metres / 0.3048 - 1, 2e-6, 1e-11, '', 'US/international foot − 1', { source: '1200/3937/0.3048 − 1 = 1/499999' });
  });
  it('toise of Paris = 864/443.296 m ≈ 1.949 036 m', () => {
    // 864 lignes to the toise; the 1799 metre = 443.296 lignes (historical metrology — from memory).
    within(LENGTH_UNITS.toise.metres, 1.949036, 5e-7, 'm', 'toise', { source: 'check-values.md — from memory' });
    within(toMetres(443.296, 'toise'), 864, 1e-12, 'm', '443.296 toises', { source: 'definition' });
  });
  it('metre and kilometre', () => {
    expect(toMetres(1.5, 'km')).toBe(1500);
    expect(fromMetres(1500, 'km')).toBe(1.5);
    expect(toMetres(-2, 'm')).toBe(-2);
  });
  it('every unit names its source', () => {
    for (const id of LENGTH_UNIT_IDS) expect(lengthUnit(id).source.length).toBeGreaterThan(10);
  });
});

describe('round trips (seeded)', () => {
  const options = announceSeed('units round trip');
  it('fromMetres(toMetres(v, u), u) = v to 4 ulp', () => {
    // Plus 1e-300 absolute: subnormal doubles carry no relative precision, and no length is that small.
    fc.assert(fc.property(fc.double({ min: -1e7, max: 1e7, noNaN: true }), fc.constantFrom(...LENGTH_UNIT_IDS), (v, unit) => {
      const back = fromMetres(toMetres(v, unit), unit);
      within(back, v, 4 * Number.EPSILON * Math.abs(v) + 1e-300, unit, `${v} ${unit}`, { source: 'round trip' });
    }), options);
  });
});

describe('refusals', () => {
  it('an unknown unit, listing the known ones', () => {
    const error = refusal(() => toMetres(1, 'yd'));
    expect(error.field).toBe('unit');
    expect(error.value).toBe('yd');
    expect(error.message).toBe('unit: "yd" — unknown length unit; use one of m, km, ft, us-ft, toise');
  });
  it('units are case-sensitive ids, not guesses', () => {
    expect(refusal(() => toMetres(1, 'FT')).field).toBe('unit');
  });
  it('a non-finite value', () => {
    expect(refusal(() => toMetres(NaN, 'm')).field).toBe('value');
    expect(refusal(() => fromMetres(Infinity, 'ft')).field).toBe('metres');
  });
});
