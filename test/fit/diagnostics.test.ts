// Diagnostics: leverage and the w-test against R (hatvalues, rstandard of lm on the whitened
// problem, test/fixtures/fit/least-squares.json from scripts/gen-fit-fixtures.sh); redundancy,
// w-test and MDB on small cases worked by hand in the comments; standardized residuals and flags.
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { leastSquaresDiagnostics, MDB_NONCENTRALITY, standardizedResiduals, suspectFlags, W_TEST_CRITICAL_VALUE } from '../../src/fit/diagnostics.ts';
import { fitLeastSquares } from '../../src/fit/least-squares.ts';
import { createProblem } from '../../src/fit/problem.ts';
import { MAD_CONSISTENCY } from '../../src/fit/robust-scale.ts';
import type { FitResult, LinearProblem } from '../../src/fit/types.ts';
import { within } from '../helpers/within.ts';
import { FIXTURE_SOURCE, loadProblem, readJson, type FixtureFile, type LeastSquaresCase } from './fixtures.ts';

const fixture = readJson<FixtureFile<LeastSquaresCase>>('least-squares.json');
const R_LM = `R ${fixture.tools.R} lm hatvalues / rstandard (${FIXTURE_SOURCE})`;

describe('constants', () => {
  it('3.29 and 4.13 are Baarda\'s α₀ = 0.001, β₀ = 0.80 values (check-values.md, from memory)', () => {
    expect(W_TEST_CRITICAL_VALUE).toBe(3.29);
    expect(MDB_NONCENTRALITY).toBe(4.13);
  });
});

describe('leastSquaresDiagnostics against R', () => {
  for (const c of fixture.cases.filter((k) => k.r?.hatvalues)) {
    it(c.dataset, () => {
      const problem = loadProblem(c.dataset);
      const fit = fitLeastSquares(problem);
      // Relative weights only (sigma0 = σ̂₀): then wᵢ is R's internally studentized residual.
      const d = leastSquaresDiagnostics(problem, fit, { sigma0: fit.scale });
      let sumR = 0;
      for (let i = 0; i < problem.n; i++) {
        within(d.leverage[i], c.r!.hatvalues![i], 1e-10, '', `h[${i}]`, { relative: true, source: R_LM });
        // w is in units of its own σ (O(1)): an absolute 1e-9 there; a tiny w is a residual that
        // cancelled to a few digits in both programs.
        within(d.wTest[i], c.r!.rstandard![i], 1e-9, 'σ', `w[${i}] with σ̂₀`, { source: R_LM });
        sumR += d.redundancy[i];
      }
      within(sumR, problem.n - problem.p, 1e-10, '', 'Σrᵢ', { source: 'Σrᵢ = n − p (trace of the residual projector)' });
      if (problem.weights) {
        // With weights 1/σ² the default is the a priori σ₀ = 1: w = rstandard·σ̂₀.
        const a = leastSquaresDiagnostics(problem, fit);
        expect(a.sigma0Source).toBe('a-priori');
        within(a.wTest[0], c.r!.rstandard![0] * c.r!.sigma!, 1e-9, 'σ', 'w[0] a priori', { source: R_LM });
      }
      const outliers = new Set(readJson<{ datasets: { id: string; outlierRows: number[] }[] }>('datasets.json').datasets.find((x) => x.id === c.dataset)!.outlierRows);
      // Every w-test flag in these invented sets is one of the planted outliers (60–200 m/deg).
      d.wTestSuspect.forEach((s, i) => { if (s) expect(outliers.has(i)).toBe(true); });
    });
  }
});

