// Our side is timed twice per (n, p) round: before the round's peers and again after them, and
// the two runs' samples are pooled. Why: this machine's speed drifts by 2–3× over minutes (the
// one-pass floor read 2.3–8.1 ms at n = 10⁶ within one session), and a round's peers take minutes
// (HiGHS and yalps at 10⁶), so a single run of ours could fall in a slow spell while the peer it is
// compared with ran in a quiet one, or the other way round. Bracketing the peers puts both sides
// in the same stretch of time; it narrows the ratio's spread and leans neither way. Both runs stay
// in the results (`timingRuns`, `floorRuns`).
import type { OursRun } from '../run-ours.ts';
import type { OursRecord } from './report-types.ts';
import { median, type TimingSummary } from './timing.ts';

/** One summary over the samples of several runs (each sample is already seconds per call). */
export function poolTimings(runs: readonly TimingSummary[]): TimingSummary | null {
  if (runs.length === 0) return null;
  if (runs.length === 1) return runs[0];
  const samples = runs.flatMap((r) => r.samples);
  return {
    medianSeconds: median(samples),
    minSeconds: Math.min(...samples),
    maxSeconds: Math.max(...samples),
    samples,
    // Of the first run: batching is calibrated per run, and the first is the one from a fresh start.
    callsPerSample: runs[0].callsPerSample,
    firstCallSeconds: runs[0].firstCallSeconds,
    warmupCalls: runs[0].warmupCalls,
  };
}

/**
 * The record with a second run's timing and floor pooled in. A second run that failed or
 * answered differently leaves the first run's figures alone and says so in the note.
 */
export function withSecondRun(rec: OursRecord, second: OursRun): OursRecord {
  if (!rec.available || !rec.timing) return rec;
  const same = second.result !== undefined && second.result.coefficients.length === rec.coefficients.length &&
    second.result.coefficients.every((c, j) => c === rec.coefficients[j]);
  if (second.error || !second.timing || !same) {
    const why = second.error ?? (!second.timing ? 'no timing' : 'different coefficients');
    return { ...rec, note: `${rec.note}; second timing run not pooled (${why})` };
  }
  const timingRuns = [...rec.timingRuns, second.timing];
  const floorRuns = second.floor ? [...rec.floorRuns, second.floor] : rec.floorRuns;
  return { ...rec, timingRuns, floorRuns, timing: poolTimings(timingRuns), floor: poolTimings(floorRuns) };
}
