// What the latitude field shows as a person types: the meaning in both notations, or the parser's
// reason in words. Expected values are the sexagesimal arithmetic done by hand (d + m/60 + s/3600).
import { describe, expect, it } from 'vitest';
import { readAngleEntry, readNumberEntry, fromLocalInput, toLocalInput } from '../../src/ui/entry/index.ts';
import { classifyLocationError } from '../../src/ui/gnss/index.ts';
import { within } from '../helpers/within.ts';

describe('readAngleEntry (parsed as typed)', () => {
  it('reads sexagesimal and echoes both notations', () => {
    const e = readAngleEntry(`41°12'33.25"N`);
    expect(e.status).toBe('ok');
    if (e.status !== 'ok') return;
    within(e.latitudeDeg, 41 + 12 / 60 + 33.25 / 3600, 1e-12, '°', `41°12'33.25"N`, { source: 'hand computation' });
    expect(e.sexagesimal).toBe(`41°12'33.25"N`);
    expect(e.decimal).toBe('41.2092361°');
  });

  it('accepts each stage of typing a sexagesimal value', () => {
    const stages = ['4', '41', '41°', "41°1", "41°12'", "41°12'3", `41°12'33.25"`, `41°12'33.25"S`];
    const out = stages.map((t) => readAngleEntry(t));
    expect(out.map((o) => o.status)).toEqual(['ok', 'ok', 'ok', 'ok', 'ok', 'ok', 'ok', 'ok']);
    const last = out[out.length - 1];
    if (last.status === 'ok') within(last.latitudeDeg, -(41 + 12 / 60 + 33.25 / 3600), 1e-12, '°', 'southern latitude', { source: 'hand computation' });
  });

  it('says in words why a value is refused', () => {
    const cases: [string, RegExp][] = [
      ['91', /beyond the pole/],
      [`41°75'`, /60/],
      ['41,5', /comma/i],
      ['12 E', /longitude/],
    ];
    for (const [text, reason] of cases) {
      const e = readAngleEntry(text);
      expect(e.status, text).toBe('error');
      if (e.status === 'error') expect(e.reason, text).toMatch(reason);
    }
    expect(readAngleEntry('   ').status).toBe('empty');
  });
});

describe('readNumberEntry', () => {
  it('accepts plain decimals and refuses commas, words and out-of-range values with a reason', () => {
    expect(readNumberEntry('0.35', { positive: true })).toEqual({ status: 'ok', value: 0.35 });
    expect(readNumberEntry('0,35')).toMatchObject({ status: 'error', reason: expect.stringMatching(/decimal point/) as unknown });
    expect(readNumberEntry('abc')).toMatchObject({ status: 'error' });
    expect(readNumberEntry('0', { positive: true })).toMatchObject({ status: 'error', reason: 'must be greater than 0' });
    expect(readNumberEntry('9500', { max: 9000, unit: 'm' })).toMatchObject({ status: 'error', reason: 'must be at most 9000 m' });
    expect(readNumberEntry('1e999')).toMatchObject({ status: 'error', reason: 'too large' });
  });
});

describe('local time field', () => {
  it('round-trips local wall time to a UTC instant and refuses junk', () => {
    const ms = Date.UTC(2031, 5, 14, 21, 30, 15);
    expect(fromLocalInput(toLocalInput(ms))).toBe(new Date(ms).toISOString());
    expect(fromLocalInput('yesterday')).toBeNull();
  });
});

describe('classifyLocationError', () => {
  it('tells permission denied, location off and time-out apart (web codes 1, 2, 3 and native messages)', () => {
    expect(classifyLocationError({ code: 1, message: 'User denied Geolocation' }).kind).toBe('denied');
    expect(classifyLocationError({ code: 2, message: 'Position unavailable' }).kind).toBe('off');
    expect(classifyLocationError({ code: 3, message: 'Timeout expired' }).kind).toBe('timeout');
    expect(classifyLocationError(new Error('Location services are not enabled')).kind).toBe('off');
    expect(classifyLocationError(new Error('User denied location permission')).kind).toBe('denied');
    const msgs = new Set(['denied', 'off', 'timeout'].map((k) => classifyLocationError({ code: ['denied', 'off', 'timeout'].indexOf(k) + 1 }).message));
    expect(msgs.size).toBe(3);
  });
});
