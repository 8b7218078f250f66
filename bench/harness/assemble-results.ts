// Turns one (n, p) round of runs into result rows: objectives re-scored on the same data, the
// fastest peer picked, the exactness verdict, the memory and warm-refit figures.
//
// Fastest peer: the fastest peer (not check) that finished, whatever its accuracy, so an inexact
// but quick tool makes our speed-up smaller, never larger. The verdict's reference is separate
// (see peer-registry.ts COEFFICIENT_REFERENCE and exactness.ts).
import type { Estimator } from '../../src/fit/types.ts';
import type { OursRun } from '../run-ours.ts';
import { compareCoefficients, COEFFICIENT_REL_TOL, OBJECTIVE_REL_TOL, objectiveGap, scoreObjective } from './exactness.ts';
import { COEFFICIENT_REFERENCE } from './peer-registry.ts';
import type { Exactness, MemoryRow, OursRecord, PeerRun, ResultRow, WarmRefitRow } from './report-types.ts';

export interface RoundData {
  n: number;
  p: number;
  X: Float64Array;
  y: Float64Array;
  noiseSd: number;
}

const OBJECTIVE_KIND: Partial<Record<Estimator, 'l1' | 'linf'>> = { 'least-absolute': 'l1', minimax: 'linf' };

export function oursRecord(run: OursRun, data: RoundData): OursRecord {
  const kind = OBJECTIVE_KIND[run.estimator];
  const r = run.result;
  const usable = r !== undefined && r.coefficients.length === data.p && r.coefficients.every(Number.isFinite);
  return {
    estimator: run.estimator, n: run.n, p: run.p,
    available: run.available && !run.error,
    note: run.error ?? (r ? `${r.status}; ${r.reason}` : 'no result'),
    timing: run.timing ?? null,
    floor: run.floor ?? null,
    timingRuns: run.timing ? [run.timing] : [],
    floorRuns: run.floor ? [run.floor] : [],
    coefficients: r?.coefficients ?? [],
    objective: usable && kind ? scoreObjective(kind, data.X, data.y, data.p, r.coefficients) : r?.objective ?? null,
    reportedObjective: r?.objective ?? null,
    status: r?.status ?? null,
    iterations: r?.iterations ?? null,
    converged: r?.converged ?? null,
    reason: r?.reason ?? null,
    scale: r?.scale ?? null,
    warmRefitError: run.warmRefitError ?? null,
  };
}

export function rescorePeer(run: PeerRun, data: RoundData): PeerRun {
  const kind = OBJECTIVE_KIND[run.estimator];
  if (run.status !== 'ok' || !kind || run.coefficients.length !== data.p) return run;
  return { ...run, objective: scoreObjective(kind, data.X, data.y, data.p, run.coefficients) };
}

function exactnessFor(estimator: Estimator, ours: OursRecord, peers: readonly PeerRun[], data: RoundData): { exactness: Exactness; match: boolean | null } {
  const kind = OBJECTIVE_KIND[estimator];
  const done = peers.filter((r) => r.estimator === estimator && r.status === 'ok');
  const oursOk = ours.available && ours.coefficients.length === data.p;
  if (kind) {
    const scored = done.filter((r) => r.objective !== null && Number.isFinite(r.objective));
    const best = scored.reduce<PeerRun | null>((b, r) => (b === null || (r.objective ?? Infinity) < (b.objective ?? Infinity) ? r : b), null);
    const gap = oursOk && best && ours.objective !== null ? objectiveGap(ours.objective, best.objective ?? NaN) : null;
    return {
      exactness: {
        kind: 'objective', reference: best ? `best of ${scored.length} peers: ${best.label}` : null,
        ours: oursOk ? ours.objective : null, referenceValue: best?.objective ?? null,
        relativeDifference: gap, tolerance: OBJECTIVE_REL_TOL,
        alsoComparedWith: scored.map((r) => ({ reference: r.label, relativeDifference: oursOk && ours.objective !== null ? objectiveGap(ours.objective, r.objective ?? NaN) : null, note: 'objective (ours − theirs)/theirs' })),
      },
      match: gap === null ? null : gap <= OBJECTIVE_REL_TOL,
    };
  }
  const refIds = COEFFICIENT_REFERENCE[estimator] ?? [];
  const ref = refIds.map((id) => done.find((r) => r.id === id)).find((r) => r !== undefined && r.coefficients.length === data.p);
  const cmp = oursOk && ref ? compareCoefficients(ours.coefficients, ref.coefficients, data.X, data.p, data.noiseSd) : null;
  const others = done.filter((r) => r !== ref && r.coefficients.length === data.p);
  return {
    exactness: {
      kind: 'coefficients', reference: ref?.label ?? null,
      ours: oursOk ? ours.coefficients : null, referenceValue: ref?.coefficients ?? null,
      relativeDifference: cmp?.scaledDifference ?? null, tolerance: COEFFICIENT_REL_TOL,
      alsoComparedWith: others.map((r) => ({
        reference: r.label,
        relativeDifference: oursOk ? compareCoefficients(ours.coefficients, r.coefficients, data.X, data.p, data.noiseSd).scaledDifference : null,
        note: r.settings,
      })),
    },
    match: cmp ? cmp.match : null,
  };
}

