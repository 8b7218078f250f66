// The benchmark: our estimators against R quantreg/MASS, scipy, statsmodels, numpy and yalps on the
// same seeded data in the same run, with exactness checked beside every time.
//
//   npm run bench                      all sizes (10³ … 10⁶), p = 2 and 3
//   npm run bench -- --max-n 100000    a shorter pass, same output
//   options: --cap S (per-run cap for peers, default 60) --check-cap S (correctness checks, default 300)
//            --budget S --max-repeats K --min-sample S
//            --seed N --estimators a,b --peers id,id | --no-peers --out FILE --readme | --no-readme
//
// Per size and p: the dataset is generated once (bench/data/, gitignored); each of our estimators
// runs in its own process (bench/run-ours.ts) for honest memory figures; then every peer runs
// (bench/peers/); everything is re-scored here and written to bench/results/latest.json, the
// tables go to stdout, progress to stderr.
import { mkdirSync, renameSync, writeFileSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadavg } from 'node:os';
import { InputError } from '../src/errors.ts';
import { ESTIMATORS, type Estimator } from '../src/fit/types.ts';
import { BENCH_SIZES, DEFAULT_SEED, designMatrix, ensureDataset } from './generate.ts';
import { assertOursRun } from './harness/check-ours-run.ts';
import { withSecondRun } from './harness/bracket.ts';
import { memoryRow, oursRecord, rescorePeer, resultRow, warmRefitRow, type RoundData } from './harness/assemble-results.ts';
import { COEFFICIENT_REL_TOL, OBJECTIVE_REL_TOL } from './harness/exactness.ts';
import { textReport } from './harness/format-report.ts';
import { formatSeconds, formatSize } from './harness/format-units.ts';
import { machineInfo } from './harness/machine-info.ts';
import { probeAvailability } from './harness/peer-availability.ts';
import { PEERS } from './harness/peer-registry.ts';
import { runPeer, type PeerContext } from './harness/peer-runs.ts';
import { readDataset } from './harness/dataset-file.ts';
import type { BenchReport, MemoryRow, OursRecord, PeerRun, ResultRow, RoundInfo, WarmRefitRow } from './harness/report-types.ts';
import { lastJsonLine, runChild, stderrTail } from './harness/run-child.ts';
import { evaluateTargets, WARM_N } from './harness/targets.ts';
import { DEFAULT_TIMING, type TimingOptions } from './harness/timing.ts';
import { updateReadme } from './harness/readme-section.ts';
import type { OursRun } from './run-ours.ts';

const REPO_ROOT = join(dirname(fileURLToPath(import.meta.url)), '..');
const DEFAULT_OUT = join(REPO_ROOT, 'bench', 'results', 'latest.json');
const DEFAULT_CAP_SECONDS = 60;
const DEFAULT_CHECK_CAP_SECONDS = 300;
/** Our runner is not capped (it is what we measure) but must not hang the bench forever. */
const OURS_TIMEOUT_SECONDS = 900;

interface Settings {
  sizes: number[];
  seed: number;
  capSeconds: number;
  checkCapSeconds: number;
  timing: TimingOptions;
  estimators: Estimator[];
  peerIds: string[] | null;
  out: string;
  readme: boolean | null;
}

function parseSettings(argv: readonly string[]): Settings {
  const s: Settings = { sizes: [...BENCH_SIZES], seed: DEFAULT_SEED, capSeconds: DEFAULT_CAP_SECONDS, checkCapSeconds: DEFAULT_CHECK_CAP_SECONDS, timing: { ...DEFAULT_TIMING }, estimators: [...ESTIMATORS], peerIds: null, out: DEFAULT_OUT, readme: null };
  let maxN = Infinity;
  const num = (flag: string, v: string | undefined): number => {
    const x = Number(v);
    if (v === undefined || v.trim() === '' || !Number.isFinite(x) || x <= 0) throw new InputError(flag, v, 'must be a positive number');
    return x;
  };
  for (let i = 0; i < argv.length; i++) {
    const flag = argv[i];
    const next = (): string | undefined => argv[++i];
    switch (flag) {
      case '--max-n': maxN = num(flag, next()); break;
      case '--sizes': s.sizes = (next() ?? '').split(',').map((v) => num(flag, v)); break;
      case '--cap': s.capSeconds = num(flag, next()); break;
      case '--check-cap': s.checkCapSeconds = num(flag, next()); break;
      case '--budget': s.timing.budgetSeconds = num(flag, next()); break;
      case '--max-repeats': s.timing.maxRepeats = Math.round(num(flag, next())); break;
      case '--min-sample': s.timing.minSampleSeconds = num(flag, next()); break;
      case '--seed': s.seed = num(flag, next()); break;
      case '--estimators': {
        const v = (next() ?? '').split(',');
        for (const e of v) if (!(ESTIMATORS as readonly string[]).includes(e)) throw new InputError(flag, e, `expected one of ${ESTIMATORS.join(', ')}`);
        s.estimators = v as Estimator[];
        break;
      }
      case '--peers': {
        const v = (next() ?? '').split(',');
        for (const id of v) if (!PEERS.some((p) => p.id === id)) throw new InputError(flag, id, `expected peer ids: ${PEERS.map((p) => p.id).join(', ')}`);
        s.peerIds = v;
        break;
      }
      case '--no-peers': s.peerIds = []; break;
      case '--out': s.out = next() ?? ''; break;
      case '--readme': s.readme = true; break;
      case '--no-readme': s.readme = false; break;
      default: throw new InputError('argument', flag, 'unknown option (see the header of bench/run-bench.ts)');
    }
  }
  s.sizes = s.sizes.filter((n) => n <= maxN).sort((a, b) => a - b);
  if (s.sizes.length === 0) throw new InputError('--max-n', maxN, `leaves no size to run (sizes ${BENCH_SIZES.join(', ')})`);
  return s;
}

