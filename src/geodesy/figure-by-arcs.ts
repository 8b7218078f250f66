// Inversion of degree-length coefficients by arcs: the figure (a, f) whose exact meridian arcs,
// reduced the classic way and fitted the way the campaign fitted them, return exactly the given
// coefficients. Exact for exact data, whatever the arc lengths and whether k was fitted.
//
// Why it exists: the classic reduction takes yᵢ = sᵢ/Δφᵢ (the MEAN degree length over the arc) as
// the degree length AT the mid latitude. They differ by M″Δφ²/24 ≈ 3e²cos2φ·Δφ²/24 relative
// (Taylor expansion of the mean of M over the arc), which leaks into c and m: measured with
// GeographicLib arcs over random 5–65° campaigns, +0.015 in 1/f for 1° arcs and +0.11…+0.15 for 3°
// arcs, after the second-order inversion. The series inversions cannot see it; this one can.
//
// Method: for a trial f, the rows x̃ᵢ = sin²((φ₁ + φ₂)/2), ỹᵢ = (g(φ₂; f) − g(φ₁; f))/(φ₂ − φ₁),
// g = G/a (meridian.ts), fitted with the same basis and weights give (c̃, m̃)(f) per unit a; a
// figure reproduces the data when m̃(f)/c̃(f) = m/c, one monotone equation in f (≈ (3/2)e² at
// first order) solved by secant steps kept inside a sign-change bracket (bisection when a step
// leaves it), then a = c/c̃(f). The rows must be formed exactly this way (src/campaign reduction).
import { InputError } from '../errors.ts';
import { type DegreeCoefficients, type DerivedFigure, figureFromAxisAndFlattening } from './derived-figure.ts';
import { MAX_ABS_FLATTENING } from './flattening.ts';
import { checkedLatitudeDeg } from './latitude-policy.ts';
import { meridianDistancePerUnitA } from './meridian.ts';
import { fitPolynomialInX } from './polynomial-least-squares.ts';

/** One reduced row: an arc between two latitudes (degrees), in either order. */
export interface DegreeArc { fromLatitudeDeg: number; toLatitudeDeg: number }

/** Stop when the secant step in f is below this: 1e-15 in f is ~1e-10 in 1/f near 298. */
export const ARC_INVERSION_F_TOLERANCE = 1e-15;
/** Cap: bisection alone halves the 0.1-wide bracket to 1e-15 in ~47 steps; the secant needs ~6. */
export const ARC_INVERSION_MAX_ITERATIONS = 100;

const RAD_PER_DEG = Math.PI / 180;

export function figureByArcs(coef: DegreeCoefficients, arcs: readonly DegreeArc[], weights: readonly number[] | undefined,
  modelQuadrantM: number): DerivedFigure {
  const terms = coef.k === undefined ? 2 : 3;
  const rows = arcs.map((arc, i) => {
    const from = checkedLatitudeDeg(arc.fromLatitudeDeg, `arcs[${i}].fromLatitudeDeg`);
    const to = checkedLatitudeDeg(arc.toLatitudeDeg, `arcs[${i}].toLatitudeDeg`);
    if (from === to) throw new InputError(`arcs[${i}].toLatitudeDeg`, to, 'an arc needs two different latitudes');
    return { from, to, x: Math.sin(((from + to) / 2) * RAD_PER_DEG) ** 2 };
  });
  const xs = rows.map((r) => r.x);
  const perUnitA = (f: number): number[] => fitPolynomialInX(xs,
    rows.map((r) => (meridianDistancePerUnitA(f, r.to) - meridianDistancePerUnitA(f, r.from)) / (r.to - r.from)), terms, weights, 'arcs');
  const target = coef.m / coef.c;
  const residual = (f: number): number => {
    const beta = perUnitA(f);
    return beta[1] / beta[0] - target;
  };

  let lo = -MAX_ABS_FLATTENING;
  let hi = MAX_ABS_FLATTENING;
  if (!(residual(lo) <= 0 && residual(hi) >= 0)) {
    throw new InputError('m', coef.m, `no figure with |f| ≤ ${MAX_ABS_FLATTENING} gives m/c = ${target} on these arcs`);
  }
  // Start from the first-order value e² = 2(m/c)/3, clamped into the bracket.
  const e2 = (2 * target) / 3;
  let f = Math.min(hi, Math.max(lo, e2 / (1 + Math.sqrt(Math.max(0, 1 - e2)))));
  let fPrev = f === hi ? f - 1e-6 : f + 1e-6;
  let r = residual(f);
  let rPrev = residual(fPrev);
  let iterations = 0;
  let converged = r === 0;
  while (!converged && iterations < ARC_INVERSION_MAX_ITERATIONS) {
    iterations++;
    if (r < 0) lo = f;
    else hi = f;
    let next = rPrev !== r ? f - (r * (f - fPrev)) / (r - rPrev) : (lo + hi) / 2;
    if (!(next > lo && next < hi)) next = (lo + hi) / 2;
    fPrev = f;
    rPrev = r;
    f = next;
    r = residual(f);
    converged = r === 0 || Math.abs(f - fPrev) < ARC_INVERSION_F_TOLERANCE || hi - lo < ARC_INVERSION_F_TOLERANCE;
  }
  if (!converged) {
    throw new InputError('m', coef.m, `the inversion by arcs did not converge in ${ARC_INVERSION_MAX_ITERATIONS} steps`);
  }
  const beta = perUnitA(f);
  return figureFromAxisAndFlattening(coef.c / beta[0], f, {
    modelQuadrantM,
    order: 'arcs',
    inversion: `by arcs: the figure whose exact arcs (Helmert's series), reduced as y = s/Δφ at x = sin²(mid latitude) ` +
      `and fitted with the same ${terms} terms${weights === undefined ? '' : ' and weights'} on the ${rows.length} arcs, ` +
      `returns these coefficients; f by secant in a sign-change bracket, ${iterations} step(s); exact for exact data (no model error left)`,
  });
}
