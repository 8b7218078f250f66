// The rigorous ellipsoid fit against arcs from GeographicLib (geographiclib-geodesic 2.2, the outside
// reference for meridian distances). Defining constants from check-values.md (from memory).
import { describe, expect, it } from 'vitest';
import { solveCampaign } from '../../src/campaign/index.ts';
import { exactCampaign, geographicLibArcM } from './helpers/exact-campaign.ts';
import { within } from '../helpers/within.ts';

const GLIB = 'GeographicLib 2.2 (geographiclib-geodesic) meridian arcs';
// WGS 84: a = 6 378 137 m, 1/f = 298.257 223 563 (NIMA TR8350.2 — from memory).
const WGS84 = { a: 6378137, invf: 298.257223563 };
// Clarke 1866: a = 6 378 206.4 m, b = 6 356 583.8 m (classical definition — from memory).
const CLARKE = { a: 6378206.4, invf: 6378206.4 / (6378206.4 - 6356583.8) };
const LATS = [5, 11, 17, 23, 29, 35, 41, 47, 53, 59, 65];

describe('rigorous ellipsoid fit', () => {
  for (const [name, e] of [['WGS 84', WGS84], ['Clarke 1866', CLARKE]] as const) {
    it(`recovers ${name} from exact arcs: a to 1 mm, 1/f to 1e-5`, () => {
      const r = solveCampaign(exactCampaign({ a: e.a, f: 1 / e.invf, latitudesDeg: LATS }), { model: 'ellipsoid' });
      expect(r.status).toBe('ok');
      expect(r.converged).toBe(true);
      within(r.figure?.semiMajorAxisM ?? 0, e.a, 1e-3, 'm', `${name} a`, { source: GLIB });
      within(r.figure?.inverseFlattening ?? 0, e.invf, 1e-5, '', `${name} 1/f`, { source: GLIB });
      // Quadrant: GeographicLib's equator-to-pole distance on the same ellipsoid.
      within(r.figure?.quadrantM ?? 0, geographicLibArcM(e.a, 1 / e.invf, 0, 90), 2e-3, 'm', `${name} quadrant`, { source: GLIB });
      for (const rd of r.readings.filter((x) => x.kind === 'arc')) within(rd.residual, 0, 2e-3, 'm', `residual ${rd.id}`, { source: GLIB });
      expect(r.readings.some((x) => x.suspect)).toBe(false);
    });
  }

  it('southern latitudes and an arc across the equator: same figure (G is odd, arcs are lengths)', () => {
    const lats = [-40, -31, -22, -13, -4, 5, 14, 23];
    const r = solveCampaign(exactCampaign({ a: WGS84.a, f: 1 / WGS84.invf, latitudesDeg: lats }));
    expect(r.status).toBe('ok');
    within(r.figure?.semiMajorAxisM ?? 0, WGS84.a, 1e-3, 'm', 'a', { source: GLIB });
    within(r.figure?.inverseFlattening ?? 0, WGS84.invf, 1e-5, '', '1/f', { source: GLIB });
    const degree = solveCampaign(exactCampaign({ a: WGS84.a, f: 1 / WGS84.invf, latitudesDeg: lats }), { model: 'degree2', weighting: 'equal' });
    within(degree.figure?.inverseFlattening ?? 0, WGS84.invf, 1e-3, '', 'degree2 1/f', { source: GLIB });
  });

  it('WGS 84 quadrant recovered is the published 10 001 965.729 m', () => {
    // Meridian quadrant 10 001 965.7293 m (NIMA TR8350.2 derived constants — from memory).
    const r = solveCampaign(exactCampaign({ a: WGS84.a, f: 1 / WGS84.invf, latitudesDeg: LATS }));
    within(r.figure?.quadrantM ?? 0, 10001965.7293, 2e-3, 'm', 'quadrant', { source: 'NIMA TR8350.2 (from memory)' });
  });

  it('is a least-squares optimum: the GLS objective with GeographicLib distances rises in every direction', () => {
    // Brute force around the reported (a, f): recompute vᵀΣ⁻¹v with GeographicLib for perturbed
    // figures, Σ built here from its definition (arc sigma on the diagonal, −M(φ)²σ_φ² between
    // consecutive arcs that share a station; M(φ) = a(1−e²)/(1−e²sin²φ)^{3/2} on WGS 84).
    const rec = exactCampaign({ a: WGS84.a, f: 1 / WGS84.invf, latitudesDeg: LATS, seed: 7, sigmaArcsec: 0.2, sigmaM: 0.5 });
    const r = solveCampaign(rec, { model: 'ellipsoid', estimator: 'least-squares' });
    const a = r.figure?.semiMajorAxisM ?? 0;
    const f = r.figure?.flattening ?? 0;
    const arcSigma = new Map(r.readings.filter((x) => x.kind === 'arc').map((x) => [x.id, x]));
    const lat = new Map(r.stations.map((s) => [s.code, s.latitudeDeg]));
    const sig = new Map(r.stations.map((s) => [s.code, s.sigmaArcsec]));
    const e2 = (2 - 1 / WGS84.invf) / WGS84.invf;
    const mPerArcsec = (code: string): number => {
      const sn = Math.sin(((lat.get(code) ?? 0) * Math.PI) / 180);
      return ((WGS84.a * (1 - e2)) / (1 - e2 * sn * sn) ** 1.5) * Math.PI / 648000 * (sig.get(code) ?? 0);
    };
    const arcs = rec.arcReadings;
    const n = arcs.length;
    // Σ and its inverse by Gauss–Jordan (n = 10; independent of the engine's Cholesky).
    const S = arcs.map((ai, i) => arcs.map((ak, k) => {
      if (i === k) return ai.sigmaM ** 2 + mPerArcsec(ai.fromStation) ** 2 + mPerArcsec(ai.toStation) ** 2;
      const shared = [ai.fromStation, ai.toStation].find((c) => c === ak.fromStation || c === ak.toStation);
      if (shared === undefined) return 0;
      const sameRole = (ai.fromStation === shared) === (ak.fromStation === shared);
      return (sameRole ? 1 : -1) * mPerArcsec(shared) ** 2;
    }));
    const P = S.map((row, i) => [...row, ...row.map((_, k) => (i === k ? 1 : 0))]);
    for (let c = 0; c < n; c++) {
      const piv = P[c][c];
      P[c] = P[c].map((v) => v / piv);
      for (let i = 0; i < n; i++) if (i !== c) { const m = P[i][c]; P[i] = P[i].map((v, k) => v - m * P[c][k]); }
    }
    const W = P.map((row) => row.slice(n));
    const objective = (aa: number, ff: number): number => {
      const v = arcs.map((arc) => arc.distanceM - geographicLibArcM(aa, ff, lat.get(arc.fromStation) ?? 0, lat.get(arc.toStation) ?? 0));
      return v.reduce((sum, vi, i) => sum + vi * v.reduce((t, vk, k) => t + W[i][k] * vk, 0), 0);
    };
    expect(arcSigma.size).toBe(10);
    const base = objective(a, f);
    const sa = r.figure?.semiMajorAxisStdM ?? 1;
    const sf = (r.figure?.inverseFlatteningStd ?? 1) * f * f;
    for (const [da, df] of [[1, 0], [-1, 0], [0, 1], [0, -1], [1, 1], [-1, -1], [1, -1], [-1, 1]]) {
      expect(objective(a + 0.05 * sa * da, f + 0.05 * sf * df)).toBeGreaterThan(base);
    }
    // The χ² statistic is that vᵀΣ⁻¹v (GeographicLib against our series: sub-millimetre, so 1e-4 relative).
    within(r.quality.chiSquare?.statistic ?? NaN, base, 1e-4, '', 'χ² = vᵀΣ⁻¹v', { relative: true, source: GLIB });
    // Standardized residuals are vᵢ/√(Q_vv)ᵢᵢ over one common robust scale, Q_vv = Σ − J Q Jᵀ with
    // J = [s/a, ∂s/∂f] from GeographicLib (central difference over ±1e-7 in f) and Q = (JᵀΣ⁻¹J)⁻¹.
    const h = 1e-7;
    const J = arcs.map((arc) => {
      const l1 = lat.get(arc.fromStation) ?? 0;
      const l2 = lat.get(arc.toStation) ?? 0;
      return [geographicLibArcM(a, f, l1, l2) / a, (geographicLibArcM(a, f + h, l1, l2) - geographicLibArcM(a, f - h, l1, l2)) / (2 * h)];
    });
    const N = [0, 1].map((p) => [0, 1].map((q) => J.reduce((t, ji, i) => t + ji[p] * J.reduce((u, jk, k) => u + W[i][k] * jk[q], 0), 0)));
    const det = N[0][0] * N[1][1] - N[0][1] * N[1][0];
    const Q = [[N[1][1] / det, -N[0][1] / det], [-N[1][0] / det, N[0][0] / det]];
    const ratios = arcs.map((arc, i) => {
      const qvv = S[i][i] - [0, 1].reduce((t, p) => t + [0, 1].reduce((u, q) => u + J[i][p] * Q[p][q] * J[i][q], 0), 0);
      const v = arc.distanceM - geographicLibArcM(a, f, lat.get(arc.fromStation) ?? 0, lat.get(arc.toStation) ?? 0);
      return (arcSigma.get(arc.id)?.standardizedResidual ?? NaN) * Math.sqrt(qvv) / v;
    });
    // 1/scale, the same for every arc, and the scale is at least 1 (floored at the a-priori sigmas).
    for (const q of ratios) within(q, ratios[0], 1e-3, '', 'z·√Q_vv / v', { relative: true, source: 'Q_vv from its definition' });
    expect(ratios[0]).toBeLessThanOrEqual(1 + 1e-9);
    // Σ rᵢ = n − 2 (the redundancies of a projection).
    within([...arcSigma.values()].reduce((t, x) => t + (x.redundancy ?? NaN), 0), n - 2, 1e-9, '', 'Σ redundancy', { source: 'trace of Q_vv·P = n − p' });
  });

  it('with seeded noise: within 4 standard errors of WGS 84, and the errors are plausible', () => {
    const seed = 424242;
    console.log(`rigorous noisy recovery seed ${seed}`);
    const r = solveCampaign(exactCampaign({ a: WGS84.a, f: 1 / WGS84.invf, latitudesDeg: LATS, seed, sigmaArcsec: 0.1, sigmaM: 1 }));
    const fig = r.figure;
    if (!fig || fig.semiMajorAxisStdM === null || fig.inverseFlatteningStd === null) throw new Error('no figure');
    expect(Math.abs(fig.semiMajorAxisM - WGS84.a)).toBeLessThan(4 * fig.semiMajorAxisStdM);
    expect(Math.abs(fig.inverseFlattening - WGS84.invf)).toBeLessThan(4 * fig.inverseFlatteningStd);
    // 0.1″ ≈ 3 m per station: a known to tens of metres, 1/f to about one unit (order of magnitude).
    expect(fig.semiMajorAxisStdM).toBeGreaterThan(2);
    expect(fig.semiMajorAxisStdM).toBeLessThan(200);
  });

  for (const estimator of ['least-absolute', 'huber', 'tukey'] as const) {
    it(`${estimator} ignores one 80 m arc blunder and flags it`, () => {
      const rec = exactCampaign({ a: WGS84.a, f: 1 / WGS84.invf, latitudesDeg: LATS, seed: 99, sigmaArcsec: 0.05, sigmaM: 0.5, arcBlunders: { 4: 80 } });
      const r = solveCampaign(rec, { estimator });
      expect(r.status).toBe('ok');
      within(r.figure?.inverseFlattening ?? 0, WGS84.invf, 1.5, '', `${estimator} 1/f`, { source: GLIB });
      within(r.figure?.semiMajorAxisM ?? 0, WGS84.a, 60, 'm', `${estimator} a`, { source: GLIB });
      const flagged = r.readings.filter((x) => x.suspect).map((x) => x.id);
      expect(flagged).toEqual(['a-5']);
      expect(r.readings.find((x) => x.id === 'a-5')?.hint).toMatch(/^re-observe arc K05–K06: \+\d+\.\dσ$/);
    });
  }

  it('minimax on exact arcs also recovers WGS 84 (no covariance: uncertainties null)', () => {
    const r = solveCampaign(exactCampaign({ a: WGS84.a, f: 1 / WGS84.invf, latitudesDeg: LATS }), { estimator: 'minimax' });
    within(r.figure?.inverseFlattening ?? 0, WGS84.invf, 1e-4, '', 'minimax 1/f', { source: GLIB });
    within(r.figure?.semiMajorAxisM ?? 0, WGS84.a, 5e-3, 'm', 'minimax a', { source: GLIB });
    expect(r.figure?.semiMajorAxisStdM).toBeNull();
  });
});
