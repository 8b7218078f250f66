// The shape of `solveCampaign`'s result: what the CLI prints with --json, what the app's live fit
// shows and what the report renders. Every numeric field carries its unit in its name.
import type { EstimatorId, LatitudeKind, ModelId, WeightingId } from './records.ts';

/** Why a solve did not give a figure, or gave one with a caveat. `ok` means a usable result. */
export type SolveStatus =
  | 'ok'
  | 'too-few-arcs'        // fewer arcs than model parameters (n < p)
  | 'one-latitude'        // every arc at the same mid latitude: the slope is undetermined
  | 'rank-deficient'      // design numerically rank deficient (scaled tolerance)
  | 'not-converged';      // an iterative estimator stopped at its cap; numbers shown with a warning

export interface Coefficient {
  /** `c`, `m`, `k` for the degree models (metres per degree); `a` (m) and `inverseFlattening` for `ellipsoid`. */
  name: string;
  value: number;
  standardError: number | null;
  unit: string;
}

export interface Figure {
  semiMajorAxisM: number;
  semiMajorAxisStdM: number | null;
  flattening: number;
  inverseFlattening: number;
  inverseFlatteningStd: number | null;
  eccentricitySquared: number;
  quadrantM: number;
  quadrantStdM: number | null;
  /** How (a, f) were obtained from the coefficients, e.g. "second-order inversion of (c, m)". */
  inversion: string;
}

export interface ReadingResult {
  /** The reading id from the file or store. Arc readings carry the fit residual; latitude readings their within-station residual. */
  id: string;
  kind: 'arc' | 'latitude';
  /** Residual in the reading's own unit: metres per degree for arcs in the degree models, metres for `ellipsoid`, arcseconds for latitude readings. */
  residual: number;
  residualUnit: string;
  standardizedResidual: number;
  suspect: boolean;
  excluded: boolean;
  /** Plain words for the crew, e.g. "re-observe K07: +4.8σ". Empty when nothing to do. */
  hint: string;
  /** Least squares only: redundancy number, Baarda w statistic, minimal detectable bias (reading unit). */
  redundancy?: number;
  wTest?: number;
  minimalDetectableBias?: number;
  /** False when the reading could not enter the fit (e.g. an arc whose station has no latitude of the
   *  chosen kind); its residual and standardized residual are then 0 and the hint says why. */
  usedInFit?: boolean;
  /** The station a latitude reading belongs to, or the arc's two stations "K04–K05". */
  station?: string;
}

export interface StationSummary {
  code: string;
  /** Station latitude used in the fit (robust mean of its readings of the chosen kind). */
  latitudeDeg: number;
  sigmaArcsec: number;
  kind: LatitudeKind;
  readingCount: number;
  /** Spread of the repeats (robust scale), arcseconds. */
  spreadArcsec: number;
  /** Astronomic minus geodetic latitude, arcseconds, when both kinds exist (north–south deflection). */
  deflectionNorthArcsec: number | null;
  suspectReadingIds: string[];
  /** σ of the deflection, arcseconds (both kinds' standard errors combined). */
  deflectionNorthStdArcsec?: number | null;
  /** False when the station has no reading of the kind that feeds the fit (then `kind` is the other one). */
  usedInFit?: boolean;
}

export interface FitQuality {
  rms: number;
  mad: number;
  maxAbsResidual: number;
  unit: string;
  /** Variance factor σ₀² and the global χ² test (least squares; null otherwise). */
  varianceFactor: number | null;
  chiSquare: { statistic: number; degreesOfFreedom: number; pValue: number; passes: boolean } | null;
}

export interface CampaignResult {
  engineVersion: string;
  status: SolveStatus;
  /** Human-readable explanation of `status` (and of any caveat when `ok`). */
  statusMessage: string;
  model: ModelId;
  estimator: EstimatorId;
  weighting: WeightingId;
  objective: number;
  converged: boolean;
  iterations: number;
  reason: string;
  coefficients: Coefficient[];
  figure: Figure | null;
  stations: StationSummary[];
  readings: ReadingResult[];
  quality: FitQuality;
  /** For the degree models: the size of the e⁴ approximation error, in words and metres per degree. */
  modelError: { statement: string; maxMetresPerDegree: number } | null;
  suspectThreshold: number;
}

export interface SolveOptions {
  model?: ModelId;            // default 'ellipsoid' (the rigorous fit)
  estimator?: EstimatorId;    // default 'least-squares'
  weighting?: WeightingId;    // default 'propagated'
  suspectThreshold?: number;  // default 3 (common practice)
  /** The previous result for this campaign: warm start for the iterative and exact estimators. */
  previous?: CampaignResult;
  /** Which latitude kind feeds the arcs; default astronomic (astro-geodetic arcs use astronomic latitudes). */
  latitudeKind?: LatitudeKind;
  /** Reference ellipsoid id for the reductions (meridian radius, model-error statement); default wgs84 (WGS 84). */
  referenceEllipsoid?: string;
}
