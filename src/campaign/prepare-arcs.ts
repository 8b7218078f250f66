// Each arc reading → the quantities both models need: the two station latitudes of the chosen kind
// with their standard errors, the distance reduced to the reference ellipsoid (reduce-arc.ts), the
// degree-length row (degree-rows.ts) and the arc's metric sigma for the rigorous model:
//     σ² = σ_s² + (M(φ₁)·σ_φ₁)² + (M(φ₂)·σ_φ₂)²     (σ_φ in radians; first-order propagation of
// the station latitudes through ∂G/∂φ = M(φ)). An arc that cannot enter a fit (a station without a
// latitude of the chosen kind, or two stations at the same latitude) is kept with the reason.
import { meridianRadiusM, type Ellipsoid } from '../geodesy/index.ts';
import type { ArcReading, LatitudeKind, Station, WeightingId } from './records.ts';
import { arcMeanHeight, reduceArcToEllipsoid, type ArcHeightSource } from './reduce-arc.ts';
import { degreeRow, type DegreeRow } from './degree-rows.ts';
import type { StationLatitude } from './station-latitudes.ts';

/**
 * Smallest latitude difference of a usable arc: 1e-4° (0.36″, about 11 m). Below it the degree
 * length s/Δφ is dominated by the latitude errors of any real reading; it is not a meridian arc.
 */
export const MIN_ARC_SPAN_DEG = 1e-4;
const ARCSEC_TO_RAD = Math.PI / 648000;

export interface PreparedArc {
  id: string;
  fromStation: string;
  toStation: string;
  excluded: boolean;
  /** Null when the arc can enter no fit; `unusableReason` says why. */
  geometry: {
    latitude1Deg: number;
    latitude2Deg: number;
    sigmaLatitude1Arcsec: number;
    sigmaLatitude2Arcsec: number;
    heightM: number;
    heightSource: ArcHeightSource;
    reducedDistanceM: number;
    /** Propagated σ of the arc in metres (distance and both latitudes). */
    sigmaArcM: number;
    /** 1/σ² (propagated) or 1 (equal), for the rigorous model. */
    weightM: number;
    row: DegreeRow;
  } | null;
  unusableReason: string;
}

export function prepareArcs(
  arcs: readonly ArcReading[], stations: readonly Station[], latitudes: readonly StationLatitude[],
  kind: LatitudeKind, weighting: WeightingId, reference: Ellipsoid, excluded: ReadonlySet<string>,
): PreparedArc[] {
  const height = new Map(stations.map((s) => [s.code, s.heightM]));
  const lat = new Map(latitudes.map((l) => [l.code, l.byKind[kind]]));
  return arcs.map((arc): PreparedArc => {
    const base = { id: arc.id, fromStation: arc.fromStation, toStation: arc.toStation, excluded: excluded.has(arc.id) };
    const e1 = lat.get(arc.fromStation);
    const e2 = lat.get(arc.toStation);
    const missing = [e1 === undefined || e1.count === 0 ? arc.fromStation : null, e2 === undefined || e2.count === 0 ? arc.toStation : null]
      .filter((c): c is string => c !== null);
    if (missing.length > 0 || e1 === undefined || e2 === undefined) {
      return { ...base, geometry: null, unusableReason: `not in the fit: ${missing.join(' and ')} ${missing.length === 1 ? 'has' : 'have'} no usable ${kind} latitude reading` };
    }
    if (Math.abs(e2.latitudeDeg - e1.latitudeDeg) < MIN_ARC_SPAN_DEG) {
      return { ...base, geometry: null, unusableReason: `not in the fit: ${arc.fromStation} and ${arc.toStation} are at the same latitude (Δφ below ${MIN_ARC_SPAN_DEG}°), not a meridian arc` };
    }
    const mid = (e1.latitudeDeg + e2.latitudeDeg) / 2;
    const h = arcMeanHeight(arc.meanHeightM, height.get(arc.fromStation), height.get(arc.toStation));
    const reduced = reduceArcToEllipsoid(arc.distanceM, h.heightM, meridianRadiusM(reference, mid));
    const m1 = meridianRadiusM(reference, e1.latitudeDeg) * e1.standardErrorArcsec * ARCSEC_TO_RAD;
    const m2 = meridianRadiusM(reference, e2.latitudeDeg) * e2.standardErrorArcsec * ARCSEC_TO_RAD;
    const sigmaArcM = Math.sqrt(arc.sigmaM * arc.sigmaM + m1 * m1 + m2 * m2);
    const row = degreeRow({
      id: arc.id, latitude1Deg: e1.latitudeDeg, latitude2Deg: e2.latitudeDeg,
      sigmaLatitude1Arcsec: e1.standardErrorArcsec, sigmaLatitude2Arcsec: e2.standardErrorArcsec,
      reducedDistanceM: reduced, sigmaM: arc.sigmaM,
    }, weighting);
    return {
      ...base,
      geometry: {
        latitude1Deg: e1.latitudeDeg, latitude2Deg: e2.latitudeDeg,
        sigmaLatitude1Arcsec: e1.standardErrorArcsec, sigmaLatitude2Arcsec: e2.standardErrorArcsec,
        heightM: h.heightM, heightSource: h.source, reducedDistanceM: reduced, sigmaArcM,
        weightM: weighting === 'equal' ? 1 : 1 / (sigmaArcM * sigmaArcM), row,
      },
      unusableReason: '',
    };
  });
}
