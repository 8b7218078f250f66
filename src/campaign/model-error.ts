// The model-error statement of the degree models, computed for the campaign's own latitudes.
//
// y = c + m·sin²φ is the meridian degree length M(φ)·π/180 truncated after the e² term; the omitted
// (15/8)e⁴c·sin⁴φ (a cos 4φ term) is of order e⁴. Rather than bound it analytically, take the
// campaign's arcs (the same pairs of station latitudes), make them exact on the reference ellipsoid
// with the meridian distance G(φ₂) − G(φ₁), reduce them to rows exactly as the readings are
// (degree-rows.ts), fit the model by least squares with equal weights, and report
// the largest residual: that is how far the model itself misses on these latitudes with perfect
// data (≈ 1.2 m/degree for the linear model on one-degree WGS 84 arcs, check-values.md; of order e⁶,
// about a millimetre per degree, for degree2).
import { meridianArcM, type Ellipsoid } from '../geodesy/index.ts';
import { fitLinear } from '../fit/index.ts';
import { degreeRows } from './degree-rows.ts';
import { degreeProblem, type DegreeModelId } from './degree-model.ts';

export interface ModelErrorStatement { statement: string; maxMetresPerDegree: number }

export function degreeModelError(
  pairs: readonly { latitude1Deg: number; latitude2Deg: number }[], model: DegreeModelId, ellipsoid: Ellipsoid, ellipsoidLabel: string,
): ModelErrorStatement | null {
  const p = model === 'degree' ? 2 : 3;
  if (pairs.length < p) return null;
  const exact = degreeRows(pairs.map((q, i) => ({
    id: String(i), latitude1Deg: q.latitude1Deg, latitude2Deg: q.latitude2Deg, sigmaLatitude1Arcsec: 0, sigmaLatitude2Arcsec: 0,
    reducedDistanceM: Math.abs(meridianArcM(ellipsoid, q.latitude1Deg, q.latitude2Deg)), sigmaM: 0,
  })), 'equal');
  const fit = fitLinear(degreeProblem(exact, model), 'least-squares');
  if (fit.status !== 'ok') return null;
  let max = 0;
  for (const r of fit.residuals) max = Math.max(max, Math.abs(r));
  const form = model === 'degree' ? 'y = c + m·sin²φ omits terms of order e⁴ (the (15/8)e⁴c·sin⁴φ term)'
    : 'y = c + m·sin²φ + k·sin⁴φ omits terms of order e⁶';
  return {
    maxMetresPerDegree: max,
    statement: `${form}; on this campaign's latitudes, exact ${ellipsoidLabel} arcs miss the model by up to ${max.toFixed(3)} m/degree ` +
      `(model error, independent of the readings). The residuals carry it; the figure is read by the inversion by arcs ` +
      `(figure.inversion), which takes it into account. The ellipsoid model has no such error.`,
  };
}
