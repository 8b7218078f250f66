// The dispatcher: every estimator through one entry point, malformed input refused with the
// field named, degenerate input a status (never a throw, never a number). Reference values for
// each estimator are checked in its own test file; here the dispatcher must hand them through.
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { fitLinear } from '../../src/fit/fit-linear.ts';
import { ESTIMATORS, type Estimator } from '../../src/fit/types.ts';
import { within } from '../helpers/within.ts';
import { FIXTURE_SOURCE, loadProblem, readJson } from './fixtures.ts';

interface Objectives { cases: { dataset: string; highs?: { objective: number }; numpy?: { objective?: number }; statsmodels?: { objective: number } }[] }
const REFERENCE: Record<Estimator, (c: Objectives['cases'][number]) => number | undefined> = {
  'least-squares': (c) => c.numpy?.objective,
  'least-absolute': (c) => c.highs?.objective,
  minimax: (c) => c.highs?.objective,
  huber: (c) => c.statsmodels?.objective,
  tukey: (c) => c.statsmodels?.objective,
};

describe('fitLinear', () => {
  for (const estimator of ESTIMATORS) {
    it(`${estimator}: the objective of the reference fit on degree-outliers-n40`, () => {
      const file = readJson<Objectives>(`${estimator}.json`);
      const ref = REFERENCE[estimator](file.cases.find((c) => c.dataset === 'degree-outliers-n40')!);
      const fit = fitLinear(loadProblem('degree-outliers-n40'), estimator);
      expect(fit.estimator).toBe(estimator);
      expect(fit.status).toBe('ok');
      within(fit.objective, ref!, 1e-8, '', `${estimator} objective`, { relative: true, source: `${estimator}.json (${FIXTURE_SOURCE})` });
    });
    it(`${estimator}: n < p is 'too-few-rows' and one latitude is 'rank-deficient'`, () => {
      expect(fitLinear(loadProblem('edge-too-few-n1'), estimator).status).toBe('too-few-rows');
      const one = fitLinear(loadProblem('edge-one-latitude-n6'), estimator);
      expect(one.status).toBe('rank-deficient');
      expect(one.reason.length).toBeGreaterThan(0);
    });
  }

  it('refuses an unknown estimator and a non-finite reading, naming them', () => {
    const problem = loadProblem('degree-clean-n12');
    expect(() => fitLinear(problem, 'median-polish' as Estimator)).toThrow(InputError);
    const bad = { ...problem, y: Float64Array.from(problem.y) };
    bad.y[4] = NaN;
    for (const estimator of ESTIMATORS) {
      expect(() => fitLinear(bad, estimator)).toThrow(/y\[4\]/);
    }
  });
});
