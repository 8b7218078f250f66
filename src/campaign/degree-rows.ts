// Arcs → rows of the classic degree-length model y = c + m·x (+ k·x²):
//     y = s₀ / |Δφ|   metres per degree of latitude,   x = sin²φ_mid,   φ_mid = (φ₁ + φ₂)/2.
// s₀/|Δφ| is the arc's MEAN degree length, not the one at φ_mid: they differ by M″Δφ²/24 ≈
// 3e²c·cos2φ_mid·Δφ²/24 (≈ 0.35 m/degree on a 5° arc). Being linear in x, the difference is absorbed
// into c and m (+0.4 in 1/f on 5° arcs if read by the series inversions); the figure is therefore
// taken by the geodesy layer's inversion by arcs, which expects exactly these classic rows.
//
// Weighting `propagated`: first-order propagation of the distance sigma and both stations'
// latitude sigmas through y = s/Δφ (Δφ and σ_φ in degrees):
//     σ_y² = (σ_s/Δφ)² + (s/Δφ²)²·(σ_φ₁² + σ_φ₂²).
// Arcs sharing a station are correlated through that station's latitude (covariance
// −(s₁/Δφ₁²)(s₂/Δφ₂²)σ_φ² for consecutive arcs): these weights are the diagonal, and least
// squares adds the covariance (degree-gls.ts); the robust estimators use the diagonal alone — see
// DEVELOPERS.md "Conventions".
// Weighting `equal`: every row weight 1, as the classic analyses did.
import type { WeightingId } from './records.ts';

export interface ArcGeometry {
  id: string;
  /** Station latitudes of the arc (degrees), in either order. */
  latitude1Deg: number;
  latitude2Deg: number;
  sigmaLatitude1Arcsec: number;
  sigmaLatitude2Arcsec: number;
  /** Distance reduced to the ellipsoid, metres. */
  reducedDistanceM: number;
  sigmaM: number;
}

export interface DegreeRow {
  id: string;
  latitude1Deg: number;
  latitude2Deg: number;
  /** sin²φ_mid. */
  x: number;
  midLatitudeDeg: number;
  /** Metres per degree. */
  y: number;
  sigmaY: number;
  /** 1/σ_y² (`propagated`) or 1 (`equal`). */
  weight: number;
}

export function degreeRow(arc: ArcGeometry, weighting: WeightingId): DegreeRow {
  const dPhi = Math.abs(arc.latitude2Deg - arc.latitude1Deg);
  const mid = (arc.latitude1Deg + arc.latitude2Deg) / 2;
  const s = arc.reducedDistanceM;
  const y = s / dPhi;
  const sPhi1 = arc.sigmaLatitude1Arcsec / 3600;
  const sPhi2 = arc.sigmaLatitude2Arcsec / 3600;
  const sigmaY = Math.sqrt((arc.sigmaM / dPhi) ** 2 + (s / (dPhi * dPhi)) ** 2 * (sPhi1 * sPhi1 + sPhi2 * sPhi2));
  const sinMid = Math.sin((mid * Math.PI) / 180);
  return { id: arc.id, latitude1Deg: arc.latitude1Deg, latitude2Deg: arc.latitude2Deg, x: sinMid * sinMid, midLatitudeDeg: mid, y, sigmaY, weight: weighting === 'equal' ? 1 : 1 / (sigmaY * sigmaY) };
}

export function degreeRows(arcs: readonly ArcGeometry[], weighting: WeightingId): DegreeRow[] {
  return arcs.map((a) => degreeRow(a, weighting));
}
