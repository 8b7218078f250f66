// The global (χ²) test of a least-squares fit: with wᵢ = 1/σᵢ² the objective Σwᵢrᵢ² follows χ²
// with n − p degrees of freedom, and the variance factor σ₀² = Σwr²/(n − p) is expected to be 1.
//
// Tail probabilities are the regularised incomplete gamma functions P(a, x), Q(a, x) with a =
// dof/2, x = statistic/2: the power series for x < a + 1 and Legendre's continued fraction
// (modified Lentz) otherwise (Press et al., "Numerical Recipes" 3rd ed., §6.2), each summed until
// the next term changes the sum by less than ε. The prefactor xᵃe⁻ˣ/Γ(a) is formed for a ≥ 10 as
// √(a/2π)·exp(a(log1p(t) − t) − S(a)) with x = a(1 + t) and S the Stirling series of ln Γ
// through a⁻¹¹ (truncation error < 7e-16 at a = 10), which avoids cancelling a·ln x against x.
// The smaller tail is computed directly, so far-tail p-values keep their relative accuracy.
import { ArcfieldError, InputError } from '../errors.ts';

export type ChiSquareTail = 'two-sided' | 'upper';

export interface ChiSquareTest {
  statistic: number;
  degreesOfFreedom: number;
  /** σ₀² = statistic / dof (expected 1 when the weights are 1/σ²). */
  varianceFactor: number;
  /** P(χ² ≤ statistic) and P(χ² ≥ statistic). */
  lowerTail: number;
  upperTail: number;
  tail: ChiSquareTail;
  alpha: number;
  /** Two-sided: 2·min(lower, upper) capped at 1; upper: the upper tail. */
  pValue: number;
  passes: boolean;
}

/** Terms beyond this many (√a-scaled) are never needed: both expansions converge in O(√a) terms. */
function iterationCap(a: number): number {
  return Math.ceil(100 + 40 * Math.sqrt(a));
}

/** Floor for Lentz's method, against division by zero (Numerical Recipes §5.2). */
const LENTZ_TINY = 1e-300;
/** ln √(2π). */
const HALF_LN_2PI = 0.9189385332046728;
/** Below this a the prefactor is formed directly, above it by the log1p form. */
const STIRLING_MIN = 10;

/**
 * Stirling's series S(a) = ln Γ(a) − [(a − ½) ln a − a + ½ ln 2π] through a⁻¹¹, a ≥ 10; the
 * first omitted term, 1/(156a¹³), bounds the error: < 7e-16 at a = 10.
 */
function stirlingTail(a: number): number {
  const a2 = a * a;
  return (1 / 12 - (1 / 360 - (1 / 1260 - (1 / 1680 - (1 / 1188 - 691 / (360360 * a2)) / a2) / a2) / a2) / a2) / a;
}

/** ln Γ(a) for a > 0: shift up to a ≥ 10 by Γ(a + 1) = aΓ(a), then Stirling. */
export function logGamma(a: number): number {
  // One logarithm of the product a(a+1)… (≤ 10 factors below 10, no overflow) rounds less than a sum of logs.
  let product = 1;
  let z = a;
  while (z < STIRLING_MIN) {
    product *= z;
    z += 1;
  }
  return (z - 0.5) * Math.log(z) - z + HALF_LN_2PI + stirlingTail(z) - Math.log(product);
}

/** xᵃe⁻ˣ/Γ(a). */
function prefactor(a: number, x: number): number {
  if (a < STIRLING_MIN) return Math.exp(a * Math.log(x) - x - logGamma(a));
  const t = (x - a) / a;
  return Math.sqrt(a / (2 * Math.PI)) * Math.exp(a * (Math.log1p(t) - t) - stirlingTail(a));
}

/** [P(a, x), Q(a, x)], the regularised lower and upper incomplete gamma functions. */
export function regularizedGamma(a: number, x: number): [number, number] {
  if (!(a > 0) || !Number.isFinite(a)) throw new InputError('a', a, 'must be finite and > 0');
  if (!(x >= 0) || Number.isNaN(x)) throw new InputError('x', x, 'must be >= 0');
  if (x === 0) return [0, 1];
  if (x === Infinity) return [1, 0];
  const cap = iterationCap(a);
  const pre = prefactor(a, x);
  if (x < a + 1) {
    let ap = a;
    let term = 1 / a;
    let sum = term;
    for (let k = 0; k < cap; k++) {
      ap += 1;
      term *= x / ap;
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * Number.EPSILON) {
        const p = sum * pre;
        return [p, 1 - p];
      }
    }
    throw new ArcfieldError(`incomplete gamma series did not converge in ${cap} terms (a = ${a}, x = ${x})`);
  }
  let b = x + 1 - a;
  let c = 1 / LENTZ_TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i <= cap; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < LENTZ_TINY) d = LENTZ_TINY;
    c = b + an / c;
    if (Math.abs(c) < LENTZ_TINY) c = LENTZ_TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < Number.EPSILON) {
      const q = h * pre;
      return [1 - q, q];
    }
  }
  throw new ArcfieldError(`incomplete gamma continued fraction did not converge in ${cap} terms (a = ${a}, x = ${x})`);
}

/** P(χ²_dof ≥ statistic). */
export function chiSquareUpperTail(statistic: number, dof: number): number {
  return regularizedGamma(dof / 2, statistic / 2)[1];
}

/** P(χ²_dof ≤ statistic). */
export function chiSquareLowerTail(statistic: number, dof: number): number {
  return regularizedGamma(dof / 2, statistic / 2)[0];
}

/**
 * Global test of the objective Σwr² against χ²(dof) at level alpha (default 0.05, common
 * practice). Two-sided by default: a statistic far below dof says the stated sigmas are too
 * pessimistic, as worth reporting as one far above.
 */
export function chiSquareTest(objective: number, dof: number, alpha = 0.05, tail: ChiSquareTail = 'two-sided'): ChiSquareTest {
  if (!Number.isFinite(objective) || objective < 0) throw new InputError('objective', objective, 'must be finite and >= 0');
  if (!Number.isInteger(dof) || dof < 1) throw new InputError('dof', dof, 'the χ² test needs at least one degree of freedom (n > p)');
  if (!(alpha > 0 && alpha < 1)) throw new InputError('alpha', alpha, 'must lie strictly between 0 and 1');
  const [lowerTail, upperTail] = regularizedGamma(dof / 2, objective / 2);
  const pValue = tail === 'upper' ? upperTail : Math.min(1, 2 * Math.min(lowerTail, upperTail));
  return {
    statistic: objective, degreesOfFreedom: dof, varianceFactor: objective / dof,
    lowerTail, upperTail, tail, alpha, pValue, passes: pValue >= alpha,
  };
}
