// Validation of the campaign file: the zod schema plus the cross-record checks, every problem listed
// with its field path, the offending value and a reason. Expected lists are written by hand from the
// fixtures (test/fixtures/campaign/*.json), not produced by the validator.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ValidationError } from '../../src/errors.ts';
import { checkCampaignFile, validateCampaign, checkCampaignRecords } from '../../src/campaign/index.ts';

const fixture = (name: string): unknown => JSON.parse(readFileSync(new URL(`../fixtures/campaign/${name}`, import.meta.url), 'utf8'));

describe('validateCampaign', () => {
  it('accepts the issue-2 minimal shape and a full small file', () => {
    const minimal = {
      format: 'arcfield-campaign', version: 1, name: 'minimal',
      stations: [{ code: 'K01', heightM: 240, longitudeDeg: -3.25 }, { code: 'K02' }],
      latitudeReadings: [{ id: 'r-001', station: 'K01', kind: 'astronomic', latitudeDeg: 12.3456789, sigmaArcsec: 0.4, observedAt: '2026-06-02T21:14:00Z' }],
      arcReadings: [{ id: 'a-001', fromStation: 'K01', toStation: 'K02', distanceM: 221870.412, sigmaM: 0.25 }],
    };
    expect(validateCampaign(minimal).stations).toHaveLength(2);
    const file = validateCampaign(fixture('small-valid.json'));
    expect(file.exclusions?.[0].readingId).toBe('r-004');
  });

  it('lists every problem of the broken fixture with field, value and reason', () => {
    const check = checkCampaignFile(fixture('broken.json'), 'broken.json');
    expect(check.ok).toBe(false);
    const got = check.problems.map((p) => `${p.field} = ${JSON.stringify(p.value)}`);
    // One entry per mistake planted in broken.json (written by hand).
    const expected = [
      'stations[2].code = "K 3"',
      'stations[2].colour = "red"',
      'latitudeReadings[0].latitudeDeg = 91.5',
      'latitudeReadings[1].kind = "astro"',
      'latitudeReadings[1].sigmaArcsec = -0.4',
      'latitudeReadings[1].observedAt = "yesterday"',
      'arcReadings[0].distanceM = "221870"',
      'arcReadings[0].sigmaM = 0',
      'stations[1].code = "K01"',              // duplicate code
      'latitudeReadings[1].id = "r-001"',      // duplicate id
      'latitudeReadings[1].station = "K09"',   // no such station
      'arcReadings[0].toStation = "K01"',      // same station twice
      'exclusions[0].readingId = "r-404"',     // no such reading
    ];
    expect(new Set(got)).toEqual(new Set(expected));
    expect(got).toHaveLength(expected.length);
    for (const p of check.problems) {
      expect(p.reason.length).toBeGreaterThan(3);
      expect(p.source).toBe('broken.json');
    }
    expect(check.problems.find((p) => p.field === 'stations[1].code')?.reason).toMatch(/duplicate station code/);
    expect(check.problems.find((p) => p.field === 'exclusions[0].readingId')?.reason).toMatch(/no latitude or arc reading/);
  });

  it('throws ValidationError whose message names every field and value', () => {
    try {
      validateCampaign(fixture('broken.json'), 'broken.json');
      expect.fail('expected a ValidationError');
    } catch (err) {
      expect(err).toBeInstanceOf(ValidationError);
      const e = err as ValidationError;
      expect(e.problems).toHaveLength(13);
      expect(e.message).toContain('broken.json: latitudeReadings[0].latitudeDeg: 91.5 — above 90°');
      expect(e.message).toContain('arcReadings[0].sigmaM: 0 — sigma must be greater than 0');
    }
  });

  it('refuses non-finite numbers from in-memory input (JSON cannot carry them, the app can)', () => {
    const doc = {
      format: 'arcfield-campaign', version: 1, name: 'nan',
      stations: [{ code: 'K01', heightM: Number.NaN }, { code: 'K02' }],
      latitudeReadings: [{ id: 'r-1', station: 'K01', kind: 'geodetic', latitudeDeg: Number.POSITIVE_INFINITY, sigmaArcsec: 0.1, observedAt: '2026-06-02T21:14:00Z' }],
      arcReadings: [{ id: 'a-1', fromStation: 'K01', toStation: 'K02', distanceM: 1000, sigmaM: Number.NaN }],
    };
    const check = checkCampaignFile(doc);
    expect(check.ok).toBe(false);
    const fields = check.problems.map((p) => p.field).sort();
    expect(fields).toEqual(['arcReadings[0].sigmaM', 'latitudeReadings[0].latitudeDeg', 'stations[0].heightM']);
    expect(Object.is(check.problems.find((p) => p.field === 'stations[0].heightM')?.value, Number.NaN)).toBe(true);
  });

  it('names a wrong format tag, a wrong version and a document that is not an object', () => {
    const check = checkCampaignFile({ format: 'other', version: 2, name: 'x', stations: [], latitudeReadings: [], arcReadings: [] });
    expect(check.problems.map((p) => p.field)).toEqual(['format', 'version']);
    const notObject = checkCampaignFile([1, 2]);
    expect(notObject.problems[0].field).toBe('(document)');
  });

  it('names an unknown reference ellipsoid with the known ids', () => {
    const doc = { ...(fixture('small-valid.json') as object), settings: { referenceEllipsoid: 'WGS-84' } };
    const check = checkCampaignFile(doc);
    expect(check.problems).toEqual([{ field: 'settings.referenceEllipsoid', value: 'WGS-84', reason: expect.stringMatching(/unknown ellipsoid; use one of wgs84, /) as string }]);
  });

  it('checkCampaignRecords runs the cross checks on typed records', () => {
    const problems = checkCampaignRecords({
      name: 'x', stations: [{ code: 'K01' }],
      latitudeReadings: [], arcReadings: [{ id: 'a', fromStation: 'K01', toStation: 'K02', distanceM: 1, sigmaM: 1 }],
    });
    expect(problems).toEqual([{ field: 'arcReadings[0].toStation', value: 'K02', reason: 'no station with this code in stations' }]);
  });
});
