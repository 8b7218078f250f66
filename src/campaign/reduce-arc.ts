// Reduction of a measured meridian arc distance to the ellipsoid.
//
// A line measured at height h above the ellipsoid along the meridian has length (M + h)·Δφ, and
// its image on the ellipsoid M·Δφ, M the meridian radius of curvature; hence
//     s₀ = s · R / (R + h),   R = M(φ_mid), h = the mean height of the line.
// With M constant this is exact for any height profile, h being the mean height of the line over
// latitude: s = ∫(M + h)dφ = (M + h̄)Δφ. The approximation is taking R = M(φ_mid) instead of the
// arc's mean M̄; it leaves s·h̄·(M(φ_mid) − M̄)/R² ≈ s·h̄·M″Δφ²/(24R²), about 1 mm for h̄ = 2 km on
// a 5° arc (M″ ≈ 3e²a·cos2φ ≈ 130 km/rad²). When only the two station heights are known their mean
// stands in for h̄, which errs by (h̄ − mean)·Δφ — give the arc's own `meanHeightM` over rough
// ground. The distance must already be a horizontal arc length (slope and chord-to-arc corrections
// belong to the measurement); unit conversion happened at entry
// (`distanceM` is metres).

/** Where the mean height of an arc came from. */
export type ArcHeightSource = 'arc' | 'stations' | 'none';

export function reduceArcToEllipsoid(distanceM: number, meanHeightM: number, radiusM: number): number {
  return (distanceM * radiusM) / (radiusM + meanHeightM);
}

/**
 * The mean height of a line: the arc's own `meanHeightM` when given, else the mean of its two
 * stations' heights when both are known, else 0 (no reduction, said so in the result).
 */
export function arcMeanHeight(
  arcMeanHeightM: number | undefined, fromHeightM: number | undefined, toHeightM: number | undefined,
): { heightM: number; source: ArcHeightSource } {
  if (arcMeanHeightM !== undefined) return { heightM: arcMeanHeightM, source: 'arc' };
  if (fromHeightM !== undefined && toHeightM !== undefined) return { heightM: (fromHeightM + toHeightM) / 2, source: 'stations' };
  return { heightM: 0, source: 'none' };
}
