// Finds our estimators in src/fit as they land. The module is imported by a computed specifier so
// the harness type-checks and runs before src/fit/index.ts exists; whatever is exported is
// checked to be a function and given the published signature, and anything else is reported as
// "not available" instead of crashing the run.
import { existsSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { Estimator, FitOptions, FitResult, LinearProblem } from '../../src/fit/types.ts';

export type EstimatorFn = (problem: LinearProblem, options?: FitOptions) => FitResult;

/** CLI estimator names → the function names src/fit/index.ts exports (see the task split). */
export const ESTIMATOR_EXPORTS: Record<Estimator, string> = {
  'least-squares': 'fitLeastSquares',
  'least-absolute': 'fitLeastAbsolute',
  minimax: 'fitMinimax',
  huber: 'fitHuber',
  tukey: 'fitTukey',
};

export interface LoadedEstimators {
  found: Partial<Record<Estimator, EstimatorFn>>;
  /** Why each missing estimator is missing, in words. */
  missing: Partial<Record<Estimator, string>>;
}

const DEFAULT_FIT_INDEX = new URL('../../src/fit/index.ts', import.meta.url);

/** ARCFIELD_BENCH_FIT_MODULE=/abs/path.ts benches another build of the estimators (e.g. a branch). */
export async function loadEstimators(): Promise<LoadedEstimators> {
  const override = process.env.ARCFIELD_BENCH_FIT_MODULE;
  const FIT_INDEX = override ? pathToFileURL(override) : DEFAULT_FIT_INDEX;
  const found: Partial<Record<Estimator, EstimatorFn>> = {};
  const missing: Partial<Record<Estimator, string>> = {};
  const names = Object.keys(ESTIMATOR_EXPORTS) as Estimator[];
  if (!existsSync(fileURLToPath(FIT_INDEX))) {
    for (const e of names) missing[e] = 'not available (src/fit/index.ts does not exist yet)';
    return { found, missing };
  }
  let mod: Record<string, unknown>;
  try {
    mod = (await import(FIT_INDEX.href)) as Record<string, unknown>;
  } catch (e) {
    const why = `not available (src/fit/index.ts failed to load: ${(e as Error).message.split('\n')[0]})`;
    for (const est of names) missing[est] = why;
    return { found, missing };
  }
  for (const e of names) {
    const fn = mod[ESTIMATOR_EXPORTS[e]];
    if (typeof fn === 'function') found[e] = fn as EstimatorFn;
    else missing[e] = `not available (src/fit/index.ts exports no ${ESTIMATOR_EXPORTS[e]})`;
  }
  return { found, missing };
}
