// The one entry point over every estimator: fitLinear(problem, estimator, options).
//
// Malformed input (sizes, non-finite values, weights ≤ 0) throws InputError from validateProblem:
// the campaign schema refuses such values first, so reaching here is a programmer error.
// Everything the data decide (n < p, every reading at one latitude, rank deficiency, no
// convergence) comes back as the result's status with a reason, never as a throw.
import { InputError } from '../errors.ts';
import { fitHuber } from './huber.ts';
import { fitLeastAbsolute } from './least-absolute.ts';
import { fitLeastSquares } from './least-squares.ts';
import { fitMinimax } from './minimax.ts';
import { validateProblem } from './problem.ts';
import { fitTukey } from './tukey.ts';
import { ESTIMATORS, type Estimator, type FitOptions, type FitResult, type LinearProblem } from './types.ts';

const FITTERS: Record<Estimator, (problem: LinearProblem, options?: FitOptions) => FitResult> = {
  'least-squares': fitLeastSquares,
  'least-absolute': fitLeastAbsolute,
  minimax: fitMinimax,
  huber: fitHuber,
  tukey: fitTukey,
};

/** Fits `problem` with the named estimator. */
export function fitLinear(problem: LinearProblem, estimator: Estimator, options: FitOptions = {}): FitResult {
  if (!(ESTIMATORS as readonly string[]).includes(estimator)) {
    throw new InputError('estimator', estimator, `must be one of ${ESTIMATORS.join(', ')}`);
  }
  validateProblem(problem);
  return FITTERS[estimator](problem, options);
}
