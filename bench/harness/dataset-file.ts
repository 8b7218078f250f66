// The benchmark's one data file, read by every side (TypeScript, R, Python):
//
//   bytes 0–7    ASCII magic "ARCBNCH1"
//   bytes 8–11   uint32 little-endian: length H of the JSON header in bytes (a multiple of 8)
//   bytes 12–15  zero
//   bytes 16…    the UTF-8 JSON header, padded with spaces to H bytes
//   then         n float64 little-endian x values, then n float64 little-endian y values
//
// The data start at 16 + H, a multiple of 8, so a Float64Array can view them without copying on a
// little-endian host. The file is written to a temporary name and renamed, so a reader never sees a
// half-written file.
import { closeSync, fstatSync, openSync, readSync, renameSync, writeSync } from 'node:fs';
import { endianness } from 'node:os';
import { InputError } from '../../src/errors.ts';

export const DATASET_MAGIC = 'ARCBNCH1';
const PREFIX_BYTES = 16;
/** Copy chunk for reading: keeps the reader's own peak memory ~1 MB above the arrays it fills. */
const CHUNK_VALUES = 1 << 17;

export interface DatasetHeader {
  format: 'arcfield-bench-dataset';
  version: 1;
  n: number;
  /** Model columns the sides build from x: p = 2 → [1, x]; p = 3 → [1, x, x²]. */
  p: 2 | 3;
  seed: number;
  /** The true model: y = c + m·x + k·x² (k = 0 for p = 2), metres per degree. */
  trueCoefficients: number[];
  noiseSdM: number;
  outlierCount: number;
  outlierRangeM: [number, number];
  latitudeRangeDeg: [number, number];
  columns: ['x', 'y'];
  dtype: 'float64';
  byteOrder: 'little-endian';
}

export interface Dataset {
  header: DatasetHeader;
  x: Float64Array;
  y: Float64Array;
}

const LITTLE_ENDIAN_HOST = endianness() === 'LE';

function writeArray(fd: number, values: Float64Array): void {
  if (LITTLE_ENDIAN_HOST) {
    writeSync(fd, new Uint8Array(values.buffer, values.byteOffset, values.byteLength));
    return;
  }
  const chunk = new DataView(new ArrayBuffer(8 * CHUNK_VALUES));
  for (let start = 0; start < values.length; start += CHUNK_VALUES) {
    const count = Math.min(CHUNK_VALUES, values.length - start);
    for (let i = 0; i < count; i++) chunk.setFloat64(8 * i, values[start + i], true);
    writeSync(fd, new Uint8Array(chunk.buffer, 0, 8 * count));
  }
}

export function writeDataset(path: string, dataset: Dataset): void {
  const { header, x, y } = dataset;
  if (x.length !== header.n || y.length !== header.n) {
    throw new InputError('dataset.x/y', `${x.length}/${y.length}`, `both arrays must hold header.n = ${header.n} values`);
  }
  let json = JSON.stringify(header);
  const jsonBytes = Buffer.byteLength(json, 'utf8');
  json += ' '.repeat((8 - (jsonBytes % 8)) % 8);
  const headerBytes = Buffer.from(json, 'utf8');
  const prefix = Buffer.alloc(PREFIX_BYTES);
  prefix.write(DATASET_MAGIC, 0, 'ascii');
  prefix.writeUInt32LE(headerBytes.length, 8);
  const tmp = `${path}.${process.pid}.tmp`;
  const fd = openSync(tmp, 'w');
  try {
    writeSync(fd, prefix);
    writeSync(fd, headerBytes);
    writeArray(fd, x);
    writeArray(fd, y);
  } finally {
    closeSync(fd);
  }
  renameSync(tmp, path);
}

function readExactly(fd: number, target: Uint8Array, position: number, path: string): void {
  let done = 0;
  while (done < target.length) {
    const got = readSync(fd, target, done, target.length - done, position + done);
    if (got === 0) throw new InputError('dataset file', path, `truncated: expected ${target.length} bytes at offset ${position}, got ${done}`);
    done += got;
  }
}

function readArray(fd: number, n: number, position: number, path: string): Float64Array {
  const out = new Float64Array(n);
  if (LITTLE_ENDIAN_HOST) {
    readExactly(fd, new Uint8Array(out.buffer), position, path);
    return out;
  }
  const chunk = new Uint8Array(8 * CHUNK_VALUES);
  const view = new DataView(chunk.buffer);
  for (let start = 0; start < n; start += CHUNK_VALUES) {
    const count = Math.min(CHUNK_VALUES, n - start);
    readExactly(fd, chunk.subarray(0, 8 * count), position + 8 * start, path);
    for (let i = 0; i < count; i++) out[start + i] = view.getFloat64(8 * i, true);
  }
  return out;
}

function checkHeader(value: unknown, path: string): DatasetHeader {
  const h = value as Partial<DatasetHeader> | null;
  if (h === null || typeof h !== 'object' || h.format !== 'arcfield-bench-dataset') {
    throw new InputError('dataset header.format', h?.format, `${path}: not an arcfield bench dataset`);
  }
  if (h.version !== 1) throw new InputError('dataset header.version', h.version, `${path}: only version 1 is understood`);
  if (typeof h.n !== 'number' || !Number.isInteger(h.n) || h.n < 1) throw new InputError('dataset header.n', h.n, `${path}: must be a positive integer`);
  if (h.p !== 2 && h.p !== 3) throw new InputError('dataset header.p', h.p, `${path}: must be 2 or 3`);
  if (h.dtype !== 'float64' || h.byteOrder !== 'little-endian') {
    throw new InputError('dataset header.dtype', `${String(h.dtype)}/${String(h.byteOrder)}`, `${path}: only little-endian float64 is written`);
  }
  return h as DatasetHeader;
}

/** Reads the header only (cheap: the orchestrator uses it to check a cached file). */
export function readDatasetHeader(path: string): { header: DatasetHeader; dataOffset: number } {
  const fd = openSync(path, 'r');
  try {
    const prefix = new Uint8Array(PREFIX_BYTES);
    readExactly(fd, prefix, 0, path);
    const buf = Buffer.from(prefix);
    const magic = buf.toString('ascii', 0, 8);
    if (magic !== DATASET_MAGIC) throw new InputError('dataset magic', magic, `${path}: expected ${DATASET_MAGIC}`);
    const length = buf.readUInt32LE(8);
    if (length % 8 !== 0 || length > 1 << 20) throw new InputError('dataset header length', length, `${path}: must be a multiple of 8 below 1 MiB`);
    const jsonBytes = new Uint8Array(length);
    readExactly(fd, jsonBytes, PREFIX_BYTES, path);
    let parsed: unknown;
    try {
      parsed = JSON.parse(Buffer.from(jsonBytes).toString('utf8'));
    } catch (e) {
      throw new InputError('dataset header', path, `not valid JSON (${(e as Error).message})`);
    }
    return { header: checkHeader(parsed, path), dataOffset: PREFIX_BYTES + length };
  } finally {
    closeSync(fd);
  }
}

export function readDataset(path: string): Dataset {
  const { header, dataOffset } = readDatasetHeader(path);
  const fd = openSync(path, 'r');
  try {
    const expected = dataOffset + 16 * header.n;
    const size = fstatSync(fd).size;
    if (size !== expected) throw new InputError('dataset file size', size, `${path}: expected ${expected} bytes for n = ${header.n}`);
    const x = readArray(fd, header.n, dataOffset, path);
    const y = readArray(fd, header.n, dataOffset + 8 * header.n, path);
    return { header, x, y };
  } finally {
    closeSync(fd);
  }
}
