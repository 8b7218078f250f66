// Least squares against numpy.linalg.lstsq and R lm (test/fixtures/fit/least-squares.json, made by
// scripts/gen-fit-fixtures.sh), both routes (Householder QR and streaming normal equations), and
// the degenerate statuses.
import { describe, expect, it } from 'vitest';
import { fitLeastSquares, STREAMING_MIN_ROWS } from '../../src/fit/least-squares.ts';
import { createProblem } from '../../src/fit/problem.ts';
import type { FitResult } from '../../src/fit/types.ts';
import { within } from '../helpers/within.ts';
import { FIXTURE_SOURCE, loadProblem, readJson, type FixtureFile, type LeastSquaresCase } from './fixtures.ts';

const fixture = readJson<FixtureFile<LeastSquaresCase>>('least-squares.json');
const NUMPY = `numpy ${fixture.tools.numpy} lstsq (${FIXTURE_SOURCE})`;
const R_LM = `R ${fixture.tools.R} lm (${FIXTURE_SOURCE})`;

/**
 * Coefficients agree to 1e-10 relative to max(|βⱼ|, its standard error): a coefficient near zero
 * (the x² term) is only determined to rounding of the data relative to the others, so numpy and R
 * themselves differ there by ~1e-11 of its standard error.
 */
function expectCoefficients(fit: FitResult, expected: readonly (number | null)[], source: string, tol = 1e-10): void {
  expected.forEach((b, j) => {
    if (b === null) throw new Error('reference coefficient missing');
    const se = fit.covariance ? Math.sqrt(fit.covariance[j * fit.coefficients.length + j]) : 0;
    const size = Math.max(Math.abs(b), se);
    within(fit.coefficients[j] / size, b / size, tol, '(relative)', `β${j}`, { source });
  });
}

describe('fitLeastSquares against numpy and R', () => {
  const regular = fixture.cases.filter((c) => c.numpy.coefficients && c.numpy.sigma0 !== undefined);
  for (const method of ['qr', 'normal'] as const) {
    for (const c of regular) {
      it(`${c.dataset} (${method})`, () => {
        const fit = fitLeastSquares(loadProblem(c.dataset), { method });
        expect(fit.status).toBe('ok');
        expect(fit.converged).toBe(true);
        expectCoefficients(fit, c.numpy.coefficients!, NUMPY);
        expectCoefficients(fit, c.r!.coefficients, R_LM);
        within(fit.objective, c.numpy.objective!, 1e-10, '(whitened)²', 'objective Σwr²', { relative: true, source: NUMPY });
        within(fit.scale, c.r!.sigma!, 1e-10, '(whitened)', 'σ₀', { relative: true, source: R_LM });
        const p = c.p;
        for (let k = 0; k < p * p; k++) {
          within(fit.covariance![k], c.r!.covariance![k], 1e-9, '(coefficient units)²', `covariance[${Math.floor(k / p)},${k % p}]`, { relative: true, source: R_LM });
        }
      });
    }
  }

  it('the exact fit n = p: coefficients, no σ₀, no covariance', () => {
    const c = fixture.cases.find((k) => k.dataset === 'edge-exact-n2')!;
    const fit = fitLeastSquares(loadProblem(c.dataset));
    expect(fit.status).toBe('ok');
    expectCoefficients(fit, c.numpy.coefficients!, NUMPY, 1e-12);
    expect(Number.isNaN(fit.scale)).toBe(true);
    expect(fit.covariance).toBeUndefined();
    expect(fit.reason).toMatch(/n = p/);
  });
});

describe('fitLeastSquares degenerate input is a status', () => {
  it('every reading at one latitude is rank deficient (numpy and R find rank 1)', () => {
    const c = fixture.cases.find((k) => k.dataset === 'edge-one-latitude-n6')!;
    expect(c.numpy.rank).toBe(1);
    expect(c.r!.rank).toBe(1);
    for (const method of ['qr', 'normal'] as const) {
      const fit = fitLeastSquares(loadProblem(c.dataset), { method });
      expect(fit.status).toBe('rank-deficient');
      expect(fit.reason).toMatch(/combination of the others/);
      expect(Array.from(fit.coefficients).every(Number.isNaN)).toBe(true);
    }
  });

  it('n < p is too-few-rows', () => {
    const fit = fitLeastSquares(loadProblem('edge-too-few-n1'));
    expect(fit.status).toBe('too-few-rows');
    expect(fit.reason).toBe('1 rows for 2 parameters');
  });

  it('a column that is another times 3 is rank deficient, not a number (brute force: col 2 = 3·col 1)', () => {
    const rows = [0.1, 0.2, 0.35, 0.5, 0.8].map((x) => [1, x, 3 * x]);
    const fit = fitLeastSquares(createProblem(rows, [1, 2, 3, 4, 5]));
    expect(fit.status).toBe('rank-deficient');
  });

  it('a nearly constant column (spread 1e-9 of its size) still fits: it is not rank deficient at ε', () => {
    // Exact data y = 2 + 5x: any full-rank solver must return (2, 5) to about cond·ε.
    const xs = [0.4, 0.4 + 1e-9, 0.4 + 2e-9, 0.4 + 3e-9];
    const fit = fitLeastSquares(createProblem(xs.map((x) => [1, x]), xs.map((x) => 2 + 5 * x)));
    expect(fit.status).toBe('ok');
    within(fit.coefficients[1], 5, 1e-5, '', 'slope (exact data, cond ≈ 1e9)');
  });
});

describe('fitLeastSquares routes agree at large n', () => {
  it(`streaming (n ≥ ${STREAMING_MIN_ROWS}) equals blocked QR to 1e-12 relative`, () => {
    // Invented degree-length data, deterministic: x = sin²φ on a grid, noise from a sine hash.
    const n = 30_000;
    const rows: number[][] = [];
    const y: number[] = [];
    for (let i = 0; i < n; i++) {
      const x = Math.sin((i / n) * 1.4) ** 2;
      rows.push([1, x, x * x]);
      y.push(110574 + 1120 * x + 9.3 * x * x + 5 * Math.sin(i * 12.9898));
    }
    const problem = createProblem(rows, y);
    const auto = fitLeastSquares(problem);
    const qr = fitLeastSquares(problem, { method: 'qr' });
    expect(auto.reason).toMatch(/normal equations/);
    expect(qr.reason).toMatch(/blocks/);
    for (let j = 0; j < 3; j++) {
      const size = Math.max(Math.abs(qr.coefficients[j]), Math.sqrt(qr.covariance![j * 4]));
      within(auto.coefficients[j] / size, qr.coefficients[j] / size, 1e-12, '(relative)', `β${j}`, { source: 'blocked Householder QR of the same data' });
    }
    within(auto.objective, qr.objective, 1e-12, '', 'objective', { relative: true, source: 'blocked Householder QR' });
  });
});
