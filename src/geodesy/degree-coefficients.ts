// Degree-length model y = c + m·x (+ k·x²), x = sin²φ, y in metres per degree of latitude, and
// its conversion to a figure (a, f).
//
// Exact: y(φ) = M(φ)·π/180 = C·(1 − e²x)^{−3/2}, C = a(1 − e²)π/180, whose binomial series is
//   y = C·(1 + (3/2)e²x + (15/8)e⁴x² + (35/16)e⁶x³ + …)  =  C·Σ t_j x^j.
// So the Taylor coefficients are c = C, m = (3/2)e²C, k = (15/8)e⁴C, and the first omitted term
// of a P-term model is C·t_P·x^P: O(e⁴)·C ≈ 5 m per degree for P = 2, O(e⁶) ≈ 0.07 m for P = 3.
//
// Inversion, first order: e² = 2m/(3c), a = c·(180/π)/(1 − e²). Exact for Taylor coefficients, but
// coefficients fitted to data have absorbed the omitted term, which biases 1/f by about 2
// (check-values.md: 1/f ≈ 296 instead of 298.26 on 5–65° latitudes).
//
// Inversion, second order: the omitted term C·t_P(e²)·x^P seen by a least-squares fit over the
// fitted abscissae x_i is its projection p₀ + p₁x (+ p₂x²) on the fitted basis [1, x(, x²)],
// so the fitted (c, m) satisfy
//   c = C·(1 + t_P·p₀),   m = C·((3/2)e² + t_P·p₁).
// Their ratio is one equation in e², solved by Newton from the first-order value (the
// correction is O(e²) relative, so 2–3 steps reach rounding); then C from c. The remaining
// error is the next omitted term, O(e⁶) relative (~0.003 in 1/f on 5–65°, check-values.md).
// When k was fitted too (P = 3) it is not used for e² (poorly determined); c and m carry it.
// Without latitudes the projection is impossible: with k given, (c, m) are read as Taylor
// coefficients and the words say so; with neither, second order is refused.
import { InputError } from '../errors.ts';
import { type Ellipsoid, eccentricitySquared } from './ellipsoid.ts';
import { MAX_ABS_FLATTENING } from './flattening.ts';
import { checkedLatitudeDeg } from './latitude-policy.ts';
import { quadrantM } from './meridian.ts';
import { projectPowerOnBasis } from './projection.ts';

const DEG_PER_RAD = 180 / Math.PI;
const RAD_PER_DEG = Math.PI / 180;

/** Newton on e² stops when the step is below this (relative to e² ≈ 7e-3, i.e. ~1e-12 in 1/f). */
const E2_TOLERANCE = 1e-15;
const MAX_E2_ITERATIONS = 20;

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
  order: 1 | 2;
}

export interface FigureOptions {
  /** 1: first-order relations; 2: keep the first omitted term projected on `latitudesDeg`. */
  order?: 1 | 2;
  /** The latitudes (degrees) of the fitted rows, for the second-order projection. */
  latitudesDeg?: readonly number[];
  /** Weights of those rows in the fit (default equal); same length as latitudesDeg. */
  weights?: readonly number[];
}

/** t_j of the binomial series of (1 − u)^{−3/2}: 1, 3/2 u, 15/8 u², 35/16 u³. */
const TAYLOR = [1, 3 / 2, 15 / 8, 35 / 16] as const;

function finiteOrThrow(value: unknown, field: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new InputError(field, value, 'a degree-length coefficient must be a finite number of metres per degree');
  }
  return value;
}

/**
 * The figure (a, f, 1/f, e², quadrant) from degree-length coefficients. Default order: 2 when
 * latitudes or k are given, else 1 (the relations that are exact for Taylor coefficients).
 */
