// The global χ² test: tail probabilities against scipy.stats.chi2 and R pchisq
// (test/fixtures/fit/chi-square.json, made by scripts/gen-fit-fixtures.sh), special values exact.
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { chiSquareLowerTail, chiSquareTest, chiSquareUpperTail, logGamma, regularizedGamma } from '../../src/fit/chi-square-test.ts';
import { within } from '../helpers/within.ts';
import { FIXTURE_SOURCE, readJson, type ChiSquareFile } from './fixtures.ts';

const ref = readJson<ChiSquareFile>('chi-square.json');
const SCIPY = `scipy.stats.chi2 (${FIXTURE_SOURCE})`;

describe('χ² tails against scipy', () => {
  // 1e-11 relative: the Stirling form keeps the prefactor to ~1e-13 even at dof = 10⁴ and in the
  // 1e-30 tail; scipy (Cephes igam) is itself good to ~1e-14 there.
  for (const pt of ref.points) {
    it(`dof ${pt.dof}, χ² = ${pt.statistic.toPrecision(6)}`, () => {
      for (const [name, got, want] of [['upper', chiSquareUpperTail(pt.statistic, pt.dof), pt.upper], ['lower', chiSquareLowerTail(pt.statistic, pt.dof), pt.lower]] as const) {
        if (want === 0) expect(got).toBeLessThan(1e-300);
        else within(got, want, 1e-11, '', `${name} tail`, { relative: true, source: SCIPY });
      }
    });
  }
  it('R pchisq agrees with scipy on the same points (the two references, to 1e-11)', () => {
    ref.rUpper.forEach((u, i) => {
      const s = ref.points[i].upper;
      if (s > 1e-300) within(u, s, 1e-11, '', `R vs scipy at point ${i}`, { relative: true, source: 'R pchisq' });
    });
  });
});

describe('chiSquareTest', () => {
  it('a variance factor of 1 passes; dof 10, χ² = 25.188 is the 0.005 upper point (scipy chi2.isf(0.005, 10) = 25.1881818…)', () => {
    const t = chiSquareTest(10, 10);
    expect(t.varianceFactor).toBe(1);
    expect(t.passes).toBe(true);
    const far = chiSquareTest(25.188179571971173, 10, 0.01, 'upper');
    within(far.pValue, 0.005, 1e-9, '', 'upper p', { relative: true, source: 'scipy 1.10 chi2.isf(0.005, 10), one call at the prompt' });
    expect(far.passes).toBe(false);
    const two = chiSquareTest(25.188179571971173, 10, 0.01);
    within(two.pValue, 0.01, 1e-9, '', 'two-sided p', { relative: true, source: 'twice the upper tail' });
  });
  it('a statistic far below dof fails the two-sided test (sigmas too pessimistic) but passes the upper test', () => {
    expect(chiSquareTest(0.5, 30).passes).toBe(false);
    expect(chiSquareTest(0.5, 30, 0.05, 'upper').passes).toBe(true);
  });
  it('special values: Γ(1) = Γ(2) = 1, Γ(½) = √π, P(a, 0) = 0, Q(a, ∞) = 0', () => {
    within(logGamma(1), 0, 1e-14, '', 'ln Γ(1)', { source: 'Γ(1) = 1' });
    within(logGamma(2), 0, 1e-14, '', 'ln Γ(2)', { source: 'Γ(2) = 1' });
    within(logGamma(0.5), 0.5 * Math.log(Math.PI), 1e-14, '', 'ln Γ(½)', { source: 'Γ(½) = √π' });
    within(logGamma(101), 363.73937555556347, 1e-13, '', 'ln 100!', { relative: true, source: 'Python 3.11 math.lgamma(101), one call at the prompt' });
    expect(regularizedGamma(3, 0)).toEqual([0, 1]);
    expect(regularizedGamma(3, Infinity)).toEqual([1, 0]);
  });
  it('refuses dof < 1, negative objectives and α outside (0, 1), naming the field', () => {
    expect(() => chiSquareTest(3, 0)).toThrow(InputError);
    expect(() => chiSquareTest(-1, 3)).toThrow(/objective/);
    expect(() => chiSquareTest(3, 3, 1)).toThrow(/alpha/);
    expect(() => chiSquareTest(NaN, 3)).toThrow(/objective/);
  });
});
