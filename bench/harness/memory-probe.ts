// Peak resident memory of this process over one phase, measured by the kernel.
//
// Linux keeps the high-water mark VmHWM in /proc/self/status, and writing "5" to
// /proc/self/clear_refs resets it to the current RSS (proc(5), since Linux 4.0). So a phase's peak
// is exact even when the process peaked earlier (tsx start-up, data loading): reset, run, read.
// Where clear_refs is not writable the lifetime peak (getrusage maxrss) is used and the result
// says so, because it can only overstate.
import { readFileSync, writeFileSync } from 'node:fs';

export interface MemorySnapshot {
  rssBytes: number;
  heapUsedBytes: number;
  /** ArrayBuffer memory outside the V8 heap: typed arrays live here. */
  arrayBuffersBytes: number;
}

function statusField(name: string): number | null {
  try {
    const m = new RegExp(`^${name}:\\s+(\\d+) kB`, 'm').exec(readFileSync('/proc/self/status', 'utf8'));
    return m ? Number(m[1]) * 1024 : null;
  } catch {
    return null;
  }
}

export function snapshot(): MemorySnapshot {
  const m = process.memoryUsage();
  return { rssBytes: m.rss, heapUsedBytes: m.heapUsed, arrayBuffersBytes: m.arrayBuffers };
}

/** Full collections when the process runs with --expose-gc (twice: the second frees what finalizers released). */
export function collectGarbage(): boolean {
  const gc = (globalThis as { gc?: () => void }).gc;
  if (!gc) return false;
  gc();
  gc();
  return true;
}

export class PeakProbe {
  readonly method: 'VmHWM after clear_refs' | 'getrusage maxrss (lifetime peak, may overstate)';

  constructor() {
    this.method = PeakProbe.reset() ? 'VmHWM after clear_refs' : 'getrusage maxrss (lifetime peak, may overstate)';
  }

  private static reset(): boolean {
    try {
      writeFileSync('/proc/self/clear_refs', '5');
      return statusField('VmHWM') !== null;
    } catch {
      return false;
    }
  }

  /** Restarts the phase: the peak is counted from now. */
  restart(): void {
    if (this.method === 'VmHWM after clear_refs') PeakProbe.reset();
  }

  peakBytes(): number {
    if (this.method === 'VmHWM after clear_refs') return statusField('VmHWM') ?? process.resourceUsage().maxRSS * 1024;
    return process.resourceUsage().maxRSS * 1024;
  }
}
