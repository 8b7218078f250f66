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
// 6. warm refit (optional), through the fit session (src/fit/fit-session.ts): for C = 9 cases
//    c = 0…8 the campaign is the first N = n − 9 + c + 1 rows; a session is fitted on its first
//    N − 1 rows and checkpoint()ed; the timed call is rollback(), append the row N − 1, fit. The
//    rollback only resets counts and small kept states (timed once on its own: it must not copy
//    rows). Each case's answer is compared with the plain cold fitter on its N rows; warmSeconds is
//    the median over cases, coldSeconds the plain cold fit of all n rows.
// Prints one JSON line (OursRun) on stdout.
import type { Estimator, FitResult, LinearProblem } from '../src/fit/types.ts';
import { ESTIMATORS } from '../src/fit/types.ts';
import { designMatrix } from './generate.ts';
import { numberArg, parseKeyValueArgs } from './harness/cli-args.ts';
import { readDataset, type DatasetHeader } from './harness/dataset-file.ts';
import { onePassFloor } from './harness/floor-pass.ts';
import { loadEstimators, type EstimatorFn } from './harness/load-estimators.ts';
import { collectGarbage, PeakProbe, snapshot } from './harness/memory-probe.ts';
import { median, timeCall, type TimingOptions, type TimingSummary } from './harness/timing.ts';
import { compareCoefficients, objectiveGap, OBJECTIVE_REL_TOL, scoreObjective } from './harness/exactness.ts';
import { existsSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';

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
    /** The median case's timing. */
    warm: TimingSummary;
    coldResult: FitSummary;
    /** The median case's answer. */
    warmResult: FitSummary;
    cases: WarmCase[];
    /** One rollback() on its own (the first case's session). */
    rollback: TimingSummary;
  };
  warmRefitError?: string;
}

/** One warm-refit case: the campaign of the first n rows, refitted by its session after its last reading. */
export interface WarmCase {
  n: number;
  warmSeconds: number;
  iterations: number;
  /** The session's answer equals the plain cold fitter's on the same n rows (objective 1e-9 for L1/L∞, coefficients 1e-8 otherwise). */
  sameResult: boolean;
  relativeDifference: number;
  reason: string;
}

/** Cases of the warm-refit measurement (c = 0 … WARM_CASES − 1). */
export const WARM_CASES = 9;

interface BenchSession {
  append(rows: readonly { x: ArrayLike<number>; y: number }[]): void;
  fit(estimator: Estimator): FitResult;
  checkpoint(): void;
  rollback(): void;
}
type SessionFactory = (problem: LinearProblem) => BenchSession;

/** createFitSession from the same module the estimators come from (ARCFIELD_BENCH_FIT_MODULE or src/fit/index.ts). */
async function loadSessionFactory(): Promise<SessionFactory | string> {
  const override = process.env.ARCFIELD_BENCH_FIT_MODULE;
  const url = override ? pathToFileURL(override) : new URL('../src/fit/index.ts', import.meta.url);
  if (!existsSync(fileURLToPath(url))) return `no fit module at ${fileURLToPath(url)}`;
  const mod = (await import(url.href)) as Record<string, unknown>;
  const fn = mod.createFitSession;
  return typeof fn === 'function' ? (fn as SessionFactory) : 'the fit module exports no createFitSession';
}

const OBJECTIVE_KIND: Partial<Record<Estimator, 'l1' | 'linf'>> = { 'least-absolute': 'l1', minimax: 'linf' };

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

/** The first n rows, as views (no copy). */
function head(problem: LinearProblem, n: number): LinearProblem {
  return { n, p: problem.p, X: problem.X.subarray(0, n * problem.p), y: problem.y.subarray(0, n) };
}

/** The session's answer against the plain cold fitter's on the same rows, scored as the bench scores exactness. */
function compareWarm(estimator: Estimator, rows: LinearProblem, warm: FitResult, cold: FitResult, noiseSd: number): { same: boolean; diff: number } {
  const kind = OBJECTIVE_KIND[estimator];
  if (kind) {
    const diff = objectiveGap(scoreObjective(kind, rows.X, rows.y, rows.p, warm.coefficients), scoreObjective(kind, rows.X, rows.y, rows.p, cold.coefficients));
    return { same: warm.status === cold.status && Math.abs(diff) <= OBJECTIVE_REL_TOL, diff };
  }
  const c = compareCoefficients(warm.coefficients, cold.coefficients, rows.X, rows.p, noiseSd);
  return { same: warm.status === cold.status && c.match, diff: c.scaledDifference };
}

function warmRefitRun(fit: EstimatorFn, estimator: Estimator, problem: LinearProblem, noiseSd: number, timing: TimingOptions,
  create: SessionFactory, first: FitResult): NonNullable<OursRun['warmRefit']> {
  const { n, p } = problem;
  let coldLast = first;
  const cold = timeCall(() => fit(problem), timing, (r) => { coldLast = r; });
  const cases: WarmCase[] = [];
  const timings: TimingSummary[] = [];
  const answers: FitResult[] = [];
  let rollback: TimingSummary | null = null;
  for (let c = 0; c < WARM_CASES; c++) {
    const N = n - WARM_CASES + c + 1;
    const session = create(head(problem, N - 1));
    session.fit(estimator);
    session.checkpoint();
    const row = [{ x: problem.X.subarray((N - 1) * p, N * p), y: problem.y[N - 1] }];
    if (!rollback) rollback = timeCall(() => session.rollback(), timing);
    let last: FitResult | null = null;
    const t = timeCall(() => {
      session.rollback();
      session.append(row);
      return session.fit(estimator);
    }, timing, (r) => { last = r; });
    const warm = last ?? session.fit(estimator);
    const rows = head(problem, N);
    const { same, diff } = compareWarm(estimator, rows, warm, fit(rows), noiseSd);
    cases.push({ n: N, warmSeconds: t.medianSeconds, iterations: warm.iterations, sameResult: same, relativeDifference: diff, reason: warm.reason });
    timings.push(t);
    answers.push(warm);
  }
  const mid = median(cases.map((k) => k.warmSeconds));
  let at = 0;
  for (let k = 1; k < cases.length; k++) if (Math.abs(cases[k].warmSeconds - mid) < Math.abs(cases[at].warmSeconds - mid)) at = k;
  return {
    previousN: n - 1, cold, warm: { ...timings[at], medianSeconds: mid }, coldResult: summarize(coldLast), warmResult: summarize(answers[at]),
    cases, rollback: rollback ?? timeCall(() => 0, timing),
  };
}

function runOne(fit: EstimatorFn, estimator: Estimator, path: string, timing: TimingOptions, warmRefit: SessionFactory | string | null): OursRun {
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
  if (typeof warmRefit === 'string') base.warmRefitError = `fit session not available: ${warmRefit}`;
  else if (warmRefit) {
    // A failure here must not hide the cold figures above: it is reported on its own.
    try {
      base.warmRefit = warmRefitRun(fit, estimator, problem, header.noiseSdM, timing, warmRefit, first);
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
      out = runOne(fit, estimator, path, timing, args.get('warm-refit') === '1' ? await loadSessionFactory() : null);
    } catch (e) {
      const { header } = readDataset(path);
      out = { estimator, n: header.n, p: header.p, available: true, error: `threw ${(e as Error).name}: ${(e as Error).message}` };
    }
  }
  process.stdout.write(JSON.stringify(out) + '\n');
}

await main();
