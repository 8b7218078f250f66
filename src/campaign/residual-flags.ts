// Standardized residuals and suspect flags of the arcs in a fit, on a robust scale:
//     zᵢ = √wᵢ·rᵢ / s,   s = 1.4826·MAD of the whitened residuals of the arcs in the fit,
// a reading being suspect when |zᵢ| > threshold (default 3, common practice). The MAD, not σ₀, so a
// blunder cannot hide itself by inflating the scale. With `propagated` weights the a-priori sigmas
// are a floor (s ≥ 1): arcs within their own stated sigma are never flagged, as at the stations.
// A zero scale (an exact fit, no redundancy) flags nothing and says so.
import { madScale } from '../fit/index.ts';
import type { WeightingId } from './records.ts';

export interface ResidualFlags {
  scale: number;
  standardized: Float64Array;
  suspect: boolean[];
  /** Empty, or why no reading can be flagged. */
  note: string;
}

export function flagResiduals(
  residuals: ArrayLike<number>, weights: ArrayLike<number>, inFit: readonly boolean[], weighting: WeightingId, threshold: number,
): ResidualFlags {
  const n = residuals.length;
  const whitened = Array.from({ length: n }, (_, i) => residuals[i] * Math.sqrt(weights[i]));
  const used = whitened.filter((_, i) => inFit[i]);
  const mad = used.length > 0 ? madScale(used) : 0;
  const scale = weighting === 'propagated' ? Math.max(1, mad) : mad;
  const standardized = new Float64Array(n);
  const suspect = new Array<boolean>(n).fill(false);
  if (!(scale > 0)) return { scale: 0, standardized, suspect, note: 'the residual scale is zero (no redundancy), so no reading can be flagged' };
  for (let i = 0; i < n; i++) {
    standardized[i] = whitened[i] / scale;
    suspect[i] = Math.abs(standardized[i]) > threshold;
  }
  return { scale, standardized, suspect, note: '' };
}
