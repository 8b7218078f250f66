// Station latitude reduction: weighted Huber location with MAD scale floored at the a-priori
// sigmas. Expected values are hand-computed in the comments (Huber's estimating equation
// Σψ(uᵢ) = 0 solved on paper), not taken from the code under test.
import { describe, expect, it } from 'vitest';
import { reduceStationLatitudes, type LatitudeReading } from '../../src/campaign/index.ts';
import { within } from '../helpers/within.ts';

const at = '2026-06-02T21:14:00Z';
const astro = (id: string, station: string, offsetArcsec: number, sigmaArcsec: number, baseDeg = 30): LatitudeReading =>
  ({ id, station, kind: 'astronomic', latitudeDeg: baseDeg + offsetArcsec / 3600, sigmaArcsec, observedAt: at });
const geod = (id: string, station: string, offsetArcsec: number, sigmaArcsec: number, baseDeg = 30): LatitudeReading =>
  ({ id, station, kind: 'geodetic', latitudeDeg: baseDeg + offsetArcsec / 3600, sigmaArcsec, observedAt: at });
const HAND = 'hand computation (see comment)';

describe('reduceStationLatitudes', () => {
  it('one reading is its own latitude with its own sigma', () => {
    const [s] = reduceStationLatitudes([{ code: 'K01' }], [astro('r1', 'K01', 0.7, 0.4)]);
    const e = s.byKind.astronomic;
    within((e?.latitudeDeg ?? 0) - 30, 0.7 / 3600, 1e-13, 'deg', 'latitude', { source: HAND });
    expect(e?.standardErrorArcsec).toBe(0.4);
    expect(e?.readings[0]).toMatchObject({ residualArcsec: 0, standardizedResidual: 0, suspect: false });
    expect(s.deflectionNorthArcsec).toBeNull();
  });

  it('two readings: weighted mean, a-priori error scaled by their disagreement, a hint instead of a flag', () => {
    // offsets 0″ and 1.5″, σ 0.25″ each: mean 0.75″; χ = 1.5/√(0.125) = 4.243 → se = (0.25/√2)·4.243 = 0.75″.
    const [s] = reduceStationLatitudes([{ code: 'K02' }], [astro('r1', 'K02', 0, 0.25), astro('r2', 'K02', 1.5, 0.25)]);
    const e = s.byKind.astronomic;
    within(((e?.latitudeDeg ?? 0) - 30) * 3600, 0.75, 1e-9, 'arcsec', 'mean', { source: HAND });
    within(e?.standardErrorArcsec ?? 0, 0.75, 1e-12, 'arcsec', 'standard error', { source: HAND });
    within(e?.readings[1].standardizedResidual ?? 0, 1.5 / Math.sqrt(0.125), 1e-9, '', 'standardized', { source: HAND });
    expect(e?.readings.some((r) => r.suspect)).toBe(false);
    expect(e?.readings[0].hint).toMatch(/^observe K02 again: its two astronomic latitude readings disagree by 4\.2σ$/);
  });

  it('five readings with one blunder: Huber location 0.1″ exactly, the blunder flagged', () => {
    // offsets [0, 0.2, −0.2, 0.1, 5.0]″, σ 0.2″. Weighted median 0.1″; |u| = [0.5,0.5,1.5,0,24.5], MAD
    // scale 1.4826·0.5 = 0.741 → floored to 1. With −0.2 and 5.0 beyond k = 1.345 (ψ = ∓k, cancelling),
    // Σψ = (0.3 − 3μ)/0.2 = 0 → μ = 0.1″; consistent (−0.2 → u = −1.5, 0 → u = −0.5).
    const offsets = [0, 0.2, -0.2, 0.1, 5.0];
    const readings = offsets.map((o, i) => astro(`r${i}`, 'K03', o, 0.2));
    const [s] = reduceStationLatitudes([{ code: 'K03' }], readings);
    const e = s.byKind.astronomic;
    if (!e) throw new Error('no estimate');
    within((e.latitudeDeg - 30) * 3600, 0.1, 1e-8, 'arcsec', 'Huber location', { source: HAND });
    expect(e.converged).toBe(true);
    // se² = s²·[Σψ²/(n−1)]/[Σψ′/n]²/Σw: Σψ² = 0.25+0.25+0+2·1.345², Σψ′ = 3, Σw = 5/0.04.
    const k = 1.345;
    const seHand = Math.sqrt((0.5 + 2 * k * k) / 4) / (3 / 5) * (0.2 / Math.sqrt(5));
    within(e.standardErrorArcsec, seHand, 1e-9, 'arcsec', 'standard error', { source: HAND });
    within(e.readings[4].standardizedResidual, 24.5, 1e-6, '', 'blunder standardized residual', { source: HAND });
    expect(e.readings.map((r) => r.suspect)).toEqual([false, false, false, false, true]);
    expect(e.readings[4].hint).toBe('re-observe K03: astronomic latitude reading r4 +24.5σ');
    // spread: unfloored MAD scale 1.4826·0.5 times σ 0.2″.
    within(e.spreadArcsec, 1.482602218505602 * 0.5 * 0.2, 1e-9, 'arcsec', 'spread', { source: HAND });
  });

  it('identical repeats: zero residuals, no flags, the a-priori standard error (special values)', () => {
    const readings = [astro('a', 'K04', 0, 0.3), astro('b', 'K04', 0, 0.3), astro('c', 'K04', 0, 0.3)];
    const e = reduceStationLatitudes([{ code: 'K04' }], readings)[0].byKind.astronomic;
    expect(e?.readings.map((r) => Object.is(r.residualArcsec, 0) || r.residualArcsec === 0)).toEqual([true, true, true]);
    expect(e?.readings.some((r) => r.suspect)).toBe(false);
    within(e?.standardErrorArcsec ?? 0, 0.3 / Math.sqrt(3), 1e-15, 'arcsec', 'a-priori se', { source: HAND });
  });

  it('an excluded reading is left out of the mean and reported excluded; a fitting one is offered back', () => {
    const readings = [astro('a', 'K05', 0, 0.3), astro('b', 'K05', 0.2, 0.3), astro('c', 'K05', -0.2, 0.3), astro('d', 'K05', 0.1, 0.3)];
    const [s] = reduceStationLatitudes([{ code: 'K05' }], readings, { excludedIds: new Set(['d']) });
    const e = s.byKind.astronomic;
    within(((e?.latitudeDeg ?? 0) - 30) * 3600, 0, 1e-9, 'arcsec', 'mean of a, b, c', { source: HAND });
    expect(e?.count).toBe(3);
    expect(e?.readings[3]).toMatchObject({ excluded: true, suspect: false });
    within(e?.readings[3].residualArcsec ?? 0, 0.1, 1e-9, 'arcsec', 'excluded residual', { source: HAND });
    expect(e?.readings[3].hint).toMatch(/consider restoring d/);
  });

  it('keeps astronomic and geodetic apart and gives the north–south deflection ξ = Φ − φ', () => {
    const readings = [astro('a1', 'K06', 2.0, 0.3), astro('a2', 'K06', 2.2, 0.3), astro('a3', 'K06', 1.8, 0.3), geod('g1', 'K06', -0.5, 0.01)];
    const [s] = reduceStationLatitudes([{ code: 'K06' }, { code: 'K07' }], readings);
    within(s.deflectionNorthArcsec ?? 0, 2.5, 1e-8, 'arcsec', 'ξ', { source: HAND });
    within(s.deflectionNorthStdArcsec ?? 0, Math.hypot(0.3 / Math.sqrt(3), 0.01), 1e-9, 'arcsec', 'σξ', { source: HAND });
    expect(s.byKind.geodetic?.count).toBe(1);
    const empty = reduceStationLatitudes([{ code: 'K06' }, { code: 'K07' }], readings)[1];
    expect(empty.byKind).toEqual({});
  });
});
