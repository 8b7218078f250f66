// Exact least absolute deviations: fixed cases, degenerate input, and the screened route on large
// n. Outside references: brute force over every p-row interpolant (an L1 optimum is an LP vertex,
// Barrodale & Roberts 1973); R quantreg rq(method = "br") and scipy linprog (HiGHS) optima saved by
// scripts/gen-fit-fixtures.sh in test/fixtures/fit/least-absolute.json; and, where brute force is
// out of reach, the optimality (KKT) condition of the LP checked by code written here: the fit
// interpolates p rows and Σ_{i∉B} sign(rᵢ)·√wᵢxᵢ = −A_Bᵀu has a solution with |u| ≤ 1.
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { fitLeastAbsolute } from '../../src/fit/least-absolute.ts';
import { within } from '../helpers/within.ts';
import { loadProblem, readJson } from './fixtures.ts';
import { bruteForceL1, degreeRows, kktDual, objectiveAt, seeded } from './least-absolute-reference.ts';

describe('fitLeastAbsolute against brute force (an optimum interpolates p rows)', () => {
  for (const seed of [1, 2, 3, 4, 5, 6, 7, 8]) {
    it(`p = 2, n = 40, seed ${seed}: objective equals the best of all pairs to 1e-12`, () => {
      const pr = degreeRows(40, 2, seed, seed % 2 === 0);
      const fit = fitLeastAbsolute(pr);
      expect(fit.status).toBe('ok');
      expect(fit.converged).toBe(true);
      within(fit.objective, bruteForceL1(pr), 1e-12, 'm', 'L1 objective', { relative: true, source: 'brute force over all 780 pairs' });
    });
  }
  for (const seed of [11, 12, 13]) {
    it(`p = 3, n = 16, seed ${seed}: objective equals the best of all triples to 1e-12`, () => {
      const pr = degreeRows(16, 3, seed, seed === 12);
      const fit = fitLeastAbsolute(pr);
      expect(fit.converged).toBe(true);
      within(fit.objective, bruteForceL1(pr), 1e-12, 'm', 'L1 objective', { relative: true, source: 'brute force over all 560 triples' });
    });
  }
});

interface L1Case {
  dataset: string;
  highs: { objective: number; coefficients: number[]; interpolatedRows: number[] } | null;
  quantreg: { objective: number; coefficients: number[] } | null;
}

describe('fitLeastAbsolute against R quantreg "br" and scipy HiGHS (test/fixtures/fit/least-absolute.json, scripts/gen-fit-fixtures.sh)', () => {
  const file = readJson<{ cases: L1Case[] }>('least-absolute.json');
  for (const c of file.cases) {
    it(`${c.dataset}: objective to 1e-9 relative; the basis rows are interpolated`, () => {
      const pr = loadProblem(c.dataset);
      const fit = fitLeastAbsolute(pr);
      if (!c.highs) {
        expect(fit.status).not.toBe('ok');
        return;
      }
      expect(fit.status).toBe('ok');
      within(fit.objective, c.highs.objective, 1e-9, 'm', 'L1 objective', { relative: true, source: 'scipy linprog highs-ds' });
      if (c.quantreg) within(fit.objective, c.quantreg.objective, 1e-9, 'm', 'L1 objective', { relative: true, source: 'R quantreg rq br' });
      const basis = Array.from(fit.basis ?? []);
      expect(basis).toHaveLength(pr.p);
      for (const i of basis) {
        const scale = Math.abs(pr.y[i]);
        within(fit.residuals[i], 0, 1e-12 * scale, 'm', `residual of basis row ${i}`);
      }
      expect(kktDual(pr, fit.coefficients, basis)).toBeLessThanOrEqual(1 + 1e-9);
    });
  }
});

