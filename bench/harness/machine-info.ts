// The machine a run happened on, recorded with every result: ratios only mean something beside it.
import { readFileSync } from 'node:fs';
import { arch, cpus, loadavg, platform, release, totalmem } from 'node:os';
import type { Availability } from './peer-availability.ts';

export interface MachineInfo {
  cpuModel: string;
  cores: number;
  memoryBytes: number;
  os: string;
  node: string;
  R: string | null;
  python: string | null;
  packages: Record<string, string | null>;
  /** BLAS threading as the peers saw it (unset = the library default). */
  blasThreads: string;
  /** The glibc malloc setting every side ran with (scripts/bench.js). */
  glibcTunables: string;
  loadAverageAtStart: number[];
}

function cpuModel(): string {
  const fromOs = cpus()[0]?.model?.trim();
  if (fromOs) return fromOs;
  try {
    const m = /^model name\s*:\s*(.+)$/m.exec(readFileSync('/proc/cpuinfo', 'utf8'));
    return m ? m[1].trim() : 'unknown';
  } catch {
    return 'unknown';
  }
}

export function machineInfo(av: Availability): MachineInfo {
  return {
    cpuModel: cpuModel(),
    cores: cpus().length,
    memoryBytes: totalmem(),
    os: `${platform()} ${release()} ${arch()}`,
    node: process.versions.node,
    R: av.R.version,
    python: av.python.version,
    packages: { ...av.R.packages, ...av.python.packages, ...av.node.packages },
    blasThreads: ['OPENBLAS_NUM_THREADS', 'OMP_NUM_THREADS', 'MKL_NUM_THREADS'].map((k) => `${k}=${process.env[k] ?? 'unset'}`).join(' '),
    glibcTunables: process.env.GLIBC_TUNABLES ?? 'unset',
    loadAverageAtStart: loadavg().map((v) => Math.round(v * 100) / 100),
  };
}
