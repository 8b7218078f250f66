// Degree-length model y = c + m·x (+ k·x²), x = sin²φ, y in metres per degree of latitude, and
// its conversion to a figure (a, f).
//
// Exact: y(φ) = M(φ)·π/180 = C·(1 − e²x)^{−3/2}, C = a(1 − e²)π/180, whose binomial series is
//   y = C·(1 + (3/2)e²x + (15/8)e⁴x² + (35/16)e⁶x³ + …)  =  C·Σ t_j x^j.
// So the Taylor coefficients are c = C, m = (3/2)e²C, k = (15/8)e⁴C, and the first omitted term
// of a P-term model is C·t_P·x^P: O(e⁴)·C ≈ 5 m per degree for P = 2, O(e⁶) ≈ 0.07 m for P = 3.
//
// Inversion, order 1: e² = 2m/(3c), a = c·(180/π)/(1 − e²). Exact for Taylor coefficients, but
// coefficients fitted to data have absorbed the omitted term, which biases 1/f by about 2
// (check-values.md; measured −1.94 on one-degree arcs at 5…65°, a off by +190…+290 m).
//
// Inversion, order 2: the omitted term C·t_P(e²)·x^P seen by a least-squares fit over the fitted
// abscissae xᵢ is its projection p₀ + p₁x (+ p₂x²) on the fitted basis [1, x(, x²)], so
//   c = C·(1 + t_P·p₀),   m = C·((3/2)e² + t_P·p₁).
// Their ratio is one equation in e², solved by Newton from the order-1 value (2–3 steps), then C
// from c. What is left is the next omitted term: measured with exact mid-latitude degree lengths
// on random 5–65° campaigns, |Δ(1/f)| ≤ 0.014 for (c, m) and ≤ 1e-4 for (c, m, k). When k was
// fitted it is not used for e² (poorly determined); c and m carry it. Without latitudes the
// projection is impossible: with k given, (c, m) are read as Taylor coefficients and the words say
// so; with neither, order 2 is refused.
//
// Caution, the reduction: the classic row y = s/Δφ is the mean degree length over the arc, not the
// degree length at the mid latitude, and that adds +0.015 (1° arcs) to +0.15 (3° arcs) to 1/f
// whatever the order. Pass `arcs` for the inversion by arcs (figure-by-arcs.ts), which is exact.
import { InputError } from '../errors.ts';
import { type Ellipsoid, eccentricitySquared } from './ellipsoid.ts';
import { type DegreeCoefficients, type DerivedFigure, assembleFigure } from './derived-figure.ts';
import { type DegreeArc, figureByArcs } from './figure-by-arcs.ts';
import { checkedLatitudeDeg } from './latitude-policy.ts';
import { projectPowerOnBasis } from './polynomial-least-squares.ts';

export type { DegreeCoefficients, DerivedFigure } from './derived-figure.ts';

const RAD_PER_DEG = Math.PI / 180;

/** Newton on e² stops when the step is below this (relative to e² ≈ 7e-3, i.e. ~1e-10 in 1/f). */
export const E2_TOLERANCE = 1e-15;
/** Newton cap: the correction to e² is O(e²) relative, so 2–3 steps reach rounding. */
export const MAX_E2_ITERATIONS = 20;

