import { describe, expect, it } from 'vitest';
import { poolTimings, withSecondRun } from '../../bench/harness/bracket.ts';
import type { OursRecord } from '../../bench/harness/report-types.ts';
import type { TimingSummary } from '../../bench/harness/timing.ts';
import type { OursRun } from '../../bench/run-ours.ts';

const run = (samples: number[], callsPerSample = 1): TimingSummary => ({
  medianSeconds: NaN, minSeconds: NaN, maxSeconds: NaN, samples, callsPerSample, firstCallSeconds: 9, warmupCalls: 20,
});

const record = (t: TimingSummary): OursRecord => ({
  estimator: 'least-absolute', n: 1000, p: 2, available: true, note: 'ok', timing: t, floor: t, timingRuns: [t], floorRuns: [t],
  coefficients: [110574, 1120], objective: 1, reportedObjective: 1, status: 'ok', iterations: 3, converged: true, reason: 'exact', scale: null,
  warmRefitError: null,
});

const second = (samples: number[], coefficients = [110574, 1120]): OursRun => ({
  estimator: 'least-absolute', n: 1000, p: 2, available: true, timing: run(samples, 2), floor: run(samples.map((s) => s / 10)),
  result: { status: 'ok', coefficients, objective: 1, scale: null, iterations: 3, converged: true, reason: 'exact', basisLength: 2 },
});

describe('bracketed timing (bench/harness/bracket.ts)', () => {
  it('pools the samples of both runs: the median is over all of them, by hand', () => {
    // Samples 1, 2, 9 then 3, 4, 5: sorted 1 2 3 4 5 9, median (3 + 4)/2 = 3.5.
    const pooled = poolTimings([run([1, 2, 9]), run([3, 4, 5])]);
    expect(pooled?.medianSeconds).toBe(3.5);
    expect(pooled?.minSeconds).toBe(1);
    expect(pooled?.maxSeconds).toBe(9);
    expect(pooled?.samples).toEqual([1, 2, 9, 3, 4, 5]);
  });

  it('keeps both runs and pools timing and floor when the second run agrees', () => {
    const rec = withSecondRun(record(run([1, 2, 9])), second([3, 4, 5]));
    expect(rec.timingRuns).toHaveLength(2);
    expect(rec.timing?.medianSeconds).toBe(3.5);
    expect(rec.floorRuns).toHaveLength(2);
    // Floors 1, 2, 9 and 0.3, 0.4, 0.5: sorted 0.3 0.4 0.5 1 2 9, median (0.5 + 1)/2.
    expect(rec.floor?.medianSeconds).toBe(0.75);
  });

  it('leaves the first run alone, with a note, when the second run failed or answered differently', () => {
    const first = record(run([1, 2, 9]));
    const failed = withSecondRun(first, { ...second([3, 4, 5]), error: 'timed out after 900 s' });
    expect(failed.timing).toBe(first.timing);
    expect(failed.note).toContain('second timing run not pooled (timed out after 900 s)');
    const other = withSecondRun(first, second([3, 4, 5], [110574, 1121]));
    expect(other.timingRuns).toHaveLength(1);
    expect(other.note).toContain('different coefficients');
  });
});
