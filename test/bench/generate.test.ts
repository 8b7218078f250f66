// The benchmark's shared data: the seeded generator is deterministic and the binary file
// round-trips bit for bit, in the layout the R and Python peers read (bench/harness/dataset-file.ts).
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { datasetPath, ensureDataset, generateDataset, MODEL_C, MODEL_K, MODEL_M } from '../../bench/generate.ts';
import { DATASET_MAGIC, readDataset, writeDataset, type Dataset } from '../../bench/harness/dataset-file.ts';
import { SplitMix64 } from '../../bench/harness/seeded-random.ts';
import { within } from '../helpers/within.ts';

const dir = mkdtempSync(join(tmpdir(), 'arcfield-bench-test-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** SplitMix64 transcribed directly from Vigna's splitmix64.c in BigInt (an independent second implementation). */
function* splitmixBigInt(seed: bigint): Generator<bigint> {
  const M = (1n << 64n) - 1n;
  let s = seed;
  for (;;) {
    s = (s + 0x9e3779b97f4a7c15n) & M;
    let z = s;
    z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & M;
    z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & M;
    yield z ^ (z >> 31n);
  }
}

function sameBytes(a: Float64Array, b: Float64Array): boolean {
  return Buffer.compare(Buffer.from(a.buffer, a.byteOffset, a.byteLength), Buffer.from(b.buffer, b.byteOffset, b.byteLength)) === 0;
}

describe('SplitMix64', () => {
  it('gives the published first outputs for seed 0', () => {
    // splitmix64.c with x = 0: e220a8397b1dcdaf, 6e789e6aa1b965f4, 06c45d188009454f (from memory;
    // the BigInt transcription below reproduces them).
    const r = new SplitMix64(0, 0);
    const out = new Uint32Array(2);
    const hex = [0, 1, 2].map(() => { r.nextPair(out); return out[0].toString(16).padStart(8, '0') + out[1].toString(16).padStart(8, '0'); });
    expect(hex).toEqual(['e220a8397b1dcdaf', '6e789e6aa1b965f4', '06c45d188009454f']);
  });

  it('matches a BigInt transcription over 2000 outputs of an odd seed, and uniforms use the top 53 bits', () => {
    const seedHi = 0xdeadbeef;
    const seedLo = 0x01234567;
    const ref = splitmixBigInt((BigInt(seedHi) << 32n) | BigInt(seedLo));
    const r = new SplitMix64(seedHi, seedLo);
    const u = new SplitMix64(seedHi, seedLo);
    const out = new Uint32Array(2);
    for (let i = 0; i < 2000; i++) {
      const z = ref.next().value as bigint;
      r.nextPair(out);
      expect((BigInt(out[0]) << 32n) | BigInt(out[1])).toBe(z);
      expect(u.uniform()).toBe(Number(z >> 11n) / 2 ** 53);
    }
  });
});

describe('generateDataset', () => {
  it('is deterministic for a seed, and differs between seeds and between (n, p)', () => {
    const a = generateDataset({ n: 5000, p: 3, seed: 7 });
    const b = generateDataset({ n: 5000, p: 3, seed: 7 });
    expect(sameBytes(a.x, b.x) && sameBytes(a.y, b.y)).toBe(true);
    expect(a.header).toEqual(b.header);
    const c = generateDataset({ n: 5000, p: 3, seed: 8 });
    expect(sameBytes(a.x, c.x)).toBe(false);
    const d = generateDataset({ n: 5000, p: 2, seed: 7 });
    expect(sameBytes(a.x, d.x)).toBe(false);
  });

  it('follows the stated model: x = sin²φ, φ in [0°, 70°], noise sd 5 m, exactly 5 % outliers of 50–300 m', () => {
    // Spec of issue 5 (common practice for a synthetic robust-fit benchmark): y = 110574 + 1120·x + 1.2·x² + N(0, 5) + outliers.
    const n = 20000;
    const { header, x, y } = generateDataset({ n, p: 3, seed: 11 });
    expect(header.outlierCount).toBe(1000);
    const xMax = Math.sin((70 * Math.PI) / 180) ** 2; // sin²70° = 0.88302… (definition)
    let lo = Infinity;
    let hi = -Infinity;
    let gross = 0;
    let sum = 0;
    let sumSq = 0;
    let clean = 0;
    for (let i = 0; i < n; i++) {
      lo = Math.min(lo, x[i]);
      hi = Math.max(hi, x[i]);
      const r = y[i] - (MODEL_C + MODEL_M * x[i] + MODEL_K * x[i] * x[i]);
      // An outlier moves a reading by ≥ 50 m; clean noise passes 25 m (5σ) with probability 6e-7.
      if (Math.abs(r) > 25) {
        gross++;
        expect(Math.abs(r)).toBeLessThan(300 + 25);
      } else {
        sum += r;
        sumSq += r * r;
        clean++;
      }
    }
    expect(lo).toBeGreaterThanOrEqual(0);
    expect(hi).toBeLessThanOrEqual(xMax);
    within(hi, xMax, 1e-3, '', 'largest x (uniform φ reaches near 70°)');
    expect(gross).toBe(1000);
    within(sum / clean, 0, 5 * (5 / Math.sqrt(clean)), 'm', 'mean of the clean noise (5 standard errors)');
    within(Math.sqrt(sumSq / clean), 5, 0.05 * 5, 'm', 'sd of the clean noise (5 % — sampling error is ~0.5 %)', { source: 'stated noise sd 5 m' });
  });

  it('refuses impossible sizes with the field named', () => {
    expect(() => generateDataset({ n: 0, p: 2 })).toThrow(InputError);
    expect(() => generateDataset({ n: 10, p: 4 as 2 })).toThrow(/^p:/);
  });
});

describe('dataset file', () => {
  it('round-trips bit for bit, including −0, subnormals and the extremes', () => {
    const special = [0, -0, 5e-324, -5e-324, 1.7976931348623157e308, -2.2250738585072014e-308, 0.1 + 0.2, Math.PI];
    const base = generateDataset({ n: special.length, p: 2, seed: 3 });
    const ds: Dataset = { header: base.header, x: Float64Array.from(special), y: Float64Array.from(special.map((v) => -v)) };
    const path = join(dir, 'special.bin');
    writeDataset(path, ds);
    const back = readDataset(path);
    expect(back.header).toEqual(ds.header);
    for (let i = 0; i < special.length; i++) {
      expect(Object.is(back.x[i], ds.x[i])).toBe(true);
      expect(Object.is(back.y[i], ds.y[i])).toBe(true);
    }
  });

  it('has the documented byte layout (read here with explicit little-endian DataView, as R and numpy do)', () => {
    const ds = generateDataset({ n: 1000, p: 3, seed: 5 });
    const path = ensureDataset({ n: 1000, p: 3, seed: 5 }, dir);
    expect(path).toBe(datasetPath(1000, 3, 5, dir));
    const bytes = readFileSync(path);
    expect(bytes.toString('ascii', 0, 8)).toBe(DATASET_MAGIC);
    const h = bytes.readUInt32LE(8);
    expect(h % 8).toBe(0);
    expect(bytes.readUInt32LE(12)).toBe(0);
    expect(JSON.parse(bytes.toString('utf8', 16, 16 + h))).toEqual(ds.header);
    expect(bytes.length).toBe(16 + h + 16 * 1000);
    const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    for (const i of [0, 1, 499, 999]) {
      expect(view.getFloat64(16 + h + 8 * i, true)).toBe(ds.x[i]);
      expect(view.getFloat64(16 + h + 8 * (1000 + i), true)).toBe(ds.y[i]);
    }
  });

  it('refuses a file with the wrong magic or the wrong size, naming what is wrong', () => {
    const good = ensureDataset({ n: 1000, p: 2, seed: 5 }, dir);
    const bytes = readFileSync(good);
    const truncated = join(dir, 'truncated.bin');
    writeFileSync(truncated, bytes.subarray(0, bytes.length - 8));
    expect(() => readDataset(truncated)).toThrow(/dataset file size/);
    const wrong = join(dir, 'wrong-magic.bin');
    const copy = Buffer.from(bytes);
    copy.write('NOTBENCH', 0, 'ascii');
    writeFileSync(wrong, copy);
    expect(() => readDataset(wrong)).toThrow(/dataset magic/);
  });
});