export interface FigureOptions {
  /** 1: order-1 relations; 2: keep the first omitted term projected on `latitudesDeg`. Ignored with `arcs`. */
  order?: 1 | 2;
  /** Mid latitudes (degrees) of the fitted rows, for the order-2 projection. */
  latitudesDeg?: readonly number[];
  /** The fitted rows as arcs: selects the inversion by arcs (exact for exact data). */
  arcs?: readonly DegreeArc[];
  /** Weights of the fitted rows (default equal); one per latitude or arc. */
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

/** Order 2: solves c = C(1 + t_P e^{2P} p₀), m = C((3/2)e² + t_P e^{2P} p₁) for (C, e²). */
function secondOrder(c: number, m: number, terms: 2 | 3, xs: readonly number[], weights: readonly number[] | undefined) {
  const p = projectPowerOnBasis(xs, terms, terms, weights);
  const r = m / c;
  const tP = TAYLOR[terms];
  let e2 = (2 * r) / 3;
  for (let iterations = 1; iterations <= MAX_E2_ITERATIONS; iterations++) {
    // h(u) = (3/2)u + t_P u^P p₁ − r(1 + t_P u^P p₀); h'(u) = 3/2 + P t_P u^{P−1}(p₁ − r p₀).
    const h = 1.5 * e2 + tP * e2 ** terms * p[1] - r * (1 + tP * e2 ** terms * p[0]);
    const dh = 1.5 + tP * terms * e2 ** (terms - 1) * (p[1] - r * p[0]);
    const step = h / dh;
    e2 -= step;
    if (!Number.isFinite(e2)) break;
    if (Math.abs(step) < E2_TOLERANCE) return { e2, C: c / (1 + tP * e2 ** terms * p[0]), iterations };
  }
  throw new InputError('m', m, `no order-2 eccentricity fits c = ${c}, m = ${m} on these latitudes (Newton did not converge)`);
}

/**
 * The figure (a, f, 1/f, e², quadrant) from degree-length coefficients. With `arcs`: the inversion
 * by arcs. Otherwise the default order is 2 when latitudes or k are given, else 1 (the relations
 * that are exact for Taylor coefficients). The result's `inversion` says which, in words.
 */
export function figureFromDegreeCoefficients(coef: DegreeCoefficients, opts: FigureOptions = {}): DerivedFigure {
  const c = finiteOrThrow(coef.c, 'c');
  const m = finiteOrThrow(coef.m, 'm');
  const k = coef.k === undefined ? undefined : finiteOrThrow(coef.k, 'k');
  if (c <= 0) throw new InputError('c', c, 'the equatorial degree length c must be above 0');
  const modelQuadrantM = 90 * c + 45 * m + (k === undefined ? 0 : 33.75 * k);
  if (opts.arcs !== undefined) return figureByArcs({ c, m, k }, opts.arcs, opts.weights, modelQuadrantM);

  const latitudes = opts.latitudesDeg;
  const order = opts.order ?? (latitudes !== undefined || k !== undefined ? 2 : 1);
  if (order !== 1 && order !== 2) throw new InputError('order', order, 'the inversion order must be 1 or 2');
  const terms = k === undefined ? 2 : 3;
  const firstOrderE2 = (2 * m) / (3 * c);
  if (order === 1) {
    return assembleFigure(c, firstOrderE2, {
      modelQuadrantM, order,
      inversion: 'order 1: e² = 2m/(3c), a = c·(180/π)/(1 − e²); exact for Taylor coefficients, but a fitted (c, m) has ' +
        `absorbed the omitted (15/8)e⁴c·x² term (≈ ${(TAYLOR[2] * firstOrderE2 ** 2 * c).toFixed(1)} m per degree at the pole) ` +
        'and 1/f is then biased by about 2',
    }, m);
  }
  if (latitudes === undefined) {
    if (k === undefined) {
      throw new InputError('latitudesDeg', latitudes,
        'an order-2 inversion of (c, m) needs the latitudes that were fitted, to project the omitted x² term');
    }
    return assembleFigure(c, firstOrderE2, {
      modelQuadrantM, order,
      inversion: 'order 2 with (c, m, k) read as Taylor coefficients: e² = 2m/(3c) (no latitudes given, so the omitted ' +
        `(35/16)e⁶c·x³ term, ≈ ${(TAYLOR[3] * firstOrderE2 ** 3 * c).toFixed(2)} m per degree at the pole, was not projected)`,
    }, m);
  }
  const xs = latitudes.map((lat, i) => Math.sin(checkedLatitudeDeg(lat, `latitudesDeg[${i}]`) * RAD_PER_DEG) ** 2);
  const { e2, C, iterations } = secondOrder(c, m, terms, xs, opts.weights);
  return assembleFigure(C, e2, {
    modelQuadrantM, order,
    inversion: `order 2: the omitted ${terms === 2 ? '(15/8)e⁴c·x²' : '(35/16)e⁶c·x³'} term projected by least squares on the ` +
      `${xs.length} fitted latitudes (x = sin²φ from ${Math.min(...xs).toFixed(3)} to ${Math.max(...xs).toFixed(3)}), e² by Newton in ` +
      `${iterations} step(s); model error left O(e⁶): up to ~${terms === 2 ? '0.014' : '1e-4'} in 1/f, plus the reduction's ` +
      'mean-versus-mid-latitude bias when rows are s/Δφ over long arcs (pass arcs to remove both)',
  }, m);
}

/** Taylor coefficients of M(φ)·π/180 in x = sin²φ: c = a(1 − e²)π/180, m = (3/2)e²c, k = (15/8)e⁴c. */
export function degreeCoefficientsFromEllipsoid(e: Ellipsoid, terms: 2 | 3): DegreeCoefficients {
  if (terms !== 2 && terms !== 3) throw new InputError('terms', terms, 'the degree-length model has 2 or 3 terms');
  const e2 = eccentricitySquared(e.flattening);
  const c = e.semiMajorAxisM * (1 - e2) * RAD_PER_DEG;
  const m = TAYLOR[1] * e2 * c;
  return terms === 2 ? { c, m } : { c, m, k: TAYLOR[2] * e2 * e2 * c };
}
