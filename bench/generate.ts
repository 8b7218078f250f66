// The seeded benchmark data shared by every side (ours, R, Python, yalps).
//
// Invented scenario: degree lengths y (metres per degree of latitude) at mid-latitudes φ drawn
// uniformly in [0°, 70°], x = sin²φ, following y = 110574 + 1120·x (+ 1.2·x² for p = 3), plus
// N(0, 5 m) noise and exactly 5 % gross outliers of ±(50…300) m with a random sign. The numbers
// are close to the first-order degree-length relation (c ≈ a(1−e²)π/180, m ≈ (3/2)e²c; see
// design.md), so the conditioning matches real campaigns; the data are not from any real survey.
//
// Determinism: one SplitMix64 stream per (seed, n, p), consumed in a fixed order (all φ, all
// noise, the outlier indices by a partial Fisher–Yates shuffle, their magnitudes and signs), so a
// seed gives the same bytes on every machine.
import { existsSync, mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { InputError } from '../src/errors.ts';
import { readDatasetHeader, writeDataset, type Dataset, type DatasetHeader } from './harness/dataset-file.ts';
import { SplitMix64 } from './harness/seeded-random.ts';

export const DEFAULT_SEED = 20250;
export const BENCH_SIZES = [1_000, 10_000, 100_000, 1_000_000] as const;
export const MODEL_C = 110574;
export const MODEL_M = 1120;
export const MODEL_K = 1.2;
export const NOISE_SD_M = 5;
export const OUTLIER_FRACTION = 0.05;
export const OUTLIER_RANGE_M: [number, number] = [50, 300];
export const LATITUDE_RANGE_DEG: [number, number] = [0, 70];

export const BENCH_DATA_DIR = join(dirname(fileURLToPath(import.meta.url)), 'data');

export interface GenerateOptions {
  n: number;
  p: 2 | 3;
  seed?: number;
}

export function generateDataset({ n, p, seed = DEFAULT_SEED }: GenerateOptions): Dataset {
  if (!Number.isInteger(n) || n < 1 || n > 2 ** 28) throw new InputError('n', n, 'must be an integer in [1, 2²⁸]');
  if (p !== 2 && p !== 3) throw new InputError('p', p, 'must be 2 (line) or 3 (with the x² term)');
  if (!Number.isInteger(seed) || seed < 0 || seed > 0xffffffff) throw new InputError('seed', seed, 'must be an integer in [0, 2³²)');
  // The stream id packs n and p into the low word so every dataset has its own stream.
  const rng = new SplitMix64(seed, n * 4 + p);
  const k = p === 3 ? MODEL_K : 0;
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  const [phi0, phi1] = LATITUDE_RANGE_DEG;
  for (let i = 0; i < n; i++) {
    const phi = ((phi0 + (phi1 - phi0) * rng.uniform()) * Math.PI) / 180;
    const s = Math.sin(phi);
    x[i] = s * s;
  }
  for (let i = 0; i < n; i++) {
    const xi = x[i];
    y[i] = MODEL_C + MODEL_M * xi + k * xi * xi + NOISE_SD_M * rng.normal();
  }
  const outlierCount = Math.round(OUTLIER_FRACTION * n);
  const order = new Int32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  const [lo, hi] = OUTLIER_RANGE_M;
  for (let j = 0; j < outlierCount; j++) {
    const pick = j + rng.below(n - j);
    const row = order[pick];
    order[pick] = order[j];
    order[j] = row;
    const size = lo + (hi - lo) * rng.uniform();
    y[row] += rng.uniform() < 0.5 ? -size : size;
  }
  const header: DatasetHeader = {
    format: 'arcfield-bench-dataset',
    version: 1,
    n,
    p,
    seed,
    trueCoefficients: p === 3 ? [MODEL_C, MODEL_M, MODEL_K] : [MODEL_C, MODEL_M],
    noiseSdM: NOISE_SD_M,
    outlierCount,
    outlierRangeM: [lo, hi],
    latitudeRangeDeg: [phi0, phi1],
    columns: ['x', 'y'],
    dtype: 'float64',
    byteOrder: 'little-endian',
  };
  return { header, x, y };
}

export function datasetPath(n: number, p: 2 | 3, seed = DEFAULT_SEED, dir = BENCH_DATA_DIR): string {
  return join(dir, `degree-lengths-n${n}-p${p}-s${seed}.bin`);
}

/** Writes the dataset unless a file with the same header is already there; returns its path. */
export function ensureDataset(options: GenerateOptions, dir = BENCH_DATA_DIR): string {
  const seed = options.seed ?? DEFAULT_SEED;
  const path = datasetPath(options.n, options.p, seed, dir);
  if (existsSync(path)) {
    const { header } = readDatasetHeader(path);
    if (header.n === options.n && header.p === options.p && header.seed === seed) return path;
  }
  mkdirSync(dir, { recursive: true });
  writeDataset(path, generateDataset({ ...options, seed }));
  return path;
}

/** The design matrix of the model, row-major: [1, x] or [1, x, x²]. */
export function designMatrix(x: Float64Array, p: 2 | 3): Float64Array {
  const n = x.length;
  const X = new Float64Array(n * p);
  for (let i = 0; i < n; i++) {
    const xi = x[i];
    X[i * p] = 1;
    X[i * p + 1] = xi;
    if (p === 3) X[i * p + 2] = xi * xi;
  }
  return X;
}