describe('fitLeastAbsolute degenerate input is a status or a typed error', () => {
  it('n < p: too-few-rows, NaN coefficients', () => {
    const fit = fitLeastAbsolute({ n: 1, p: 2, X: Float64Array.from([1, 0.3]), y: Float64Array.from([5]) });
    expect(fit.status).toBe('too-few-rows');
    expect(fit.converged).toBe(false);
    expect(Number.isNaN(fit.coefficients[0])).toBe(true);
  });
  it('every row at one latitude: rank-deficient', () => {
    const X = Float64Array.from([1, 0.3, 1, 0.3, 1, 0.3, 1, 0.3, 1, 0.3]);
    const fit = fitLeastAbsolute({ n: 5, p: 2, X, y: Float64Array.from([1, 2, 3, 4, 9]) });
    expect(fit.status).toBe('rank-deficient');
  });
  it('one latitude at large n (screened route): rank-deficient', () => {
    const n = 20_000;
    const X = new Float64Array(2 * n);
    const y = new Float64Array(n);
    const u = seeded(3);
    for (let i = 0; i < n; i++) {
      X[2 * i] = 1;
      X[2 * i + 1] = 0.25;
      y[i] = 110600 + 5 * u();
    }
    expect(fitLeastAbsolute({ n, p: 2, X, y }).status).toBe('rank-deficient');
  });
  it('all but one row at one latitude is full rank: the line passes through the odd row', () => {
    // Common practice check: with one row off the common abscissa the slope is determined by it.
    const n = 9;
    const X = new Float64Array(2 * n);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      X[2 * i] = 1;
      X[2 * i + 1] = i === 4 ? 0.8 : 0.2;
      y[i] = i === 4 ? 10 : [1, 2, 3, 4, 0, 5, 6, 7, 8][i];
    }
    const pr = { n, p: 2, X, y };
    const fit = fitLeastAbsolute(pr);
    expect(fit.status).toBe('ok');
    within(fit.objective, bruteForceL1(pr), 1e-12, '', 'objective', { relative: true, source: 'brute force over all pairs' });
    expect(Array.from(fit.basis ?? [])).toContain(4);
  });
  it('n = p: the interpolating line, objective 0', () => {
    const fit = fitLeastAbsolute({ n: 2, p: 2, X: Float64Array.from([1, 0.1, 1, 0.6]), y: Float64Array.from([110580, 111140]) });
    expect(fit.status).toBe('ok');
    within(fit.objective, 0, 1e-9, 'm', 'objective');
    within(fit.coefficients[1], (111140 - 110580) / 0.5, 1e-9, 'm/deg', 'slope', { relative: true, source: 'two-point line, by hand' });
  });
  it('an exact fit: objective 0 to rounding, coefficients recovered', () => {
    const n = 30;
    const X = new Float64Array(2 * n);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      X[2 * i] = 1;
      X[2 * i + 1] = i / 40;
      y[i] = 110574 + 1120 * (i / 40);
    }
    const fit = fitLeastAbsolute({ n, p: 2, X, y });
    expect(fit.status).toBe('ok');
    expect(fit.objective).toBeLessThan(n * 1e-10);
    within(fit.coefficients[0], 110574, 1e-10, 'm', 'c', { relative: true, source: 'the generating line' });
    within(fit.coefficients[1], 1120, 1e-9, 'm', 'm', { relative: true, source: 'the generating line' });
  });
  it('identical rows (every row twice): same optimum as brute force', () => {
    const base = degreeRows(12, 2, 21);
    const X = new Float64Array(48);
    const y = new Float64Array(24);
    for (let i = 0; i < 12; i++) {
      for (let c = 0; c < 2; c++) {
        X[4 * i + 2 * c] = base.X[2 * i];
        X[4 * i + 2 * c + 1] = base.X[2 * i + 1];
        y[2 * i + c] = base.y[i];
      }
    }
    const pr = { n: 24, p: 2, X, y };
    const fit = fitLeastAbsolute(pr);
    expect(fit.converged).toBe(true);
    within(fit.objective, bruteForceL1(pr), 1e-12, 'm', 'objective', { relative: true, source: 'brute force over all pairs' });
    within(fit.objective, 2 * bruteForceL1(base), 1e-12, 'm', 'objective of the doubled set', { relative: true, source: 'brute force on the single set, doubled' });
  });
  it('huge outliers do not move the fit off the bulk', () => {
    const pr = degreeRows(200, 2, 31);
    pr.y[7] += 1e9;
    pr.y[8] -= 1e12;
    const fit = fitLeastAbsolute(pr);
    expect(fit.converged).toBe(true);
    within(fit.coefficients[1], 1120, 30, 'm', 'slope near the generating 1120 (noise sd 5, 200 rows)', { source: 'generating model' });
  });
  it('a non-finite value throws InputError naming the element', () => {
    const pr = degreeRows(50, 2, 41);
    pr.y[13] = Number.NaN;
    expect(() => fitLeastAbsolute(pr)).toThrowError(InputError);
    try {
      fitLeastAbsolute(pr);
    } catch (e) {
      expect((e as InputError).field).toBe('y[13]');
    }
    const big = degreeRows(30_000, 2, 42);
    big.X[2 * 777 + 1] = Number.POSITIVE_INFINITY;
    try {
      fitLeastAbsolute(big);
      expect.fail('no error');
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      expect((e as InputError).field).toBe('X[777, 1]');
    }
  });
  it('a weight ≤ 0 throws InputError naming it', () => {
    const pr = degreeRows(40, 2, 43, true);
    pr.weights![5] = 0;
    try {
      fitLeastAbsolute(pr);
      expect.fail('no error');
    } catch (e) {
      expect((e as InputError).field).toBe('weights[5]');
    }
  });
  it('wrong shapes throw InputError', () => {
    expect(() => fitLeastAbsolute({ n: 3, p: 2, X: new Float64Array(5), y: new Float64Array(3) })).toThrowError(InputError);
  });
});

describe('fitLeastAbsolute on large n (the screened route), proven by the LP optimality condition', () => {
  for (const [n, p, weighted] of [[20_000, 2, false], [50_000, 3, false], [30_000, 2, true], [60_000, 3, true]] as const) {
    it(`n = ${n}, p = ${p}${weighted ? ', weighted' : ''}: basis interpolated, dual condition ≤ 1 (computed here)`, () => {
      const pr = degreeRows(n, p, 1000 + n + p, weighted);
      const fit = fitLeastAbsolute(pr);
      expect(fit.status).toBe('ok');
      expect(fit.reason).toMatch(/^exact/);
      const basis = Array.from(fit.basis ?? []);
      expect(new Set(basis).size).toBe(p);
      for (const i of basis) within(fit.residuals[i], 0, 1e-9, 'm', `residual of basis row ${i}`);
      expect(kktDual(pr, fit.coefficients, basis)).toBeLessThanOrEqual(1 + 1e-9);
      within(fit.objective, objectiveAt(pr, fit.coefficients), 1e-12, 'm', 'reported objective vs recomputed', { relative: true, source: 'Σ√w|r| computed here' });
    });
  }
  it('n = 10⁶, p = 2 (the benchmark size): dual condition ≤ 1 (computed here)', () => {
    const pr = degreeRows(1_000_000, 2, 77);
    const fit = fitLeastAbsolute(pr);
    expect(fit.status).toBe('ok');
    expect(kktDual(pr, fit.coefficients, fit.basis ?? [])).toBeLessThanOrEqual(1 + 1e-9);
  });
});