function progress(line: string): void {
  process.stderr.write(`[bench ${new Date().toISOString().slice(11, 19)}] ${line}\n`);
}

async function runOurs(estimator: Estimator, dataPath: string, n: number, p: number, timing: TimingOptions, warm: boolean): Promise<OursRun> {
  const args = ['--expose-gc', '--import', 'tsx', join(REPO_ROOT, 'bench', 'run-ours.ts'), '--data', dataPath, '--estimator', estimator,
    '--budget', String(timing.budgetSeconds), '--max-repeats', String(timing.maxRepeats), '--min-sample', String(timing.minSampleSeconds)];
  if (warm) args.push('--warm-refit', '1');
  const out = await runChild(process.execPath, args, { timeoutSeconds: OURS_TIMEOUT_SECONDS, cwd: REPO_ROOT });
  const json = lastJsonLine(out.stdout);
  if (out.timedOut) return { estimator, n, p, available: true, error: `timed out after ${OURS_TIMEOUT_SECONDS} s` };
  if (out.code !== 0 || json === null) return { estimator, n, p, available: true, error: `runner failed (exit ${out.code ?? out.signal}: ${stderrTail(out.stderr) || 'no result line'})` };
  return assertOursRun(json);
}

async function main(): Promise<void> {
  const settings = parseSettings(process.argv.slice(2));
  const startedAt = new Date().toISOString();
  const availability = await probeAvailability();
  const machine = machineInfo(availability);
  const peers = PEERS.filter((p) => settings.estimators.includes(p.estimator) && (settings.peerIds === null || settings.peerIds.includes(p.id)));
  const ctx: PeerContext = { repoRoot: REPO_ROOT, availability, capSeconds: settings.capSeconds, checkCapSeconds: settings.checkCapSeconds, timing: settings.timing, history: new Map() };
  const results: ResultRow[] = [];
  const ours: OursRecord[] = [];
  const peerRuns: PeerRun[] = [];
  const memory: MemoryRow[] = [];
  const warmRefit: WarmRefitRow[] = [];
  const rounds: RoundInfo[] = [];
  progress(`sizes ${settings.sizes.map(formatSize).join(', ')}; estimators ${settings.estimators.join(', ')}; ${peers.length} peers; cap ${settings.capSeconds} s`);

  for (const n of settings.sizes) {
    for (const p of [2, 3] as const) {
      const roundStart = process.hrtime.bigint();
      const round0 = { n, p, startedAt: new Date().toISOString(), loadAverageStart: Math.round(loadavg()[0] * 100) / 100 };
      const path = ensureDataset({ n, p, seed: settings.seed });
      const ds = readDataset(path);
      const data: RoundData = { n, p, X: designMatrix(ds.x, p), y: ds.y, noiseSd: ds.header.noiseSdM };
      const roundOurs = new Map<Estimator, OursRecord>();
      for (const est of settings.estimators) {
        const run = await runOurs(est, path, n, p, settings.timing, n === WARM_N);
        const rec = oursRecord(run, data);
        roundOurs.set(est, rec);
        const m = memoryRow(run);
        if (m) memory.push(m);
        const w = warmRefitRow(run, data);
        if (w) warmRefit.push(w);
        progress(`n=${formatSize(n)} p=${p} ours ${est}: ${rec.available ? formatSeconds(rec.timing?.medianSeconds) : rec.note}`);
      }
      const round: PeerRun[] = [];
      for (const spec of peers) {
        const run = rescorePeer(await runPeer(spec, path, n, p, ctx), data);
        round.push(run);
        peerRuns.push(run);
        progress(`n=${formatSize(n)} p=${p} ${spec.label}: ${run.status === 'ok' ? formatSeconds(run.medianSeconds) : run.note}`);
      }
      // Ours again after the peers, pooled with the first run (bench/harness/bracket.ts).
      for (const est of settings.estimators) {
        const first = roundOurs.get(est);
        if (!first) continue;
        const rec = first.available ? withSecondRun(first, await runOurs(est, path, n, p, settings.timing, false)) : first;
        ours.push(rec);
        results.push(resultRow(est, rec, round, data));
        progress(`n=${formatSize(n)} p=${p} ours ${est} after the peers: ${rec.timingRuns.map((t) => formatSeconds(t.medianSeconds)).join(' then ')}, pooled ${formatSeconds(rec.timing?.medianSeconds)}`);
      }
      rounds.push({ ...round0, wallSeconds: Number(process.hrtime.bigint() - roundStart) / 1e9, loadAverageEnd: Math.round(loadavg()[0] * 100) / 100 });
      progress(`n=${formatSize(n)} p=${p} round done; load average ${round0.loadAverageStart} → ${loadavg()[0].toFixed(2)}`);
    }
  }

  const base = {
    results, ours, peers: peerRuns, memory, warmRefit,
    settings: { sizes: settings.sizes, seed: settings.seed, capSeconds: settings.capSeconds, checkCapSeconds: settings.checkCapSeconds, budgetSeconds: settings.timing.budgetSeconds, maxRepeats: settings.timing.maxRepeats, minSampleSeconds: settings.timing.minSampleSeconds },
  };
  const report: BenchReport = {
    format: 'arcfield-bench-results', version: 1, startedAt, finishedAt: new Date().toISOString(),
    command: process.argv.length > 2 ? `npm run bench -- ${process.argv.slice(2).join(' ')}` : 'npm run bench',
    ...base,
    machine, loadAverageAtEnd: loadavg().map((v) => Math.round(v * 100) / 100), rounds,
    rules: {
      timing: 'each side times itself in-process: warm-up calls (at least a second and MIN_WARMUP_CALLS calls, at most WARMUP_CAP_SECONDS), then batched repeats within a budget (bench/harness/timing.ts); median, min, max reported; start-up and file reading excluded',
      bracketing: 'ours (and its floor) is timed in a fresh process before the round\'s peers and again after them; the median is over both runs\' samples pooled, so both sides share the same stretch of time on a machine whose speed drifts (bench/harness/bracket.ts); each run is kept in timingRuns / floorRuns',
      floor: 'one plain pass Σ|yᵢ − xᵢᵀβ| for the true β over the same X and y, timed in the same process as our fit',
      fastestPeer: 'fastest peer (not check) that finished, regardless of its accuracy (an inexact fast peer lowers our speed-up)',
      objectiveExactness: `L1 and L∞: (ours − best)/best ≤ ${OBJECTIVE_REL_TOL}, best = lowest objective among all peers and checks, every objective recomputed here from the coefficients on the same data (Neumaier sum)`,
      coefficientExactness: `least squares, Huber, Tukey: |Δβⱼ| ≤ ${COEFFICIENT_REL_TOL}·(|βⱼ| + σ/maxᵢ|Xᵢⱼ|) for every j, σ = the data's noise sd; reference numpy lstsq (LS) or the R fixed-scale IRLS (M-estimators)`,
      mEstimatorRule: 'Huber k = 1.345, Tukey c = 4.685; start = exact L1 fit; scale = 1/Φ⁻¹(3/4)·median|r − median r| of the start residuals, held fixed; IRLS to a fixed point. MASS::rlm (timed peer) re-estimates the scale each iteration from a least-squares start: a different estimator, reported beside (its acc = 1e-12 run as a check)',
      memory: 'separate process per estimator and size; peak RSS (kernel VmHWM after clear_refs) during the first fit minus RSS of the idle process before the data were loaded; input = bytes of X and y',
      warmRefit: '9 campaigns, the first n − 8 … n rows; a fit session on each campaign less its newest reading is fitted and checkpointed; timed: rollback + append the newest reading + fit; the median over campaigns of the median warm time / median cold plain fit of the n rows (src/fit/fit-session.ts)',
      caps: `peer runs predicted (power law from smaller n) over ${settings.capSeconds} s (checks: ${settings.checkCapSeconds} s) are skipped; a run is killed after max(cap, 50 s) + 2·budget + 60 s`,
      timingProtocol: 'a first call over 10 s is the only sample; otherwise warm-up, calibration, then at least 3 and at most maxRepeats batched samples within the budget',
    },
    targets: evaluateTargets(base, settings.estimators),
  };
  mkdirSync(dirname(settings.out), { recursive: true });
  const tmp = `${settings.out}.${process.pid}.tmp`;
  writeFileSync(tmp, JSON.stringify(report, null, 1) + '\n');
  renameSync(tmp, settings.out);
  process.stdout.write(textReport(report) + '\n');
  progress(`wrote ${relative(REPO_ROOT, settings.out)}`);
  const fullRun = BENCH_SIZES.every((n) => settings.sizes.includes(n)) && settings.out === DEFAULT_OUT && settings.peerIds === null;
  if (settings.readme ?? fullRun) {
    updateReadme(report, join(REPO_ROOT, 'README.md'));
    progress('README.md benchmark section regenerated');
  } else {
    progress('README.md left alone (not a full run; pass --readme to regenerate it anyway)');
  }
}

await main();
