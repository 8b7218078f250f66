// Our side of the benchmark, one estimator on one dataset per process (so its memory is its own):
//
//   node --expose-gc --import tsx bench/run-ours.ts --data FILE --estimator huber
//        --budget S --max-repeats K --min-sample S [--warm-refit 1]
//
// 1. idle: modules loaded, garbage collected, RSS noted;
// 2. load: the dataset read in chunks into the LinearProblem's own arrays (X row-major, y);
// 3. memory: the first fit's peak RSS (kernel high-water mark) above idle and above loaded;
// 4. time: the shared protocol (bench/harness/timing.ts): warm-up, then batched repeats;
// 5. floor: one plain pass Σ|yᵢ − xᵢᵀβ| for the true β, timed the same way in the same process;
// 6. warm refit (optional): fit the first n − 1 rows, add the last reading, refit with the previous
//    result as warmStart, and time it against the cold fit of the same n rows.
// Prints one JSON line (OursRun) on stdout.
import type { Estimator, FitOptions, FitResult, LinearProblem } from '../src/fit/types.ts';
import { ESTIMATORS } from '../src/fit/types.ts';
import { designMatrix } from './generate.ts';
import { numberArg, parseKeyValueArgs } from './harness/cli-args.ts';
import { readDataset, type DatasetHeader } from './harness/dataset-file.ts';
import { onePassFloor } from './harness/floor-pass.ts';
import { loadEstimators, type EstimatorFn } from './harness/load-estimators.ts';
import { collectGarbage, PeakProbe, snapshot } from './harness/memory-probe.ts';
import { timeCall, type TimingOptions, type TimingSummary } from './harness/timing.ts';

export interface FitSummary {
  status: string;
  coefficients: number[];
  objective: number | null;
  scale: number | null;
  iterations: number;
  converged: boolean;
  reason: string;
  basisLength: number | null;
}

export interface OursRun {
  estimator: Estimator;
  n: number;
  p: number;
  available: boolean;
  /** Set when the estimator is missing or threw. */
  error?: string;
  result?: FitSummary;
  timing?: TimingSummary;
  floor?: TimingSummary;
  memory?: {
    method: string;
    gcExposed: boolean;
    inputBytes: number;
    idleRssBytes: number;
    loadedRssBytes: number;
    peakRssBytes: number;
    peakAboveIdleBytes: number;
    peakAboveLoadedBytes: number;
    /** V8 heap + ArrayBuffers still held right after the first fit (its result alive), above idle. */
    retainedAfterFitBytes: number;
  };
  warmRefit?: {
    previousN: number;
    cold: TimingSummary;
    warm: TimingSummary;
    coldResult: FitSummary;
    warmResult: FitSummary;
  };
  warmRefitError?: string;
}

function summarize(r: FitResult): FitSummary {
  return {
    status: r.status,
    coefficients: Array.from(r.coefficients),
    objective: Number.isFinite(r.objective) ? r.objective : null,
    scale: Number.isFinite(r.scale) ? r.scale : null,
    iterations: r.iterations,
    converged: r.converged,
    reason: r.reason,
    basisLength: r.basis ? r.basis.length : null,
  };
}

function loadProblem(path: string): { header: DatasetHeader; problem: LinearProblem } {
  const { header, x, y } = readDataset(path);
  // x is dropped on return: the estimator's input is X and y only.
  return { header, problem: { n: header.n, p: header.p, X: designMatrix(x, header.p), y } };
}

/** The first n − 1 rows, as views (no copy): the campaign before its newest reading. */
function withoutLastRow(problem: LinearProblem): LinearProblem {
  const n = problem.n - 1;
  return { n, p: problem.p, X: problem.X.subarray(0, n * problem.p), y: problem.y.subarray(0, n) };
}

function runOne(fit: EstimatorFn, estimator: Estimator, path: string, timing: TimingOptions, warmRefit: boolean): OursRun {
  const gcExposed = collectGarbage();
  const idle = snapshot();
  const probe = new PeakProbe();
  const { header, problem } = loadProblem(path);
  const inputBytes = problem.X.byteLength + problem.y.byteLength;
  collectGarbage();
  const loaded = snapshot();
  probe.restart();
  const first = fit(problem);
  const peak = probe.peakBytes();
  const after = snapshot();
  const base: OursRun = { estimator, n: problem.n, p: problem.p, available: true };
  base.memory = {
    method: probe.method,
    gcExposed,
    inputBytes,
    idleRssBytes: idle.rssBytes,
    loadedRssBytes: loaded.rssBytes,
    peakRssBytes: peak,
    peakAboveIdleBytes: peak - idle.rssBytes,
    peakAboveLoadedBytes: peak - loaded.rssBytes,
    retainedAfterFitBytes: after.heapUsedBytes + after.arrayBuffersBytes - idle.heapUsedBytes - idle.arrayBuffersBytes,
  };
  let last = first;
  base.timing = timeCall(() => fit(problem), timing, (r) => { last = r; });
  base.result = summarize(last);
  let floorSink = 0;
  base.floor = timeCall(() => onePassFloor(problem.X, problem.y, problem.p, header.trueCoefficients), timing, (s) => { floorSink += s; });
  if (!Number.isFinite(floorSink)) throw new Error('floor pass produced a non-finite sum');
  if (warmRefit) {
    // A failure here must not hide the cold figures above: it is reported on its own.
    try {
      const before = fit(withoutLastRow(problem));
      const warmStart: NonNullable<FitOptions['warmStart']> = { coefficients: before.coefficients, scale: before.scale };
      if (before.basis) warmStart.basis = before.basis;
      let coldLast = first;
      let warmLast = first;
      const cold = timeCall(() => fit(problem), timing, (r) => { coldLast = r; });
      const warm = timeCall(() => fit(problem, { warmStart }), timing, (r) => { warmLast = r; });
      base.warmRefit = { previousN: problem.n - 1, cold, warm, coldResult: summarize(coldLast), warmResult: summarize(warmLast) };
    } catch (e) {
      base.warmRefitError = `threw ${(e as Error).name}: ${(e as Error).message}`;
    }
  }
  return base;
}

async function main(): Promise<void> {
  const args = parseKeyValueArgs(process.argv.slice(2), ['data', 'estimator', 'budget', 'max-repeats', 'min-sample']);
  const estimator = args.get('estimator') as Estimator;
  if (!(ESTIMATORS as readonly string[]).includes(estimator)) throw new Error(`--estimator ${estimator}: expected one of ${ESTIMATORS.join(', ')}`);
  const timing: TimingOptions = {
    budgetSeconds: numberArg(args, 'budget'),
    maxRepeats: numberArg(args, 'max-repeats'),
    minSampleSeconds: numberArg(args, 'min-sample'),
  };
  const path = args.get('data') ?? '';
  const { found, missing } = await loadEstimators();
  const fit = found[estimator];
  let out: OursRun;
  if (!fit) {
    const { header } = readDataset(path);
    out = { estimator, n: header.n, p: header.p, available: false, error: missing[estimator] ?? 'not available' };
  } else {
    try {
      out = runOne(fit, estimator, path, timing, args.get('warm-refit') === '1');
    } catch (e) {
      const { header } = readDataset(path);
      out = { estimator, n: header.n, p: header.p, available: true, error: `threw ${(e as Error).name}: ${(e as Error).message}` };
    }
  }
  process.stdout.write(JSON.stringify(out) + '\n');
}

await main();
