// The shape of bench/results/latest.json (format "arcfield-bench-results", version 1). Every time is
// seconds per call (median of the samples unless named otherwise), every size in bytes.
import type { Estimator } from '../../src/fit/types.ts';
import type { MachineInfo } from './machine-info.ts';
import type { TimingSummary } from './timing.ts';

export interface PeerRun {
  id: string;
  label: string;
  estimator: Estimator;
  role: 'peer' | 'check';
  n: number;
  p: number;
  /** ok | missing | skipped | timed out | failed */
  status: 'ok' | 'missing' | 'skipped' | 'timed out' | 'failed';
  /** Why, in words (the missing package, the prediction, the error). */
  note: string;
  medianSeconds: number | null;
  minSeconds: number | null;
  maxSeconds: number | null;
  samples: number[];
  callsPerSample: number | null;
  predictedSeconds: number | null;
  coefficients: number[];
  /** Recomputed here from the coefficients on the same data (L1: Σ|r|, L∞: max|r|). */
  objective: number | null;
  reportedObjective: number | null;
  scale: number | null;
  iterations: number | null;
  converged: boolean | null;
  settings: string;
  versions: Record<string, string>;
}

export interface OursRecord {
  estimator: Estimator;
  n: number;
  p: number;
  available: boolean;
  note: string;
  /** Pooled over `timingRuns` (see bench/harness/bracket.ts). */
  timing: TimingSummary | null;
  /** Pooled over `floorRuns`. */
  floor: TimingSummary | null;
  /** Our timing before the round's peers and, when it ran, after them. */
  timingRuns: TimingSummary[];
  floorRuns: TimingSummary[];
  coefficients: number[];
  /** Recomputed from the coefficients for L1/L∞; as reported for the others. */
  objective: number | null;
  reportedObjective: number | null;
  status: string | null;
  iterations: number | null;
  converged: boolean | null;
  reason: string | null;
  scale: number | null;
  /** Set when the warm refit (n = 10⁴ only) threw; the cold figures stand. */
  warmRefitError: string | null;
}

export interface Exactness {
  kind: 'objective' | 'coefficients';
  reference: string | null;
  ours: number | number[] | null;
  referenceValue: number | number[] | null;
  /** Objective: (ours − best)/best. Coefficients: max |Δβⱼ|/(|βⱼ| + σ/max|Xⱼ|). */
  relativeDifference: number | null;
  tolerance: number;
  /** Extra comparisons reported beside the verdict (e.g. MASS's own scale rule). */
  alsoComparedWith: { reference: string; relativeDifference: number | null; note: string }[];
}

export interface ResultRow {
  estimator: Estimator;
  p: number;
  n: number;
  oursSeconds: number | null;
  oursMinSeconds: number | null;
  oursMaxSeconds: number | null;
  floorSeconds: number | null;
  oursOverFloor: number | null;
  fastestPeer: string | null;
  fastestPeerSeconds: number | null;
  /** fastestPeerSeconds / oursSeconds. */
  speedup: number | null;
  exactMatch: boolean | null;
  exactness: Exactness;
  oursStatus: string;
}

export interface MemoryRow {
  estimator: Estimator;
  p: number;
  n: number;
  inputBytes: number;
  idleRssBytes: number;
  peakAboveIdleBytes: number;
  peakAboveLoadedBytes: number;
  retainedAfterFitBytes: number;
  /** peakAboveIdleBytes / inputBytes (target < 4 at n = 10⁶). */
  ratioToInput: number;
  method: string;
}

export interface WarmRefitRow {
  estimator: Estimator;
  p: number;
  n: number;
  coldSeconds: number;
  warmSeconds: number;
  /** warm / cold (target < 1/20). */
  ratio: number;
  /** The warm answer equals the cold one (objective 1e-9 / coefficients 1e-8). */
  sameResult: boolean;
  relativeDifference: number;
  warmIterations: number;
  coldIterations: number;
  /** Session cases measured (bench/run-ours.ts item 6); warmSeconds is their median. */
  cases?: number;
  /** Cases answered without an iteration (the session's kept vertex, level or sums; a Tukey refit always takes at least one IRLS step, so it reads 0 here even when its refit is fast). */
  fastPathCases?: number;
  warmSecondsMax?: number;
  /** One rollback() alone. */
  rollbackSeconds?: number;
}

export interface TargetLine {
  name: string;
  pass: boolean | null;
  detail: string;
}

/** One (n, p) round: when it ran and how busy the machine was (the 1-minute load average). */
export interface RoundInfo {
  n: number;
  p: number;
  startedAt: string;
  wallSeconds: number;
  loadAverageStart: number;
  loadAverageEnd: number;
}

export interface BenchReport {
  format: 'arcfield-bench-results';
  version: 1;
  startedAt: string;
  finishedAt: string;
  command: string;
  settings: {
    sizes: number[];
    seed: number;
    capSeconds: number;
    checkCapSeconds: number;
    budgetSeconds: number;
    maxRepeats: number;
    minSampleSeconds: number;
  };
  machine: MachineInfo;
  loadAverageAtEnd: number[];
  rounds: RoundInfo[];
  rules: Record<string, string>;
  results: ResultRow[];
  ours: OursRecord[];
  peers: PeerRun[];
  memory: MemoryRow[];
  warmRefit: WarmRefitRow[];
  targets: TargetLine[];
}