export function figureFromDegreeCoefficients(coef: DegreeCoefficients, opts: FigureOptions = {}): DerivedFigure {
  const c = finiteOrThrow(coef.c, 'c');
  const m = finiteOrThrow(coef.m, 'm');
  const k = coef.k === undefined ? undefined : finiteOrThrow(coef.k, 'k');
  if (c <= 0) throw new InputError('c', c, 'the equatorial degree length c must be above 0');
  const latitudes = opts.latitudesDeg;
  const order = opts.order ?? (latitudes !== undefined || k !== undefined ? 2 : 1);
  if (order !== 1 && order !== 2) throw new InputError('order', order, 'the inversion order must be 1 or 2');
  const terms = k === undefined ? 2 : 3;
  const modelQuadrantM = 90 * c + 45 * m + (k === undefined ? 0 : 33.75 * k);

  let e2 = (2 * m) / (3 * c);
  let C = c;
  let inversion: string;
  if (order === 1) {
    inversion = 'first order: e² = 2m/(3c), a = c·(180/π)/(1 − e²); exact for Taylor coefficients, ' +
      `but a fitted (c, m) has absorbed the omitted (15/8)e⁴c·x² term (≈ ${(TAYLOR[2] * e2 * e2 * c).toFixed(1)} m per degree at the pole) ` +
      'and 1/f is then biased by about 2';
  } else if (latitudes === undefined) {
    if (k === undefined) {
      throw new InputError('latitudesDeg', latitudes,
        'a second-order inversion of (c, m) needs the latitudes that were fitted, to project the omitted x² term');
    }
    inversion = 'second order, (c, m, k) read as Taylor coefficients (no latitudes given, the omitted ' +
      `(35/16)e⁶c·x³ term ≈ ${(TAYLOR[3] * e2 ** 3 * c).toFixed(2)} m per degree was not projected): e² = 2m/(3c)`;
  } else {
    const xs = latitudes.map((lat, i) => {
      const phi = checkedLatitudeDeg(lat, `latitudesDeg[${i}]`) * RAD_PER_DEG;
      return Math.sin(phi) ** 2;
    });
    const p = projectPowerOnBasis(xs, terms, terms, opts.weights);
    const r = m / c;
    const tP = TAYLOR[terms];
    // h(u) = (3/2)u + t_P u^P p₁ − r(1 + t_P u^P p₀) = 0, Newton from the first-order root.
    let converged = false;
    let iterations = 0;
    for (; iterations < MAX_E2_ITERATIONS; iterations++) {
      const uP = e2 ** terms;
      const h = 1.5 * e2 + tP * uP * p[1] - r * (1 + tP * uP * p[0]);
      const dh = 1.5 + tP * terms * e2 ** (terms - 1) * (p[1] - r * p[0]);
      const step = h / dh;
      e2 -= step;
      if (Math.abs(step) < E2_TOLERANCE) {
        converged = true;
        break;
      }
    }
    if (!converged || !Number.isFinite(e2)) {
      throw new InputError('m', m, `no second-order eccentricity fits c = ${c}, m = ${m} on these latitudes (Newton did not converge)`);
    }
    C = c / (1 + tP * e2 ** terms * p[0]);
    inversion = `second order: the omitted ${terms === 2 ? '(15/8)e⁴c·x²' : '(35/16)e⁶c·x³'} term projected ` +
      `by least squares on the ${xs.length} fitted latitudes (x = sin²φ ∈ [${Math.min(...xs).toFixed(3)}, ${Math.max(...xs).toFixed(3)}]), ` +
      `e² solved by Newton in ${iterations + 1} step(s); remaining model error O(e⁶), about 0.003 in 1/f`;
  }
  if (!(e2 < 1)) throw new InputError('m', m, `m/c = ${m / c} gives e² = ${e2} ≥ 1: no ellipsoid has these degree lengths`);
  const semiMajorAxisM = (C * DEG_PER_RAD) / (1 - e2);
  // f = 1 − √(1 − e²) written as e²/(1 + √(1 − e²)) to keep its digits for small e².
  const flattening = e2 / (1 + Math.sqrt(1 - e2));
  if (Math.abs(flattening) > MAX_ABS_FLATTENING) {
    throw new InputError('m', m, `m/c = ${m / c} gives f = ${flattening}, outside ±${MAX_ABS_FLATTENING}: not an Earth-like figure`);
  }
  const figure: Ellipsoid = { id: 'derived', name: 'derived figure', semiMajorAxisM, flattening,
    inverseFlattening: 1 / flattening, source: 'degree-length coefficients' };
  return {
    semiMajorAxisM, flattening, inverseFlattening: 1 / flattening, eccentricitySquared: e2,
    quadrantM: quadrantM(figure), modelQuadrantM, inversion, order,
  };
}

/** Taylor coefficients of M(φ)·π/180 in x = sin²φ: c = a(1 − e²)π/180, m = (3/2)e²c, k = (15/8)e⁴c. */
export function degreeCoefficientsFromEllipsoid(e: Ellipsoid, terms: 2 | 3): DegreeCoefficients {
  if (terms !== 2 && terms !== 3) throw new InputError('terms', terms, 'the degree-length model has 2 or 3 terms');
  const e2 = eccentricitySquared(e.flattening);
  const c = e.semiMajorAxisM * (1 - e2) * RAD_PER_DEG;
  const m = TAYLOR[1] * e2 * c;
  return terms === 2 ? { c, m } : { c, m, k: TAYLOR[2] * e2 * e2 * c };
}
