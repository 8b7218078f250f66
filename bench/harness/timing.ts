// The one timing protocol of the benchmark, shared in spirit with bench/peers/dataset.py and
// bench/peers/dataset.R (keep the three in step):
//   1. one first call;
//   2. if the first call took more than LONG_RUN_SECONDS, it is the only sample (re-running a
//      40 s LP three times to get a median would triple the run for little information);
//   3. otherwise warm-up calls until WARMUP_SECONDS have been spent and MIN_WARMUP_CALLS made
//      (the first included), or WARMUP_CAP_SECONDS spent, whichever comes first (at least one
//      call after the first). Why: V8 tiers a function up over several calls, and a process's
//      first large buffers are faulted in from the kernel until freed ones are recycled; on the
//      bench machine a 10⁶-row fit took 2–5× its steady time for its first 10–15 calls. A second
//      alone gave the Huber fit at 10⁶ (~0.3 s for its first calls) only 4 warm-up calls, and
//      its nine samples were still falling (127 → 71 ms; the steady time is 62–65 ms). R and
//      Python run the same warm-up, so each side is timed in its steady state;
//   4. k calls per sample, k = ⌈minSample/c⌉ with c the fastest warm-up call, so a sample is long
//      enough for the clock, and clamp(⌊budget/(c·k)⌋, MIN_REPEATS, maxRepeats) samples: a median
//      of at least three warm samples even when the budget is short.
// Every figure is wall-clock seconds per call from process.hrtime (ns resolution).

export interface TimingOptions {
  /** Seconds of sampling allowed per measured item (excluding the first call). */
  budgetSeconds: number;
  maxRepeats: number;
  /** Shortest sample worth timing; shorter calls are batched. */
  minSampleSeconds: number;
}

/** A call longer than this is timed once (keep equal to LONG_RUN_SECONDS in dataset.py / dataset.R). */
export const LONG_RUN_SECONDS = 10;
export const MIN_REPEATS = 3;
/** Warm-up time spent before sampling (keep equal to WARMUP_SECONDS in dataset.py / dataset.R). */
export const WARMUP_SECONDS = 1;
/** Fewest warm-up calls, the first included (keep equal in dataset.py / dataset.R). */
export const MIN_WARMUP_CALLS = 20;
/** Warm-up stops after this long even short of MIN_WARMUP_CALLS (a 0.5 s peer call: 12 calls). */
export const WARMUP_CAP_SECONDS = 6;

export const DEFAULT_TIMING: TimingOptions = { budgetSeconds: 2, maxRepeats: 9, minSampleSeconds: 0.02 };

export interface TimingSummary {
  medianSeconds: number;
  minSeconds: number;
  maxSeconds: number;
  /** Seconds per call, one entry per sample. */
  samples: number[];
  callsPerSample: number;
  firstCallSeconds: number;
  /** Calls made before sampling, the first included. */
  warmupCalls: number;
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
  let warmupCalls = 1;
  if (first > LONG_RUN_SECONDS) {
    samples = [first];
  } else {
    let spent = first;
    let fastest = first;
    do {
      t0 = process.hrtime.bigint();
      sink(call());
      const d = seconds(t0);
      spent += d;
      fastest = Math.min(fastest, d);
      warmupCalls++;
    } while ((spent < WARMUP_SECONDS || warmupCalls < MIN_WARMUP_CALLS) && spent < WARMUP_CAP_SECONDS);
    const calibration = Math.max(fastest, 1e-9);
    k = Math.max(1, Math.ceil(options.minSampleSeconds / calibration));
    const repeats = Math.max(Math.min(MIN_REPEATS, options.maxRepeats), Math.min(options.maxRepeats, Math.floor(options.budgetSeconds / (calibration * k))));
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
    warmupCalls,
  };
}
