// The orchestrator's check of what bench/run-ours.ts printed: the JSON crosses a process
// boundary, so it is narrowed here instead of trusted.
import { ESTIMATORS } from '../../src/fit/types.ts';
import { InputError } from '../../src/errors.ts';
import type { OursRun } from '../run-ours.ts';

export function assertOursRun(value: unknown): OursRun {
  const v = value as Partial<OursRun> | null;
  if (v === null || typeof v !== 'object') throw new InputError('run-ours output', value, 'expected a JSON object');
  if (typeof v.estimator !== 'string' || !(ESTIMATORS as readonly string[]).includes(v.estimator)) throw new InputError('run-ours output.estimator', v.estimator, 'unknown estimator');
  if (typeof v.n !== 'number' || typeof v.p !== 'number' || typeof v.available !== 'boolean') throw new InputError('run-ours output', JSON.stringify(value).slice(0, 80), 'n, p and available are required');
  if (v.available && !v.error && (!v.result || !Array.isArray(v.result.coefficients) || !v.timing)) {
    throw new InputError('run-ours output.result', v.result, 'an available estimator must report a result and its timing');
  }
  return v as OursRun;
}
