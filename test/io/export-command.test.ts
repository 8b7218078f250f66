// `arcfield export`: every CSV table into a folder, one table to stdout, GeoJSON of the stations,
// and the campaign file round trip — export → import → the same records and the same fit.
import { mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { run as runExport } from '../../src/cli/export-command.ts';
import { run as runImport } from '../../src/cli/import-command.ts';
import { demoCampaign } from '../../src/campaign/demo.ts';
import { solveCampaign } from '../../src/campaign/solve-campaign.ts';
import { loadCampaignFile } from '../../src/io/campaign-file.ts';
import { RECORD_TABLE_IDS } from '../../src/io/record-tables.ts';
import type { StationCollection } from '../../src/io/stations-geojson.ts';

let dir: string;
let out: string[];
let err: string[];
beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'arcfield-export-'));
  out = [];
  err = [];
  vi.spyOn(process.stdout, 'write').mockImplementation((s) => { out.push(String(s)); return true; });
  vi.spyOn(process.stderr, 'write').mockImplementation((s) => { err.push(String(s)); return true; });
  writeFileSync(join(dir, 'demo.json'), JSON.stringify(demoCampaign(), null, 2));
});
afterEach(() => {
  vi.restoreAllMocks();
  rmSync(dir, { recursive: true, force: true });
});

describe('arcfield export', () => {
  it('--to campaign, then importing every CSV table into an empty campaign gives the same records and the same fit', async () => {
    const path = join(dir, 'demo.json');
    expect(await runExport([path, '--to', 'campaign', '-o', join(dir, 'copy.json')])).toBe(0);
    const original = await loadCampaignFile(path);
    const copy = await loadCampaignFile(join(dir, 'copy.json'));
    expect(copy).toEqual(original);

    expect(await runExport([path, '--to', 'csv', '-o', join(dir, 'tables')])).toBe(0);
    expect(readdirSync(join(dir, 'tables')).sort()).toEqual(['arc.csv', 'coefficients.csv', 'exclusions.csv', 'figure.csv', 'gnss-fixes.csv', 'latitude.csv', 'residuals.csv', 'station-summary.csv', 'stations.csv']);
    const rebuilt = join(dir, 'rebuilt.json');
    const first = ['stations', 'latitude', 'arc', 'exclusions', 'gnss-fixes'] as const;
    expect([...first].sort()).toEqual([...RECORD_TABLE_IDS].sort());
    for (const [k, table] of first.entries()) {
      const args = [join(dir, 'tables', `${table}.csv`), '--table', table, '--into', rebuilt, ...(k === 0 ? ['--new', original.name] : [])];
      expect(await runImport(args), err.join('')).toBe(0);
    }
    const back = await loadCampaignFile(rebuilt);
    // Settings and description are campaign-level, not tables: carried over by hand for the comparison.
    const expected = structuredClone(original);
    delete expected.settings;
    delete expected.description;
    delete expected.id;
    expect(back).toEqual(expected);
    const same = (f: typeof original): unknown => solveCampaign(f, { model: 'ellipsoid', estimator: 'least-squares' }).figure;
    expect(same(back)).toEqual(same(expected));
  });

  it('writes one table to stdout with --table, formula-guarded text and untouched numbers', async () => {
    expect(await runExport([join(dir, 'demo.json'), '--to', 'csv', '--table', 'figure'])).toBe(0);
    const text = out.join('');
    expect(text.split('\r\n')[0]).toMatch(/^model,estimator,weighting,status,semi_major_axis_m,semi_major_axis_std_m,inverse_flattening/);
    expect(text.endsWith('\r\n')).toBe(true);
  });

  it('--to geojson: a FeatureCollection whose coordinates are [longitude, latitude]', async () => {
    expect(await runExport([join(dir, 'demo.json'), '--to', 'geojson'])).toBe(0);
    const fc = JSON.parse(out.join('')) as StationCollection;
    const demo = demoCampaign();
    expect(fc.type).toBe('FeatureCollection');
    expect(fc.features).toHaveLength(demo.stations.length);
    for (const f of fc.features) {
      const [lon, lat] = f.geometry?.coordinates ?? [NaN, NaN];
      expect(lon).toBe(demo.stations.find((s) => s.code === f.properties.code)?.longitudeDeg);
      expect(Math.abs(lon)).toBeLessThanOrEqual(180);
      expect(Math.abs(lat - (f.properties.latitudeDeg ?? NaN))).toBeLessThanOrEqual(5e-8);
    }
  });

  it('names bad options: unknown format, table without csv, csv without a table or folder', async () => {
    expect(await runExport([join(dir, 'demo.json'), '--to', 'kml'])).toBe(2);
    expect(err.join('')).toMatch(/--to: "kml" — must be one of csv, geojson, campaign/);
    err.length = 0;
    expect(await runExport([join(dir, 'demo.json'), '--to', 'csv'])).toBe(2);
    expect(err.join('')).toMatch(/name one table for stdout, or give -o DIR/);
    err.length = 0;
    expect(await runExport([join(dir, 'demo.json'), '--to', 'geojson', '--table', 'arc'])).toBe(2);
    expect(err.join('')).toMatch(/--table: "arc" — only with --to csv/);
  });
});
