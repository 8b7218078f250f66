// What the live-fit chart draws, computed in the worker beside the solve so the page only draws:
// degree length (metres per degree of latitude) against x = sin²φ_mid, one point per arc, and the
// fitted curve.
//   degree models: curve y(x) = c + m·x (+ k·x²); an arc's point is the curve at its x plus its
//                  residual (residuals are already metres per degree);
//   ellipsoid:     curve y(φ) = M(φ)·π/180 of the fitted (a, f); an arc's residual (metres along
//                  the arc) is shown per degree, r/|Δφ|, above the curve at its mid latitude.
// A point therefore sits exactly its residual away from the curve, which is what the chart is for.
import type { CampaignRecords } from '../campaign/records.ts';
import type { CampaignResult } from '../campaign/result.ts';
import { customEllipsoid, degreeLengthM } from '../geodesy/index.ts';

export interface ChartPoint {
  readingId: string;
  label: string;
  x: number;
  y: number;
  residualPerDeg: number;
  standardizedResidual: number;
  suspect: boolean;
  excluded: boolean;
}

export interface FitChartData {
  points: ChartPoint[];
  /** Sampled fitted curve, x ascending (empty when there is no usable fit). */
  curve: { x: number; y: number }[];
  xLabel: string;
  yLabel: string;
}

/** Curve samples across the data's x range (a smooth line at phone width). */
export const CURVE_SAMPLES = 64;
const RAD = Math.PI / 180;

export function fitChartData(records: CampaignRecords, result: CampaignResult): FitChartData {
  const empty: FitChartData = { points: [], curve: [], xLabel: 'sin²φ (mid latitude)', yLabel: 'm per degree' };
  const lat = new Map(result.stations.filter((s) => s.usedInFit !== false).map((s) => [s.code, s.latitudeDeg]));
  const arcs = new Map(records.arcReadings.map((a) => [a.id, a]));
  const coef = new Map(result.coefficients.map((c) => [c.name, c.value]));

  let curveAt: ((x: number) => number) | null = null;
  if (result.model === 'ellipsoid' && result.figure) {
    const e = customEllipsoid(result.figure.semiMajorAxisM, result.figure.inverseFlattening, 'fitted');
    curveAt = (x) => degreeLengthM(e, Math.asin(Math.sqrt(Math.min(Math.max(x, 0), 1))) / RAD);
  } else if (result.model !== 'ellipsoid' && coef.has('c') && coef.has('m')) {
    const c = coef.get('c') ?? 0, m = coef.get('m') ?? 0, k = coef.get('k') ?? 0;
    curveAt = (x) => c + m * x + k * x * x;
  }
  if (!curveAt || result.status === 'too-few-arcs' || result.status === 'one-latitude') return empty;

  const points: ChartPoint[] = [];
  for (const r of result.readings) {
    if (r.kind !== 'arc' || r.usedInFit === false) continue;
    const arc = arcs.get(r.id);
    const p1 = arc ? lat.get(arc.fromStation) : undefined;
    const p2 = arc ? lat.get(arc.toStation) : undefined;
    if (!arc || p1 === undefined || p2 === undefined || p1 === p2) continue;
    const mid = (p1 + p2) / 2;
    const x = Math.sin(mid * RAD) ** 2;
    const perDeg = result.model === 'ellipsoid' ? r.residual / Math.abs(p2 - p1) : r.residual;
    points.push({
      readingId: r.id, label: r.station ?? `${arc.fromStation}–${arc.toStation}`, x, y: curveAt(x) + perDeg,
      residualPerDeg: perDeg, standardizedResidual: r.standardizedResidual, suspect: r.suspect, excluded: r.excluded,
    });
  }
  if (!points.length) return empty;
  const xs = points.map((p) => p.x);
  const lo = Math.max(0, Math.min(...xs) - 0.02), hi = Math.min(1, Math.max(...xs) + 0.02);
  const curve = Array.from({ length: CURVE_SAMPLES }, (_, i) => {
    const x = lo + ((hi - lo) * i) / (CURVE_SAMPLES - 1);
    return { x, y: curveAt(x) };
  });
  return { ...empty, points, curve };
}