describe('leastSquaresDiagnostics by hand', () => {
  it('mean of three readings, σ = 0.5 (w = 4): h = 1/3, r = 2/3, w = 2e/√(2/3), MDB = 4.13·0.5/√(2/3)', () => {
    // y = 10, 11, 13: ȳ = 34/3, e = (−4/3, −1/3, 5/3); w-test = e·2/√(2/3) = (−3.266, −0.8165, 4.0825).
    const problem = createProblem([[1], [1], [1]], [10, 11, 13], [4, 4, 4]);
    const d = leastSquaresDiagnostics(problem, fitLeastSquares(problem));
    const src = { source: 'worked by hand in the test comment' };
    for (let i = 0; i < 3; i++) {
      within(d.leverage[i], 1 / 3, 1e-15, '', `h[${i}]`, src);
      within(d.redundancy[i], 2 / 3, 1e-15, '', `r[${i}]`, src);
      within(d.minimalDetectableBias[i], (4.13 * 0.5) / Math.sqrt(2 / 3), 1e-14, 'm', `MDB[${i}]`, src);
    }
    [-4 / 3, -1 / 3, 5 / 3].forEach((e, i) => within(d.wTest[i], (2 * e) / Math.sqrt(2 / 3), 1e-13, '', `w[${i}]`, src));
    expect(d.wTestSuspect).toEqual([false, false, true]);
  });

  it('a line through x = 0, 1, 2: h = 1/3 + (x − 1)²/2 = (5/6, 1/3, 5/6), Σr = 1 = n − p', () => {
    const problem = createProblem([[1, 0], [1, 1], [1, 2]], [1, 3, 2], [1, 1, 1]);
    const d = leastSquaresDiagnostics(problem, fitLeastSquares(problem));
    [5 / 6, 1 / 3, 5 / 6].forEach((h, i) => within(d.leverage[i], h, 1e-14, '', `h[${i}]`, { source: 'h = 1/n + (x − x̄)²/Sxx, by hand' }));
    within(d.redundancy.reduce((a, b) => a + b, 0), 1, 1e-14, '', 'Σr', { source: 'n − p' });
  });

  it('a lone reading fixing the slope has r = 0: not controlled, w NaN, MDB ∞', () => {
    // x = 0, 0, 0, 5: h₄ = 1/4 + 3.75²/18.75 = 1 exactly (by hand).
    const problem = createProblem([[1, 0], [1, 0], [1, 0], [1, 5]], [1, 2, 3, 9], [1, 1, 1, 1]);
    const d = leastSquaresDiagnostics(problem, fitLeastSquares(problem));
    expect(d.controlled[3]).toBe(0);
    expect(Number.isNaN(d.wTest[3])).toBe(true);
    expect(d.minimalDetectableBias[3]).toBe(Infinity);
    expect(d.wTestSuspect[3]).toBe(false);
    expect(d.controlled[0]).toBe(1);
  });

  it('refuses non-least-squares fits and failed fits, naming the field', () => {
    const problem = createProblem([[1], [1]], [1, 2]);
    const fit = fitLeastSquares(problem);
    expect(() => leastSquaresDiagnostics(problem, { ...fit, estimator: 'huber' })).toThrow(/fit.estimator/);
    expect(() => leastSquaresDiagnostics(problem, { ...fit, status: 'rank-deficient' })).toThrow(InputError);
  });
});

function fakeFit(estimator: FitResult['estimator'], residuals: number[], scale = NaN): FitResult {
  return { estimator, status: 'ok', coefficients: new Float64Array(1), residuals: Float64Array.from(residuals), objective: 0, scale, iterations: 0, converged: true, reason: '' };
}
const unit = (n: number): LinearProblem => createProblem(Array.from({ length: n }, () => [1]), Array.from({ length: n }, () => 1));

describe('standardizedResiduals and suspectFlags', () => {
  it('least squares divides by σ₀ (R: rstandard·√(1 − h) = e/σ̂)', () => {
    const c = fixture.cases.find((k) => k.dataset === 'degree-outliers-n40')!;
    const problem = loadProblem(c.dataset);
    const z = standardizedResiduals(fitLeastSquares(problem), problem);
    c.r!.rstandard!.forEach((t, i) => within(z[i], t * Math.sqrt(1 - c.r!.hatvalues![i]), 1e-9, 'σ', `z[${i}]`, { source: R_LM }));
  });
  it('robust estimators divide by the MAD of the whitened residuals (by hand: MAD of [−2,−1,0,1,2,40] = 1.5)', () => {
    // median 0.5; |e − 0.5| = [2.5, 1.5, 0.5, 0.5, 1.5, 39.5] → median 1.5.
    const z = standardizedResiduals(fakeFit('huber', [-2, -1, 0, 1, 2, 40], 99), unit(6));
    within(z[5], 40 / (1.5 * MAD_CONSISTENCY), 1e-15, '', 'z[5]', { relative: true, source: 'by hand' });
    expect(suspectFlags(z)).toEqual([false, false, false, false, false, true]);
  });
  it('weights whiten first: √w·e', () => {
    const problem = createProblem([[1], [1], [1]], [1, 1, 1], [4, 1, 1]);
    const z = standardizedResiduals(fakeFit('least-squares', [1, 1, -1], 2), problem);
    expect(Array.from(z)).toEqual([1, 0.5, -0.5]);
  });
  it('zero scale: exact rows 0, the rest ±∞; undefined σ₀ (n = p): nothing to test', () => {
    const z = standardizedResiduals(fakeFit('least-absolute', [0, 0, 0, 0, -5]), unit(5));
    expect(Array.from(z)).toEqual([0, 0, 0, 0, -Infinity]);
    expect(suspectFlags(z)).toEqual([false, false, false, false, true]);
    expect(Array.from(standardizedResiduals(fakeFit('least-squares', [1e-12, -1e-12], NaN), unit(2)))).toEqual([0, 0]);
  });
  it('threshold is a parameter (default 3, common practice) and must be positive', () => {
    expect(suspectFlags([2.5, -3.5, 3])).toEqual([false, true, false]);
    expect(suspectFlags([2.5, -3.5], 2)).toEqual([true, true]);
    expect(() => suspectFlags([1], 0)).toThrow(/threshold/);
  });
});