export function resultRow(estimator: Estimator, ours: OursRecord, peers: readonly PeerRun[], data: RoundData): ResultRow {
  const racing = peers.filter((r) => r.estimator === estimator && r.role === 'peer' && r.status === 'ok' && r.medianSeconds !== null);
  const fastest = racing.reduce<PeerRun | null>((b, r) => (b === null || (r.medianSeconds ?? Infinity) < (b.medianSeconds ?? Infinity) ? r : b), null);
  const oursSeconds = ours.available ? ours.timing?.medianSeconds ?? null : null;
  const floorSeconds = ours.floor?.medianSeconds ?? null;
  const { exactness, match } = exactnessFor(estimator, ours, peers, data);
  return {
    estimator, p: data.p, n: data.n,
    oursSeconds,
    oursMinSeconds: ours.available ? ours.timing?.minSeconds ?? null : null,
    oursMaxSeconds: ours.available ? ours.timing?.maxSeconds ?? null : null,
    floorSeconds,
    oursOverFloor: oursSeconds !== null && floorSeconds ? oursSeconds / floorSeconds : null,
    fastestPeer: fastest?.label ?? null,
    fastestPeerSeconds: fastest?.medianSeconds ?? null,
    speedup: oursSeconds && fastest?.medianSeconds ? fastest.medianSeconds / oursSeconds : null,
    exactMatch: match,
    exactness,
    oursStatus: ours.available ? `${ours.status ?? '?'} (${ours.iterations ?? '?'} iterations, ${ours.converged ? 'converged' : 'not converged'}: ${ours.reason ?? ''})` : ours.note,
  };
}

export function memoryRow(run: OursRun): MemoryRow | null {
  const m = run.memory;
  if (!m || run.error) return null;
  return {
    estimator: run.estimator, p: run.p, n: run.n,
    inputBytes: m.inputBytes, idleRssBytes: m.idleRssBytes,
    peakAboveIdleBytes: m.peakAboveIdleBytes, peakAboveLoadedBytes: m.peakAboveLoadedBytes,
    retainedAfterFitBytes: m.retainedAfterFitBytes,
    ratioToInput: m.peakAboveIdleBytes / m.inputBytes,
    method: m.method,
  };
}

export function warmRefitRow(run: OursRun, data: RoundData): WarmRefitRow | null {
  const w = run.warmRefit;
  if (!w || run.error) return null;
  if (w.cases.length > 0) {
    // Session cases (run-ours.ts item 6): each already compared with the cold fitter on its own rows.
    const worst = w.cases.reduce((a, c) => (Math.abs(c.relativeDifference) > Math.abs(a.relativeDifference) ? c : a));
    return {
      estimator: run.estimator, p: run.p, n: run.n,
      coldSeconds: w.cold.medianSeconds, warmSeconds: w.warm.medianSeconds,
      ratio: w.warm.medianSeconds / w.cold.medianSeconds,
      sameResult: w.cases.every((c) => c.sameResult), relativeDifference: worst.relativeDifference,
      warmIterations: w.warmResult.iterations, coldIterations: w.coldResult.iterations,
      cases: w.cases.length,
      fastPathCases: w.cases.filter((c) => c.iterations === 0).length,
      warmSecondsMax: Math.max(...w.cases.map((c) => c.warmSeconds)),
      rollbackSeconds: w.rollback.medianSeconds,
    };
  }
  const kind = OBJECTIVE_KIND[run.estimator];
  let diff: number;
  let same: boolean;
  if (kind) {
    const cold = scoreObjective(kind, data.X, data.y, data.p, w.coldResult.coefficients);
    const warm = scoreObjective(kind, data.X, data.y, data.p, w.warmResult.coefficients);
    diff = objectiveGap(warm, cold);
    same = Math.abs(diff) <= OBJECTIVE_REL_TOL;
  } else {
    const c = compareCoefficients(w.warmResult.coefficients, w.coldResult.coefficients, data.X, data.p, data.noiseSd);
    diff = c.scaledDifference;
    same = c.match;
  }
  return {
    estimator: run.estimator, p: run.p, n: run.n,
    coldSeconds: w.cold.medianSeconds, warmSeconds: w.warm.medianSeconds,
    ratio: w.warm.medianSeconds / w.cold.medianSeconds,
    sameResult: same, relativeDifference: diff,
    warmIterations: w.warmResult.iterations, coldIterations: w.coldResult.iterations,
  };
}
