// The office CLI end to end: spawn `node bin/arcfield.js` as a user would, check exit codes
// (0 success, 2 bad input, 1 internal failure), the JSON keys and the error listing.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const root = fileURLToPath(new URL('../..', import.meta.url));
const fixture = (name: string): string => fileURLToPath(new URL(`../fixtures/campaign/${name}`, import.meta.url));

function arcfield(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [join(root, 'bin/arcfield.js'), ...args], { cwd: root, encoding: 'utf8', timeout: 60_000 });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

const work = mkdtempSync(join(tmpdir(), 'arcfield-cli-'));
const demoPath = join(work, 'demo.json');

describe('arcfield CLI', () => {
  it('--help on the command and on every sub-command, exit 0', () => {
    const top = arcfield('--help');
    expect(top.status).toBe(0);
    expect(top.stdout).toMatch(/usage: arcfield <command>/);
    expect(top.stdout).toMatch(/\bfit\b/);
    expect(top.stdout).toMatch(/\bdemo\b/);
    for (const cmd of ['fit', 'demo']) {
      const r = arcfield(cmd, '--help');
      expect(r.status).toBe(0);
      expect(r.stdout).toMatch(new RegExp(`usage: arcfield ${cmd}`));
    }
  });

  it('an unknown command or option is bad input: exit 2 naming it', () => {
    const r = arcfield('frobnicate');
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/unknown command "frobnicate"/);
    const o = arcfield('fit', fixture('small-valid.json'), '--colour', 'red');
    expect(o.status).toBe(2);
    expect(o.stderr).toMatch(/--colour/);
  });

  it('bad option values are all listed: exit 2', () => {
    const r = arcfield('fit', fixture('small-valid.json'), '--model', 'cubic', '--estimator', 'median', '--weighting', 'heavy');
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/--model: "cubic" — must be one of degree, degree2, ellipsoid/);
    expect(r.stderr).toMatch(/--estimator: "median" — must be one of least-squares, least-absolute, minimax, huber, tukey/);
    expect(r.stderr).toMatch(/--weighting: "heavy" — must be one of propagated, equal/);
  });

  it('a broken campaign file: exit 2 with every problem (file, field, value, reason)', () => {
    const r = arcfield('fit', fixture('broken.json'));
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/13 problems/);
    expect(r.stderr).toContain('broken.json: latitudeReadings[0].latitudeDeg: 91.5 — above 90°');
    expect(r.stderr).toContain('broken.json: arcReadings[0].sigmaM: 0 — sigma must be greater than 0');
    expect(r.stderr).toContain('broken.json: latitudeReadings[1].station: "K09" — no station with this code in stations');
    expect(r.stderr).toContain('broken.json: exclusions[0].readingId: "r-404" — no latitude or arc reading with this id');
  });

  it('not JSON, or no such file: exit 2 naming the place', () => {
    const bad = join(work, 'bad.json');
    writeFileSync(bad, '{\n  "format": "arcfield-campaign",\n  "version": 1,,\n}\n');
    const r = arcfield('fit', bad);
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/line 3, column \d+: .* not valid JSON/);
    const missing = arcfield('fit', join(work, 'nope.json'));
    expect(missing.status).toBe(2);
    expect(missing.stderr).toMatch(/nope\.json: \(file\): .* no such file/);
  });

  it('demo writes a valid campaign; an existing file is kept without --force', () => {
    const r = arcfield('demo', '-o', demoPath);
    expect(r.status).toBe(0);
    expect(existsSync(demoPath)).toBe(true);
    const again = arcfield('demo', '-o', demoPath);
    expect(again.status).toBe(2);
    expect(again.stderr).toMatch(/file exists; add --force/);
    expect(arcfield('demo', '-o', demoPath, '--force').status).toBe(0);
  });

  it('demo to a path that cannot be written is an internal failure: exit 1', () => {
    // A path under a regular file (ENOTDIR): the environment failed, not the input.
    const r = arcfield('demo', '-o', join(fixture('small-valid.json'), 'x.json'));
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/could not write/);
  });

  it('fit --json on the demo prints the full result with the documented keys', () => {
    if (!existsSync(demoPath)) expect(arcfield('demo', '-o', demoPath).status).toBe(0);
    const r = arcfield('fit', demoPath, '--json');
    expect(r.status).toBe(0);
    const j = JSON.parse(r.stdout) as Record<string, unknown> & {
      figure: Record<string, unknown>; coefficients: Record<string, unknown>[]; stations: Record<string, unknown>[]; readings: Record<string, unknown>[];
    };
    for (const k of ['semiMajorAxisM', 'semiMajorAxisStdM', 'inverseFlattening', 'inverseFlatteningStd', 'quadrantM', 'quadrantStdM']) {
      expect(typeof j.figure[k]).toBe('number');
    }
    expect(typeof j.objective).toBe('number');
    expect(j.converged).toBe(true);
    for (const c of j.coefficients) expect(Object.keys(c)).toEqual(expect.arrayContaining(['name', 'value', 'standardError']));
    for (const s of j.stations) expect(Object.keys(s)).toEqual(expect.arrayContaining(['code', 'latitudeDeg', 'sigmaArcsec']));
    for (const x of j.readings) {
      expect(Object.keys(x)).toEqual(expect.arrayContaining(['id', 'residual', 'standardizedResidual', 'suspect', 'hint']));
      expect(typeof x.suspect).toBe('boolean');
    }
    const file = JSON.parse(readFileSync(demoPath, 'utf8')) as { latitudeReadings: { id: string }[]; arcReadings: { id: string }[] };
    expect(j.readings.map((x) => x.id).sort()).toEqual([...file.latitudeReadings, ...file.arcReadings].map((x) => x.id).sort());
  });

  it('fit --model degree names the coefficients c and m in metres per degree', () => {
    if (!existsSync(demoPath)) expect(arcfield('demo', '-o', demoPath).status).toBe(0);
    const r = arcfield('fit', demoPath, '--model', 'degree', '--json');
    expect(r.status).toBe(0);
    const j = JSON.parse(r.stdout) as { coefficients: { name: string; unit: string }[]; figure: { inversion: string } };
    expect(j.coefficients.map((c) => c.name)).toEqual(['c', 'm']);
    expect(j.coefficients[0].unit).toBe('m/degree');
    expect(j.figure.inversion).toMatch(/by arcs.*second-order inversion/);
  });

  it('the readable table shows the figure and the hints', () => {
    if (!existsSync(demoPath)) expect(arcfield('demo', '-o', demoPath).status).toBe(0);
    const r = arcfield('fit', demoPath);
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/a \(semi-major axis\)\s+\d{7}\.\d/);
    expect(r.stdout).toMatch(/1\/f \(inverse flattening\)\s+29\d\.\d{3}/);
    expect(r.stdout).toMatch(/re-observe arc K06–K07/);
    expect(r.stdout).toMatch(/re-observe K04: astronomic latitude reading r-K04-3/);
  });

  it('a campaign that cannot determine a figure: result printed, exit 2', () => {
    const one = join(work, 'one-arc.json');
    writeFileSync(one, JSON.stringify({
      format: 'arcfield-campaign', version: 1, name: 'one arc (invented)',
      stations: [{ code: 'K01' }, { code: 'K02' }],
      latitudeReadings: [
        { id: 'r1', station: 'K01', kind: 'astronomic', latitudeDeg: 10, sigmaArcsec: 0.3, observedAt: '2026-06-02T21:14:00Z' },
        { id: 'r2', station: 'K02', kind: 'astronomic', latitudeDeg: 12, sigmaArcsec: 0.3, observedAt: '2026-06-03T21:14:00Z' },
      ],
      arcReadings: [{ id: 'a1', fromStation: 'K01', toStation: 'K02', distanceM: 221_000, sigmaM: 1 }],
    }));
    const r = arcfield('fit', one, '--json');
    expect(r.status).toBe(2);
    expect((JSON.parse(r.stdout) as { status: string }).status).toBe('too-few-arcs');
    expect(r.stderr).toMatch(/no figure/);
  });

  it('serve without the sync layer installed fails clearly, or shows its help', () => {
    const r = arcfield('serve', '--help');
    if (existsSync(join(root, 'src/cli/serve.ts'))) expect(r.status).toBe(0);
    else {
      expect(r.status).toBe(1);
      expect(r.stderr).toMatch(/serve command is not part of this build yet/);
    }
  });
});
