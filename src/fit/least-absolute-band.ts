// The screening band of the exact least-absolute-deviations fit.
//
// A fit γ̂ from m subsample rows errs at row i by x̃ᵢ(γ̂ − γ*), whose spread is proportional to
// √(x̃ᵢ G⁻¹ x̃ᵢᵀ) with G the subsample's (whitened) Gram matrix divided by m: the asymptotic
// covariance of the L1 estimator is ω²(AᵀA)⁻¹ (Bassett & Koenker, JASA 73 (1978) 618). So the
// band is leverage-shaped, as in Portnoy & Koenker (Statistical Science 12 (1997) 279, §4):
// row i is kept when its whitened residual satisfies ρᵢ² < δ₀²·ℓᵢ²/p with ℓᵢ² = ãᵢG⁻¹ãᵢᵀ
// (whose mean over the subsample is exactly p, so δ₀ is the band at an average row). δ₀ is the
// subsample's quantile, at level κ·√(p/m), of |ρᵢ|/(ℓᵢ/√p): that turns the O(ω·√(p/m)) error
// into the residual density's own units without estimating ω. A constant band (no leverage)
// failed at the ends of the latitude range on the benchmark data, where the subsample fit is
// least certain.
//
// The weights cancel in raw units: ρᵢ = √wᵢ·rᵢ and ãᵢ = √wᵢ·x̃ᵢ, so the test is
// rᵢ² < δ₀²/p · xᵢ Q xᵢᵀ with Q = L G⁻¹ Lᵀ (L the frame map), one quadratic form per row.
import { factorLu, inverseFromLu } from './linear-solve.ts';
import { quadRow } from './row-forms.ts';
import { selectInPlace } from './simplex-residual-scale.ts';
import type { ColumnFrame } from './simplex-frame.ts';

export interface Band {
  /** δ₀²/p: a row is kept when r² < scale · x Q xᵀ + floor (raw units) or ρ² < scale · ã G⁻¹ ãᵀ (frame). */
  scale: number;
  /**
   * Keeps rows whose residual is within rounding of zero whatever their leverage (raw units²;
   * set by the top-level pass, 0 elsewhere): see `BAND_SLACK`.
   */
  floor: number;
  /** G⁻¹ in the frame (p×p). */
  frameQ: Float64Array;
  /** L G⁻¹ Lᵀ for raw rows (p×p). */
  rawQ: Float64Array;
}

/** G⁻¹ of m compact rows (G = AᵀA/m), or null when singular. */
export function inverseGram(A: Float64Array, m: number, p: number): Float64Array | null {
  const G = p === 3 ? gram3(A, m) : new Float64Array(p * p);
  if (p !== 3) {
    for (let i = 0; i < m; i++) {
      for (let j = 0; j < p; j++) {
        const a = A[i * p + j];
        for (let k = 0; k < p; k++) G[j * p + k] += a * A[i * p + k];
      }
    }
  }
  for (let k = 0; k < p * p; k++) G[k] /= m;
  const f = factorLu(G, p);
  if (f.singular) return null;
  const inv = inverseFromLu(f);
  for (let k = 0; k < p * p; k++) if (!Number.isFinite(inv[k])) return null;
  return inv;
}

/**
 * AᵀA for p = 3 with the six distinct sums in locals: the generic loop adds into the p×p array
 * in memory, a store and reload per term, and was ~40 ns a row (a third of a warm refit's sample work).
 */
function gram3(A: Float64Array, m: number): Float64Array {
  let g00 = 0, g01 = 0, g02 = 0, g11 = 0, g12 = 0, g22 = 0;
  for (let i = 0; i < m; i++) {
    const a0 = A[3 * i], a1 = A[3 * i + 1], a2 = A[3 * i + 2];
    g00 += a0 * a0;
    g01 += a0 * a1;
    g02 += a0 * a2;
    g11 += a1 * a1;
    g12 += a1 * a2;
    g22 += a2 * a2;
  }
  return Float64Array.of(g00, g01, g02, g01, g11, g12, g02, g12, g22);
}

