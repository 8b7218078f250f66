// Reference ellipsoids by id, the user-defined figure's validation, and the derived parameters.
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import {
  ELLIPSOIDS, ELLIPSOID_IDS, customEllipsoid, eccentricitySquared, ellipsoidById, thirdFlattening,
} from '../../src/geodesy/index.ts';
import { within } from '../helpers/within.ts';

function refusal(run: () => unknown): InputError {
  try {
    run();
  } catch (error) {
    expect(error).toBeInstanceOf(InputError);
    return error as InputError;
  }
  throw new Error('expected an InputError, nothing was thrown');
}

describe('reference ellipsoids', () => {
  it('has the five of the issue, each with its defining document named', () => {
    expect([...ELLIPSOID_IDS]).toEqual(['wgs84', 'grs80', 'intl1924', 'clarke1866', 'airy1830']);
    for (const id of ELLIPSOID_IDS) {
      const e = ellipsoidById(id);
      expect(e).toBe(ELLIPSOIDS[id]);
      expect(e.id).toBe(id);
      expect(e.source.length).toBeGreaterThan(20);
      expect(Object.isFrozen(e)).toBe(true);
      within(e.flattening * e.inverseFlattening, 1, 2 * Number.EPSILON, '', `${id} f·(1/f)`, { source: 'definition' });
    }
  });
  it('keeps the defining numbers as published (check-values.md — from memory)', () => {
    expect(ELLIPSOIDS.wgs84.inverseFlattening).toBe(298.257223563);
    expect(ELLIPSOIDS.grs80.inverseFlattening).toBe(298.257222101);
    expect(ELLIPSOIDS.intl1924.semiMajorAxisM).toBe(6378388);
    expect(ELLIPSOIDS.intl1924.inverseFlattening).toBe(297);
    expect(ELLIPSOIDS.clarke1866.semiMajorAxisM).toBe(6378206.4);
    expect(ELLIPSOIDS.airy1830.semiMajorAxisM).toBe(6377563.396);
  });
  it('an unknown id is refused, listing the known ones', () => {
    const error = refusal(() => ellipsoidById('wgs-84'));
    expect(error.field).toBe('ellipsoid');
    expect(error.value).toBe('wgs-84');
    expect(error.reason).toBe('unknown ellipsoid; use one of wgs84, grs80, intl1924, clarke1866, airy1830');
    expect(refusal(() => ellipsoidById('toString')).field).toBe('ellipsoid');
  });
});

describe('customEllipsoid', () => {
  it('builds a validated figure from a and 1/f', () => {
    const e = customEllipsoid(6378000, 298, 'crew K figure');
    expect(e).toMatchObject({ id: 'custom', name: 'crew K figure', semiMajorAxisM: 6378000, inverseFlattening: 298, flattening: 1 / 298 });
  });
  it('accepts a sphere (1/f = Infinity) and a prolate figure (1/f ≤ −20)', () => {
    expect(customEllipsoid(6371000, Infinity).flattening).toBe(0);
    expect(customEllipsoid(6371000, -300).flattening).toBe(-1 / 300);
  });
  it('refuses a bad semi-major axis', () => {
    for (const a of [0, -6378137, NaN, Infinity]) {
      const error = refusal(() => customEllipsoid(a, 298));
      expect(error.field).toBe('semiMajorAxisM');
      expect(Object.is(error.value, a)).toBe(true);
    }
  });
  it('refuses |1/f| below 20 and non-numbers', () => {
    const error = refusal(() => customEllipsoid(6378137, 10));
    expect(error.field).toBe('inverseFlattening');
    expect(error.reason).toMatch(/^\|1\/f\| must be at least 20/);
    expect(refusal(() => customEllipsoid(6378137, 0)).field).toBe('inverseFlattening');
    expect(refusal(() => customEllipsoid(6378137, NaN)).field).toBe('inverseFlattening');
    expect(refusal(() => customEllipsoid(6378137, -Infinity)).field).toBe('inverseFlattening');
  });
});

describe('derived parameters', () => {
  it('e² = f(2 − f) and n = f/(2 − f) for a sphere and WGS 84', () => {
    expect(eccentricitySquared(0)).toBe(0);
    expect(thirdFlattening(0)).toBe(0);
    // n² relation: e² = 4n/(1 + n)² (Helmert 1880), an identity independent of the two formulas.
    const f = ELLIPSOIDS.wgs84.flattening;
    const n = thirdFlattening(f);
    within(eccentricitySquared(f), (4 * n) / (1 + n) ** 2, 2 * Number.EPSILON, '', 'e² from n', { source: 'e² = 4n/(1 + n)²', relative: true });
  });
});
