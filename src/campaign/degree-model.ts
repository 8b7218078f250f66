// The classic degree-length models through the fit layer:
//   degree:  y = c + m·x          (x = sin²φ_mid, y in metres per degree)
//   degree2: y = c + m·x + k·x²   (the (15/8)e⁴c·sin⁴φ term kept; its omission is the e⁴ model error)
// Coefficients c, m, k are in metres per degree. Figures come from them by the second-order
// inversion in src/geodesy (figureFromDegreeCoefficients, order 2, projected on the fitted latitudes).
import { fitLinear } from '../fit/index.ts';
import type { Estimator, FitOptions, FitResult, LinearProblem } from '../fit/types.ts';
import type { DegreeRow } from './degree-rows.ts';

export type DegreeModelId = 'degree' | 'degree2';

export const DEGREE_COEFFICIENT_NAMES: Record<DegreeModelId, readonly string[]> = {
  degree: ['c', 'm'],
  degree2: ['c', 'm', 'k'],
};

export function degreeProblem(rows: readonly DegreeRow[], model: DegreeModelId): LinearProblem {
  const p = DEGREE_COEFFICIENT_NAMES[model].length;
  const n = rows.length;
  const X = new Float64Array(n * p);
  rows.forEach((r, i) => {
    X[i * p] = 1;
    X[i * p + 1] = r.x;
    if (p === 3) X[i * p + 2] = r.x * r.x;
  });
  return { n, p, X, y: Float64Array.from(rows, (r) => r.y), weights: Float64Array.from(rows, (r) => r.weight) };
}

export function fitDegreeModel(rows: readonly DegreeRow[], model: DegreeModelId, estimator: Estimator, options: FitOptions = {}): { problem: LinearProblem; fit: FitResult } {
  const problem = degreeProblem(rows, model);
  return { problem, fit: fitLinear(problem, estimator, options) };
}
