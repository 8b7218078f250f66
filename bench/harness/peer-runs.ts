// Runs one peer on one dataset, or says why it did not: missing (runtime or package absent),
// skipped (predicted over the cap, or a smaller n already failed or was skipped), timed out (the
// hard limit killed it), failed (non-zero exit or no result). Peers time themselves in-process
// (interpreter start-up and file reading excluded) by the shared protocol.
import { join } from 'node:path';
import type { Availability } from './peer-availability.ts';
import { whyMissing } from './peer-availability.ts';
import type { PeerSpec } from './peer-registry.ts';
import { predictSeconds, type SizeTime } from './predict-time.ts';
import type { PeerRun } from './report-types.ts';
import { lastJsonLine, runChild, stderrTail } from './run-child.ts';
import { LONG_RUN_SECONDS, median, MIN_REPEATS, type TimingOptions } from './timing.ts';

/** Start-up and file reading allowance on top of the cap before the hard kill (R loads quantreg in ~1 s; 10⁶ rows read in <1 s). */
const STARTUP_ALLOWANCE_SECONDS = 60;

export interface PeerContext {
  repoRoot: string;
  availability: Availability;
  capSeconds: number;
  /** Cap for correctness checks: larger, because a verdict without its reference is "unchecked". */
  checkCapSeconds: number;
  timing: TimingOptions;
  /** Per peer id and p: the sizes measured so far, and whether a smaller size already gave up. */
  history: Map<string, { times: SizeTime[]; gaveUp: string | null }>;
}

interface PeerJson {
  status?: string;
  seconds?: number[];
  callsPerSample?: number;
  coefficients?: number[];
  objective?: number | null;
  scale?: number | null;
  iterations?: number | null;
  converged?: boolean | null;
  settings?: string;
  versions?: Record<string, string>;
}

function emptyRun(spec: PeerSpec, n: number, p: number, status: PeerRun['status'], note: string, predicted: number | null = null): PeerRun {
  return {
    id: spec.id, label: spec.label, estimator: spec.estimator, role: spec.role, n, p, status, note,
    medianSeconds: null, minSeconds: null, maxSeconds: null, samples: [], callsPerSample: null, predictedSeconds: predicted,
    coefficients: [], objective: null, reportedObjective: null, scale: null, iterations: null, converged: null, settings: '', versions: {},
  };
}

function commandFor(spec: PeerSpec, ctx: PeerContext, dataPath: string): [string, string[]] {
  const script = join(ctx.repoRoot, 'bench', 'peers', spec.script);
  const common = ['--data', dataPath, '--budget', String(ctx.timing.budgetSeconds), '--max-repeats', String(ctx.timing.maxRepeats), '--min-sample', String(ctx.timing.minSampleSeconds)];
  const rt = ctx.availability[spec.runtime];
  if (spec.runtime === 'node') return [process.execPath, ['--import', 'tsx', script, ...spec.args, ...common]];
  return [rt.command ?? spec.runtime, [script, ...spec.args, ...common]];
}

export async function runPeer(spec: PeerSpec, dataPath: string, n: number, p: number, ctx: PeerContext): Promise<PeerRun> {
  const missing = whyMissing(spec, ctx.availability);
  if (missing) return emptyRun(spec, n, p, 'missing', missing);
  const key = `${spec.id}/p${p}`;
  const hist = ctx.history.get(key) ?? { times: [], gaveUp: null };
  ctx.history.set(key, hist);
  if (hist.gaveUp) return emptyRun(spec, n, p, 'skipped', `skipped (${hist.gaveUp})`);
  const cap = spec.role === 'check' ? ctx.checkCapSeconds : ctx.capSeconds;
  const prediction = predictSeconds(hist.times, n, spec.growth);
  if (prediction && prediction.seconds > cap) {
    hist.gaveUp = `n = ${n} predicted over the cap`;
    return emptyRun(spec, n, p, 'skipped', `skipped (predicted ${prediction.seconds.toPrecision(3)} s > cap ${cap} s; ${prediction.basis})`, prediction.seconds);
  }
  const [command, args] = commandFor(spec, ctx, dataPath);
  // Worst case inside the cap: a first call just under LONG_RUN_SECONDS followed by a calibration
  // call and MIN_REPEATS samples, or one call up to the cap.
  const limit = Math.max(cap, (2 + MIN_REPEATS) * LONG_RUN_SECONDS) + 2 * ctx.timing.budgetSeconds + STARTUP_ALLOWANCE_SECONDS;
  const out = await runChild(command, args, { timeoutSeconds: limit, cwd: ctx.repoRoot });
  const predicted = prediction?.seconds ?? null;
  if (out.timedOut) {
    hist.gaveUp = `n = ${n} timed out`;
    return emptyRun(spec, n, p, 'timed out', `timed out (killed after ${limit} s; cap ${cap} s)`, predicted);
  }
  const json = lastJsonLine(out.stdout) as PeerJson | null;
  if (out.code !== 0 || !json) {
    hist.gaveUp = `n = ${n} failed`;
    return emptyRun(spec, n, p, 'failed', `failed (exit ${out.code ?? out.signal}: ${stderrTail(out.stderr) || 'no result line'})`, predicted);
  }
  const status = json.status ?? 'ok';
  if (status.startsWith('skipped')) {
    hist.gaveUp = `n = ${n} ${status}`;
    return emptyRun(spec, n, p, 'skipped', status, predicted);
  }
  const samples = json.seconds ?? [];
  const coefficients = json.coefficients ?? [];
  if (samples.length === 0 || coefficients.length !== p) {
    hist.gaveUp = `n = ${n} gave no result`;
    return emptyRun(spec, n, p, 'failed', `failed (${status}; ${samples.length} samples, ${coefficients.length} coefficients)`, predicted);
  }
  const med = median(samples);
  hist.times.push({ n, seconds: med });
  const run = emptyRun(spec, n, p, 'ok', status === 'ok' ? 'ok' : status, predicted);
  return {
    ...run,
    medianSeconds: med,
    minSeconds: Math.min(...samples),
    maxSeconds: Math.max(...samples),
    samples,
    callsPerSample: json.callsPerSample ?? 1,
    coefficients,
    reportedObjective: json.objective ?? null,
    scale: json.scale ?? null,
    iterations: json.iterations ?? null,
    converged: json.converged ?? null,
    settings: json.settings ?? '',
    versions: json.versions ?? {},
  };
}
