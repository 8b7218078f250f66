// The figure read from degree-length coefficients, and its assembly from the equatorial degree
// length C = a(1 − e²)π/180 and e²: a = C·(180/π)/(1 − e²), f = 1 − √(1 − e²) (written as
// e²/(1 + √(1 − e²)) to keep its digits), quadrant G(90°) of that (a, f) by Helmert's series.
import { InputError } from '../errors.ts';
import { type Ellipsoid, eccentricitySquared } from './ellipsoid.ts';
import { MAX_ABS_FLATTENING } from './flattening.ts';
import { quadrantM } from './meridian.ts';

/** Metres per degree; y = c + m·x (+ k·x²), x = sin²φ. */
export interface DegreeCoefficients { c: number; m: number; k?: number }

export interface DerivedFigure {
  semiMajorAxisM: number;
  flattening: number;
  inverseFlattening: number;
  eccentricitySquared: number;
  /** G(90°) of the derived (a, f) by Helmert's series (exact for that figure). */
  quadrantM: number;
  /** 90c + 45m (+ 33.75k): the model's own integral, equal to the quadrant only on evenly tiled latitudes. */
  modelQuadrantM: number;
  /** Which inversion was used, in words, with its model error. */
  inversion: string;
  /** 1 and 2: the series relations of that order; 'arcs': the inversion by arcs (exact for exact data). */
  order: 1 | 2 | 'arcs';
}

/** Completes a DerivedFigure from (a, f). */
export function figureFromAxisAndFlattening(semiMajorAxisM: number, flattening: number,
  rest: Pick<DerivedFigure, 'modelQuadrantM' | 'inversion' | 'order'>): DerivedFigure {
  const figure: Ellipsoid = { id: 'derived', name: 'derived figure', semiMajorAxisM, flattening,
    inverseFlattening: 1 / flattening, source: 'degree-length coefficients' };
  return {
    semiMajorAxisM, flattening, inverseFlattening: 1 / flattening, eccentricitySquared: eccentricitySquared(flattening),
    quadrantM: quadrantM(figure), ...rest,
  };
}

/** Completes a DerivedFigure from C and e²; `m` is the coefficient named when e² leaves the Earth-like range. */
export function assembleFigure(equatorialDegreeM: number, e2: number,
  rest: Pick<DerivedFigure, 'modelQuadrantM' | 'inversion' | 'order'>, m: number): DerivedFigure {
  if (!(e2 < 1)) throw new InputError('m', m, `these coefficients give e² = ${e2} ≥ 1: no ellipsoid has these degree lengths`);
  const flattening = e2 / (1 + Math.sqrt(1 - e2));
  if (!(Math.abs(flattening) <= MAX_ABS_FLATTENING)) {
    throw new InputError('m', m, `these coefficients give f = ${flattening}, outside ±${MAX_ABS_FLATTENING}: not an Earth-like figure`);
  }
  const figure = figureFromAxisAndFlattening((equatorialDegreeM * (180 / Math.PI)) / (1 - e2), flattening, rest);
  // Keep e² as solved (f(2 − f) would round it once more).
  return { ...figure, eccentricitySquared: e2 };
}
