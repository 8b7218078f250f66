// Building and validating a LinearProblem: malformed input throws InputError naming the element
// and its value (style.md §12); whitening and the intercept detection on values checked by hand.
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { createProblem, interceptColumn, isNegligiblePivot, validateProblem, whitenProblem } from '../../src/fit/problem.ts';
import type { LinearProblem } from '../../src/fit/types.ts';

function caught(f: () => void): InputError {
  try {
    f();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error('expected an InputError');
}

describe('validateProblem', () => {
  const good = (): LinearProblem => createProblem([[1, 0.1], [1, 0.2], [1, 0.3]], [110585, 110596, 110608], [1, 4, 0.25]);
  it('accepts a well-formed problem', () => {
    expect(() => validateProblem(good())).not.toThrow();
  });
  it('names a non-finite design value by row and column', () => {
    const p = good();
    p.X[3] = NaN;
    const e = caught(() => validateProblem(p));
    expect(e.field).toBe('X[1, 1]');
    expect(Number.isNaN(e.value)).toBe(true);
  });
  it('names an infinite reading', () => {
    const p = good();
    p.y[2] = Infinity;
    const e = caught(() => validateProblem(p));
    expect([e.field, e.value]).toEqual(['y[2]', Infinity]);
  });
  it('refuses weights ≤ 0 and non-finite weights (weights are 1/σ²)', () => {
    for (const bad of [0, -1, NaN]) {
      const p = good();
      p.weights![1] = bad;
      const e = caught(() => validateProblem(p));
      expect(e.field).toBe('weights[1]');
      expect(e.reason).toMatch(/1\/σ²/);
    }
  });
  it('refuses inconsistent sizes', () => {
    expect(caught(() => validateProblem({ n: 3, p: 2, X: new Float64Array(5), y: new Float64Array(3) })).field).toBe('X');
    expect(caught(() => validateProblem({ n: 3, p: 2, X: new Float64Array(6), y: new Float64Array(2) })).field).toBe('y');
    expect(caught(() => validateProblem({ n: 0, p: 2, X: new Float64Array(0), y: new Float64Array(0) })).field).toBe('n');
    expect(caught(() => createProblem([[1, 2], [1]], [1, 2])).field).toBe('rows[1]');
  });
});

describe('whitening and structure', () => {
  it('multiplies row i by √wᵢ (w = 4 → ×2, w = 0.25 → ×0.5)', () => {
    const w = whitenProblem(createProblem([[1, 0.5], [1, 0.25]], [10, 20], [4, 0.25]));
    expect(Array.from(w.X)).toEqual([2, 1, 0.5, 0.125]);
    expect(Array.from(w.y)).toEqual([20, 10]);
    expect(w.weights).toBeUndefined();
  });
  it('finds a constant non-zero column as the intercept, wherever it is', () => {
    expect(interceptColumn(createProblem([[0.1, 1], [0.2, 1]], [1, 2]))).toBe(1);
    expect(interceptColumn(createProblem([[0.1, 0], [0.2, 0]], [1, 2]))).toBe(-1);
    expect(interceptColumn(createProblem([[2, 0.1], [2, 0.2]], [1, 2]))).toBe(0);
  });
  it('rank tolerance is max(n, p)·ε·max pivot — never an exact zero test', () => {
    expect(isNegligiblePivot(1e-16, 1, 5, 2)).toBe(true);
    expect(isNegligiblePivot(1e-14, 1, 5, 2)).toBe(false);
    expect(isNegligiblePivot(1e-14, 1, 1000, 2)).toBe(true);
  });
});
