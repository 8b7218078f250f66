// The demo campaign: valid, deterministic, its arcs consistent with GeographicLib on WGS 84, and the
// default fit recovers WGS 84 within the tolerance stated in README.md and flags exactly the
// planted blunders. WGS 84 constants from check-values.md (NIMA TR8350.2 — from memory).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { DEMO_ARC_BLUNDERS_M, DEMO_BLUNDERS, DEMO_STATIONS, demoCampaign, solveCampaign, validateCampaign } from '../../src/campaign/index.ts';
import { campaignFileText } from '../../src/io/campaign-file.ts';
import { geographicLibArcM } from './helpers/exact-campaign.ts';
import { within } from '../helpers/within.ts';

const A = 6378137;
const INVF = 298.257223563;
const NIMA = 'NIMA TR8350.2 (from memory)';
// README.md "Office command line": the default fit of the demo recovers a within ±50 m, 1/f within
// ±0.5 and the quadrant within ±50 m (about 1.5 standard errors of this campaign: it gives
// a = 6 378 167.8 ± 34.1 m, 1/f = 298.246 ± 0.422, quadrant 10 002 013.3 ± 34.0 m).
const README_A_TOLERANCE_M = 50;
const README_INVF_TOLERANCE = 0.5;
const README_QUADRANT_TOLERANCE_M = 50;

describe('demo campaign', () => {
  const file = demoCampaign();

  it('is a valid campaign file and is deterministic', () => {
    expect(() => validateCampaign(file)).not.toThrow();
    expect(JSON.stringify(demoCampaign())).toBe(JSON.stringify(file));
    expect(file.stations.map((s) => s.code)).toEqual(Array.from({ length: 12 }, (_, i) => `K${String(i + 1).padStart(2, '0')}`));
  });

  it('public/examples/demo-campaign.json is the generated demo (npx arcfield demo -o … --force)', () => {
    const committed = readFileSync(new URL('../../public/examples/demo-campaign.json', import.meta.url), 'utf8');
    // The CLI writes the validated file (zod's output, keys in schema order).
    expect(committed).toBe(campaignFileText(validateCampaign(file)));
  });

  it('arcs are GeographicLib WGS 84 meridian arcs between the scenario latitudes, carried to height, within 5σ of noise', () => {
    // Independent of src/geodesy: the arc from GeographicLib's inverse problem, the meridian radius
    // M as its numerical derivative (central difference over ±0.01°, error ~M″δ²/6 ≈ 1e-4 relative
    // of a 100 m correction), the height term s·h/M.
    const dms = (d: readonly [number, number, number]): number => d[0] + d[1] / 60 + d[2] / 3600;
    const station = new Map(DEMO_STATIONS.map((s) => [s.code, s]));
    const meanHeight = new Map(file.stations.map((s) => [s.code, s.heightM ?? 0]));
    for (const arc of file.arcReadings) {
      const from = station.get(arc.fromStation);
      const to = station.get(arc.toStation);
      if (!from || !to) throw new Error(`unknown station in ${arc.id}`);
      const l1 = dms(from.dms);
      const l2 = dms(to.dms);
      const s0 = geographicLibArcM(A, 1 / INVF, l1, l2);
      const mid = (l1 + l2) / 2;
      const d = 0.01;
      const M = geographicLibArcM(A, 1 / INVF, mid - d, mid + d) / ((2 * d * Math.PI) / 180);
      const h = arc.meanHeightM ?? ((meanHeight.get(arc.fromStation) ?? 0) + (meanHeight.get(arc.toStation) ?? 0)) / 2;
      const expected = s0 * (M + h) / M + (DEMO_ARC_BLUNDERS_M[arc.id] ?? 0);
      within(arc.distanceM, expected, 5 * arc.sigmaM, 'm', `${arc.id} against GeographicLib`, { source: 'GeographicLib 2.2 (geographiclib-geodesic), WGS 84' });
    }
  });

  it('the default fit recovers WGS 84 within the README tolerance', () => {
    const r = solveCampaign(file);
    expect(r.status).toBe('ok');
    expect(r.model).toBe('ellipsoid');
    within(r.figure?.semiMajorAxisM ?? 0, A, README_A_TOLERANCE_M, 'm', 'demo a', { source: NIMA });
    within(r.figure?.inverseFlattening ?? 0, INVF, README_INVF_TOLERANCE, '', 'demo 1/f', { source: NIMA });
    // Quadrant 10 001 965.7293 m (NIMA TR8350.2 derived constants — from memory).
    within(r.figure?.quadrantM ?? 0, 10001965.7293, README_QUADRANT_TOLERANCE_M, 'm', 'demo quadrant', { source: NIMA });
  });

  it('flags exactly the planted blunders, with hints naming them', () => {
    const r = solveCampaign(file);
    const flagged = r.readings.filter((x) => x.suspect && !x.excluded).map((x) => x.id).sort();
    expect(flagged).toEqual([...DEMO_BLUNDERS.latitudeReadingIds, ...DEMO_BLUNDERS.arcReadingIds].sort());
    expect(r.readings.find((x) => x.id === 'a-K06-K07')?.hint).toMatch(/^re-observe arc K06–K07: \+\d+\.\dσ$/);
    expect(r.readings.find((x) => x.id === 'r-K04-3')?.hint).toMatch(/^re-observe K04: astronomic latitude reading r-K04-3 \+\d+\.\dσ$/);
    expect(r.readings.find((x) => x.id === 'r-K09-5')?.hint).toMatch(/^re-observe K09: astronomic latitude reading r-K09-5 \u2212\d+\.\dσ$/);
    // The crew's own exclusion is reported as excluded.
    expect(r.readings.find((x) => x.id === 'r-K02-6')).toMatchObject({ excluded: true });
  });

  it('shows the invented deflections at the GNSS stations (ξ within 0.25″ of the scenario)', () => {
    const r = solveCampaign(file);
    // Scenario values written in src/campaign/demo.ts: K01 +0.04″, K04 −0.05″, K07 −0.04″, K11 −0.02″.
    const scenario: Record<string, number> = { K01: 0.04, K04: -0.05, K07: -0.04, K11: -0.02 };
    for (const [code, xi] of Object.entries(scenario)) {
      const s = r.stations.find((x) => x.code === code);
      within(s?.deflectionNorthArcsec ?? 99, xi, 0.25, 'arcsec', `ξ at ${code}`, { source: 'demo scenario (invented)' });
    }
  });

  it('every model and estimator runs on the demo and says what it did', () => {
    for (const model of ['degree', 'degree2', 'ellipsoid'] as const) {
      for (const estimator of ['least-squares', 'least-absolute', 'minimax', 'huber', 'tukey'] as const) {
        const r = solveCampaign(file, { model, estimator });
        expect(['ok', 'not-converged']).toContain(r.status);
        expect(r.reason.length).toBeGreaterThan(5);
        within(r.figure?.inverseFlattening ?? 0, INVF, 15, '', `${model}/${estimator} 1/f (loose sanity bound)`, { source: NIMA });
      }
    }
  });
});
