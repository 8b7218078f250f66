// Upper tail of the χ² distribution, P(X > x) for ν degrees of freedom, for the global test of the
// least-squares fit: Q(ν/2, x/2), the regularized upper incomplete gamma function, by its power
// series for x < a + 1 and Lentz's continued fraction otherwise (Numerical Recipes 3rd ed. §6.2,
// gser/gcf). Both are summed until the relative change is below GAMMA_TOLERANCE (3e-16, one ulp
// scale), which they reach in O(√a) terms; GAMMA_MAX_TERMS caps the loop far above that.
export const GAMMA_TOLERANCE = 3e-16;
export const GAMMA_MAX_TERMS = 10_000;
/** Significance of the global test: common practice in network adjustment (α = 5 %). */
export const CHI_SQUARE_ALPHA = 0.05;

// Lanczos approximation of ln Γ (g = 7, n = 9 coefficients; relative error < 1e-15 for x > 0).
const LANCZOS = [0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313,
  -176.61502916214059, 12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7];

export function logGamma(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - logGamma(1 - x);
  const z = x - 1;
  let s = LANCZOS[0];
  for (let i = 1; i < LANCZOS.length; i++) s += LANCZOS[i] / (z + i);
  const t = z + 7.5;
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(s);
}

/** Regularized upper incomplete gamma Q(a, x) = Γ(a, x)/Γ(a), a > 0, x ≥ 0. */
export function gammaQ(a: number, x: number): number {
  if (x <= 0) return 1;
  const front = Math.exp(-x + a * Math.log(x) - logGamma(a));
  if (x < a + 1) {
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < GAMMA_MAX_TERMS; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * GAMMA_TOLERANCE) break;
    }
    return Math.max(0, 1 - sum * front);
  }
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < GAMMA_MAX_TERMS; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < GAMMA_TOLERANCE) break;
  }
  return Math.min(1, front * h);
}

/** P(χ²_ν > x). */
export function chiSquareUpperTail(x: number, dof: number): number {
  return gammaQ(dof / 2, x / 2);
}
