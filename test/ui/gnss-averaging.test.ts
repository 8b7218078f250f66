// GNSS averaging: the freshness gate (before the capture, in the future, first fix of each watch
// session), the accuracy gate, outliers around the median, 1/accuracy² weights and the scatter in
// metres (checked against GeographicLib distances — geographiclib-geodesic 2.2, WGS 84).
import geodesic from 'geographiclib-geodesic';
import { describe, expect, it } from 'vitest';
import { averageFixes, FUTURE_MARGIN_MS, type RawFix } from '../../src/ui/gnss/index.ts';
import { within } from '../helpers/within.ts';

const GLIB = 'GeographicLib 2.2 (geographiclib-geodesic), WGS 84 inverse problem';
const wgs84 = new geodesic.Geodesic.Geodesic(6378137, 1 / 298.257223563);
const T = Date.UTC(2031, 5, 14, 21, 0, 0);
const LON = 21.5;
const fix = (latitudeDeg: number, accuracyM: number, dtS: number, sessionId = 's1', longitudeDeg = LON): RawFix =>
  ({ latitudeDeg, longitudeDeg, accuracyM, altitudeM: null, fixMs: T + dtS * 1000, sessionId });

// Invented capture: a cached first fix, five good fixes 3 s apart, and one of each kind of bad fix.
const good = [fix(41.00001, 2, 3), fix(41.00003, 4, 6), fix(41.00002, 2, 9), fix(41.00000, 1, 12), fix(41.00002, 2, 15)];
const capture = [
  fix(41.0004, 3, 0.5),                     // first of the session (often a cached position)
  good[0], good[1],
  fix(41.00002, 2, -30),                    // stamped before the capture started
  good[2],
  fix(41.00002, 50, 10),                    // device accuracy 50 m, worse than the 15 m gate
  good[3],
  fix(41.001, 3, 13),                       // about 111 m north of the others
  good[4],
  fix(41.00002, 2, 16 + FUTURE_MARGIN_MS / 1000 + 5), // in the future beyond the margin
];

describe('averageFixes', () => {
  const avg = averageFixes(capture, { captureStartMs: T, nowMs: T + 16_000 });

  it('gates each bad fix with its own reason and keeps the good ones', () => {
    expect(avg.verdicts.map((v) => v.reason)).toEqual([
      'first-of-session', null, null, 'before-capture', null, 'too-inaccurate', null, 'outlier', null, 'in-future',
    ]);
    expect(avg.n).toBe(5);
    expect(avg.spanS).toBe(12);
    expect(avg.status).toBe('ok');
  });

  it('weights by 1/accuracy² (hand computation)', () => {
    // Σw = 0.25 + 0.0625 + 0.25 + 1 + 0.25 = 1.8125; Σw·Δφ = (0.25·1 + 0.0625·3 + 0.25·2 + 0 + 0.25·2)e-5 = 1.4375e-5.
    within(avg.latitudeDeg ?? NaN, 41 + 1.4375e-5 / 1.8125, 1e-12, '°', 'weighted mean latitude', { source: 'hand computation' });
    within(avg.longitudeDeg ?? NaN, LON, 1e-12, '°', 'weighted mean longitude', { source: 'hand computation' });
    expect(avg.medianAccuracyM).toBe(2);
  });

  it('reports the weighted RMS north scatter in metres (not accuracy/√n)', () => {
    const mean = avg.latitudeDeg ?? NaN;
    let sw = 0, s2 = 0;
    for (const f of good) {
      const w = 1 / f.accuracyM ** 2;
      const d = wgs84.Inverse(mean, LON, f.latitudeDeg, LON).s12 ?? NaN;
      sw += w; s2 += w * d * d;
    }
    const expected = Math.sqrt(s2 / sw);
    within(avg.northScatterM ?? NaN, expected, 1e-6, 'm', 'north scatter', { source: GLIB });
    within(avg.scatterM ?? NaN, expected, 1e-6, 'm', 'horizontal scatter (one longitude)', { source: GLIB });
    // Suggested sigma: the north scatter (≈ 1.07 m; 1e-5° ≈ 1.1 m) or half the median accuracy
    // (1 m), whichever is larger, in arcseconds (GeographicLib length of 1″ of latitude at 41°).
    expect(expected).toBeGreaterThan(1);
    const mPerArcsec = wgs84.Inverse(41, LON, 41 + 1 / 3600, LON).s12 ?? NaN;
    within(avg.suggestedSigmaArcsec ?? NaN, expected / mPerArcsec, 1e-4, '″', 'suggested sigma', { source: GLIB });
  });

  it('waits for enough fixes and enough time, and says so', () => {
    const few = averageFixes(capture.slice(0, 3), { captureStartMs: T, nowMs: T + 16_000 });
    expect(few.status).toBe('too-few-fixes');
    expect(few.message).toMatch(/2 of 5 usable fixes/);
    expect(few.latitudeDeg).toBeNull();
    const short = averageFixes(capture, { captureStartMs: T, nowMs: T + 16_000, minSpanS: 30 });
    expect(short.status).toBe('too-short');
    expect(short.message).toMatch(/at least 30 s/);
  });

  it('drops the first fix of every watch session, not only the first one', () => {
    // Fixes 1–2 m apart with 1–4 m device accuracy: none is an outlier (radius floor 2 × median accuracy).
    const resumed = [...good, fix(41.00002, 2, 20, 's2'), fix(41.00002, 2, 21, 's2')];
    const v = averageFixes(resumed, { captureStartMs: T, nowMs: T + 30_000 }).verdicts.map((x) => x.reason);
    expect(v).toEqual(['first-of-session', null, null, null, null, 'first-of-session', null]);
  });

  it('refuses unreadable numbers instead of averaging NaN', () => {
    const bad = averageFixes([fix(41, 2, 1), fix(Number.NaN, 2, 2), fix(41, 2, 3)], { captureStartMs: T, nowMs: T + 5000, minFixes: 1, minSpanS: 0 });
    expect(bad.verdicts[1].reason).toBe('not-finite');
    expect(bad.n).toBe(1);
  });
});
