// `arcfield plan`: the JSON shape the issue fixes, ranking order, and named refusals.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { run } from '../../src/cli/plan-command.ts';
import { simulatedCampaign } from './helpers/simulated-campaign.ts';

let dir: string;
let out: string[];
let err: string[];
beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'arcfield-plan-'));
  out = [];
  err = [];
  vi.spyOn(process.stdout, 'write').mockImplementation((s) => { out.push(String(s)); return true; });
  vi.spyOn(process.stderr, 'write').mockImplementation((s) => { err.push(String(s)); return true; });
  writeFileSync(join(dir, 'c.json'), JSON.stringify(simulatedCampaign({ latitudesDeg: [20, 25, 30, 35, 40], sigmaArcsec: 0.3, sigmaM: 0.4, repeats: 3 })));
});
afterEach(() => {
  vi.restoreAllMocks();
  rmSync(dir, { recursive: true, force: true });
});

describe('arcfield plan', () => {
  it('--json prints {"candidates": [{latitudeDeg, inverseFlatteningStd, semiMajorAxisStdM, …}]} ranked best first', async () => {
    expect(await run([join(dir, 'c.json'), '--from', '0', '--to', '60', '--step', '10', '--json'])).toBe(0);
    const doc = JSON.parse(out.join('')) as { candidates: { latitudeDeg: number; inverseFlatteningStd: number; semiMajorAxisStdM: number; kind: string }[] };
    expect(doc.candidates.length).toBeGreaterThan(5);
    for (const c of doc.candidates) {
      expect(typeof c.latitudeDeg).toBe('number');
      expect(c.inverseFlatteningStd).toBeGreaterThan(0);
      expect(c.semiMajorAxisStdM).toBeGreaterThan(0);
    }
    const stds = doc.candidates.map((c) => c.inverseFlatteningStd);
    expect(stds).toEqual([...stds].sort((x, y) => x - y));
  });

  it('prints a readable ranking with the assumptions', async () => {
    expect(await run([join(dir, 'c.json'), '--from', '0', '--to', '60', '--step', '10', '--top', '3'])).toBe(0);
    const text = out.join('');
    expect(text).toMatch(/^rank +candidate +σ\(1\/f\) after/m);
    expect(text.match(/^ +\d+ {2}/gm)?.length).toBe(3);
    expect(text).toMatch(/assumptions:/);
  });

  it('names a bad or missing range value', async () => {
    expect(await run([join(dir, 'c.json'), '--from', '0', '--to', 'north', '--step', '10'])).toBe(2);
    expect(err.join('')).toMatch(/--to: "north" — a number of decimal degrees/);
    err.length = 0;
    expect(await run([join(dir, 'c.json'), '--from', '0', '--to', '95', '--step', '10'])).toBe(2);
    expect(err.join('')).toMatch(/--to: 95 — a latitude in decimal degrees within \[-90, 90\]/);
    err.length = 0;
    expect(await run([join(dir, 'c.json'), '--from', '0'])).toBe(2);
    expect(err.join('')).toMatch(/give all three of --from, --to and --step/);
  });
});
