// `arcfield import`: writes the whole campaign only when every row is good; a rejected file leaves
// the campaign file byte-for-byte as it was.
import { mkdtempSync, readFileSync, rmSync, writeFileSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { run } from '../../src/cli/import-command.ts';
import { sampleCampaign } from './sample-campaign.ts';

let dir: string;
let out: string[];
let err: string[];

beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'arcfield-import-'));
  out = [];
  err = [];
  vi.spyOn(process.stdout, 'write').mockImplementation((s) => { out.push(String(s)); return true; });
  vi.spyOn(process.stderr, 'write').mockImplementation((s) => { err.push(String(s)); return true; });
});
afterEach(() => {
  vi.restoreAllMocks();
  rmSync(dir, { recursive: true, force: true });
});

const campaignPath = (): string => join(dir, 'season.json');
function writeCampaign(): string {
  const text = JSON.stringify(sampleCampaign(), null, 2) + '\n';
  writeFileSync(campaignPath(), text);
  return text;
}

describe('arcfield import', () => {
  it('adds good rows and writes the campaign file through a rename (no temporary file left)', async () => {
    writeCampaign();
    writeFileSync(join(dir, 'arcs.csv'), 'id,from_station,to_station,distance_m,sigma_m\r\na-101,K03,K04,55000.25,0.2\r\n');
    expect(await run([join(dir, 'arcs.csv'), '--table', 'arc', '--into', campaignPath()])).toBe(0);
    const saved = JSON.parse(readFileSync(campaignPath(), 'utf8')) as ReturnType<typeof sampleCampaign>;
    expect(saved.arcReadings.at(-1)).toEqual({ id: 'a-101', fromStation: 'K03', toStation: 'K04', distanceM: 55000.25, sigmaM: 0.2 });
    expect(out.join('')).toMatch(/1 row added to the arc table/);
    expect(readdirSync(dir).sort()).toEqual(['arcs.csv', 'season.json']);
  });

  it('refuses a file with one bad row: exit 2, every problem on stderr, campaign file untouched', async () => {
    const before = writeCampaign();
    writeFileSync(join(dir, 'arcs.csv'), 'id,from_station,to_station,distance_m,sigma_m\r\na-101,K03,K04,55000.25,0.2\r\na-102,K03,K03,1e5,0\r\n');
    expect(await run([join(dir, 'arcs.csv'), '--table', 'arc', '--into', campaignPath()])).toBe(2);
    expect(readFileSync(campaignPath(), 'utf8')).toBe(before);
    const msg = err.join('');
    expect(msg).toMatch(/arcs\.csv: row 3, column sigma_m: "0" — sigma must be greater than 0/);
    expect(msg).toMatch(/arcs\.csv: row 3, column to_station: "K03" — an arc needs two different stations/);
  });

  it('maps columns with --map and creates a new campaign with --new', async () => {
    writeFileSync(join(dir, 'st.csv'), 'Code,Height (m)\r\nK01,120\r\nK02,-3.5\r\n');
    const code = await run([join(dir, 'st.csv'), '--table', 'stations', '--into', campaignPath(), '--new', 'Invented season', '--map', 'code=Code', '--map', 'height_m=Height (m)']);
    expect(code).toBe(0);
    const saved = JSON.parse(readFileSync(campaignPath(), 'utf8')) as ReturnType<typeof sampleCampaign>;
    expect(saved.name).toBe('Invented season');
    expect(saved.stations).toEqual([{ code: 'K01', heightM: 120 }, { code: 'K02', heightM: -3.5 }]);
  });

  it('--dry-run checks and writes nothing', async () => {
    const before = writeCampaign();
    writeFileSync(join(dir, 'st.csv'), 'code\r\nK09\r\n');
    expect(await run([join(dir, 'st.csv'), '--table', 'stations', '--into', campaignPath(), '--dry-run'])).toBe(0);
    expect(readFileSync(campaignPath(), 'utf8')).toBe(before);
    expect(out.join('')).toMatch(/dry run: 1 row would be added/);
  });

  it('names a bad option value and a missing --into', async () => {
    expect(await run(['x.csv', '--table', 'arcs'])).toBe(2);
    const msg = err.join('');
    expect(msg).toMatch(/--table: "arcs" — must be one of stations, latitude, arc, exclusions, gnss-fixes/);
    expect(msg).toMatch(/--into: \(missing\) — name the campaign file/);
  });
});