/** ã G⁻¹ ãᵀ for compact row i. */
export function leverage(A: Float64Array, i: number, p: number, Q: Float64Array): number {
  return quadRow(A, i * p, Q, p);
}

/**
 * The band from a solved subsample: compact rows A (m×p), their whitened residuals at the
 * subsample optimum, and the keep fraction q. A singular Gram (a degenerate subsample) falls
 * back to a constant band (Q = identity in the frame, scale from the plain quantile).
 */
export function bandFromSubsample(frame: ColumnFrame, A: Float64Array, residuals: Float64Array, m: number, q: number): Band {
  const p = frame.p;
  const inv = inverseGram(A, m, p);
  const frameQ = inv ?? identity(p);
  const t = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    const l2 = inv ? leverage(A, i, p, inv) / p : 1;
    t[i] = l2 > 0 ? Math.abs(residuals[i]) / Math.sqrt(l2) : 0;
  }
  const k = Math.max(0, Math.min(m - 1, Math.ceil(q * m) - 1));
  let delta = selectInPlace(t, m, k);
  if (!(delta > 0)) {
    // An exact fit on the subsample: keep a sliver around the fit rather than nothing.
    let top = 0;
    for (let i = 0; i < m; i++) top = Math.max(top, t[i]);
    delta = Math.max(top * 1e-12, Number.MIN_VALUE);
  }
  return makeBand(frame, frameQ, delta);
}

/** A band of half-width δ₀ at an average row with the given frame G⁻¹. */
export function makeBand(frame: ColumnFrame, frameQ: Float64Array, delta: number): Band {
  const { p, L } = frame;
  // rawQ = L·G⁻¹·Lᵀ.
  const LQ = new Float64Array(p * p);
  for (let i = 0; i < p; i++) for (let k = 0; k < p; k++) {
    let s = 0;
    for (let j = 0; j < p; j++) s += L[i * p + j] * frameQ[j * p + k];
    LQ[i * p + k] = s;
  }
  const rawQ = new Float64Array(p * p);
  for (let i = 0; i < p; i++) for (let k = 0; k < p; k++) {
    let s = 0;
    for (let j = 0; j < p; j++) s += LQ[i * p + j] * L[k * p + j];
    rawQ[i * p + k] = s;
  }
  return { scale: (delta * delta) / p, floor: 0, frameQ, rawQ };
}

/** The same band, twice as wide. */
export function widen(band: Band): Band {
  return { ...band, scale: band.scale * 4 };
}

/** δ₀ of a band (half-width at an average row), for reports. */
export function bandHalfWidth(band: Band, p: number): number {
  return Math.sqrt(band.scale * p);
}

function identity(p: number): Float64Array {
  const I = new Float64Array(p * p);
  for (let j = 0; j < p; j++) I[j * p + j] = 1;
  return I;
}

/**
 * For the side proof: (a + b)² ≤ (1 + η)a² + (1 + 1/η)b², so a row pinned by
 * r² ≥ (1 + η)·scale·lev + (1 + 1/η)·τ² has |r| ≥ √(scale·lev) + τ. With η = BAND_SLACK the band
 * is 1 % wider than its nominal shape and rows within the rounding τ of zero are always kept.
 */
export const BAND_SLACK = 0.01;

/** The band with the rounding floor for raw residuals of rounding bound τ (see BAND_SLACK). */
export function withRoundingFloor(band: Band, tau: number): Band {
  return { ...band, scale: band.scale * (1 + BAND_SLACK), floor: (1 + 1 / BAND_SLACK) * tau * tau };
}

/** The nominal scale a floored band proves sides for: a move D < √(this) keeps every pinned row's side. */
export function provenScale(band: Band): number {
  return band.scale / (1 + BAND_SLACK);
}
