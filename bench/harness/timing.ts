// The one timing protocol of the benchmark, shared in spirit with bench/peers/dataset.py and
// bench/peers/dataset.R (keep the three in step):
//   1. one first call (warm-up: JIT, caches, lazy allocation);
//   2. if budget/first < 2, the first call is the only sample (re-running a 40 s LP to get a
//      median would double the run for little information);
//   3. otherwise one calibration call (the first is often several times slower than the rest),
//      then k calls per sample, k = ⌈minSample/c⌉ with c the faster of the two, so a sample is long
//      enough for the clock, and min(maxRepeats, ⌊budget/(c·k)⌋) samples (at least one).
// Every figure is wall-clock seconds per call from process.hrtime (ns resolution).

export interface TimingOptions {
  /** Seconds of sampling allowed per measured item (excluding the first call). */
  budgetSeconds: number;
  maxRepeats: number;
  /** Shortest sample worth timing; shorter calls are batched. */
  minSampleSeconds: number;
}

export const DEFAULT_TIMING: TimingOptions = { budgetSeconds: 2, maxRepeats: 7, minSampleSeconds: 0.02 };

export interface TimingSummary {
  medianSeconds: number;
  minSeconds: number;
  maxSeconds: number;
  /** Seconds per call, one entry per sample. */
  samples: number[];
  callsPerSample: number;
  firstCallSeconds: number;
}

export function median(values: readonly number[]): number {
  if (values.length === 0) return Number.NaN;
  const s = [...values].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 === 1 ? s[mid] : (s[mid - 1] + s[mid]) / 2;
}

function seconds(start: bigint): number {
  return Number(process.hrtime.bigint() - start) / 1e9;
}

/** Times `call` by the shared protocol; `sink` receives every result so no call can be optimised away. */
export function timeCall<T>(call: () => T, options: TimingOptions = DEFAULT_TIMING, sink: (value: T) => void = () => {}): TimingSummary {
  let t0 = process.hrtime.bigint();
  sink(call());
  const first = seconds(t0);
  let samples: number[];
  let k = 1;
  if (first <= 0 || options.budgetSeconds / first < 2) {
    samples = [first];
  } else {
    t0 = process.hrtime.bigint();
    sink(call());
    const calibration = Math.max(Math.min(first, seconds(t0)), 1e-9);
    k = Math.max(1, Math.ceil(options.minSampleSeconds / calibration));
    const repeats = Math.max(1, Math.min(options.maxRepeats, Math.floor(options.budgetSeconds / (calibration * k))));
    samples = [];
    for (let r = 0; r < repeats; r++) {
      t0 = process.hrtime.bigint();
      for (let i = 0; i < k; i++) sink(call());
      samples.push(seconds(t0) / k);
    }
  }
  return {
    medianSeconds: median(samples),
    minSeconds: Math.min(...samples),
    maxSeconds: Math.max(...samples),
    samples,
    callsPerSample: k,
    firstCallSeconds: first,
  };
}
