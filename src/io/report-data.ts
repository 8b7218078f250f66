// Everything the campaign report shows, computed once from the records by the pure engines:
// the headline solve (the campaign's settings), the five estimators side by side (each with a
// seeded pairs bootstrap beside its analytic standard errors), least squares with the full arc
// covariance, the comparison against the reference ellipsoids, reliability, station sufficiency,
// the planner, and the data behind the charts. Pure (the time stamp is passed in), so the app's
// worker and the CLI produce the same report; a progress callback reports each stage.
import { ellipsoidById, meridianDistancePerUnitA, meridianRadiusPerUnitA } from '../geodesy/index.ts';
import { ESTIMATOR_IDS, type CampaignFile, type EstimatorId } from '../campaign/records.ts';
import type { CampaignResult } from '../campaign/result.ts';
import { solveCampaign } from '../campaign/solve-campaign.ts';
import { reduceStationLatitudes } from '../campaign/station-latitudes.ts';
import { prepareArcs } from '../campaign/prepare-arcs.ts';
import { degreeModelError, type ModelErrorStatement } from '../campaign/model-error.ts';
import { arcNetwork } from '../campaign/reliability-network.ts';
import { fitCorrelatedArcs, type CorrelatedFit } from '../campaign/reliability-gls.ts';
import { campaignReliability, type CampaignReliability } from '../campaign/reliability.ts';
import { compareWithEllipsoids, type EllipsoidComparison } from '../campaign/compare-ellipsoids.ts';
import { bootstrapFigure, DEFAULT_BOOTSTRAP_SEED, type BootstrapResult } from '../campaign/bootstrap.ts';
import { stationSufficiency, type StationSufficiency } from '../campaign/sufficiency.ts';
import { planCampaign, type CampaignPlan } from '../campaign/plan-next-station.ts';
import type { ArcResidual, CurvePoint, DegreePoint, StationRepeats } from './report-charts.ts';

/** Replicates per estimator in the report (the CLI's --replicates overrides): ±3.2 % Monte Carlo error on a standard error (1/√(2B)), about 15 s of CPU for the five estimators on the demo campaign. */
export const REPORT_BOOTSTRAP_REPLICATES = 500;
/** Two-sided 95 % normal quantile for the chart's band. */
export const Z95 = 1.959963984540054;
/** Points along the fitted curve. */
const CURVE_POINTS = 80;

export interface ReportOptions {
  /** RFC 3339 instant printed as the report's date (passed in: the report itself reads no clock). */
  generatedAt: string;
  replicates?: number;
  seed?: number;
  /** Candidate latitudes for the planner (default: 5° beyond the campaign's span each way, 1° step). */
  planRange?: { fromDeg: number; toDeg: number; stepDeg: number };
  targetSigmaArcsec?: number;
  onProgress?: (stage: string, done: number, total: number) => void;
}

export interface ReportData {
  file: CampaignFile;
  generatedAt: string;
  result: CampaignResult;
  estimators: { estimator: EstimatorId; result: CampaignResult; bootstrap: BootstrapResult }[];
  correlated: CorrelatedFit;
  comparison: EllipsoidComparison[];
  reliability: CampaignReliability;
  sufficiency: StationSufficiency[];
  plan: CampaignPlan;
  /** What the classic linear model would miss on these latitudes (shown even when the rigorous model is used). */
  linearModelError: ModelErrorStatement | null;
  chart: {
    degreePoints: DegreePoint[];
    curve: CurvePoint[];
    arcResiduals: ArcResidual[];
    repeats: StationRepeats[];
  };
  seed: number;
  replicates: number;
}

export function buildReportData(file: CampaignFile, options: ReportOptions): ReportData {
  const progress = options.onProgress ?? ((): void => undefined);
  const settings = file.settings ?? {};
  const solveOptions = { model: settings.model, estimator: settings.estimator, weighting: settings.weighting, suspectThreshold: settings.suspectThreshold, latitudeKind: settings.latitudeKind, referenceEllipsoid: settings.referenceEllipsoid };
  progress('fit', 0, 1);
  const result = solveCampaign(file, solveOptions);
  const replicates = options.replicates ?? REPORT_BOOTSTRAP_REPLICATES;
  const seed = options.seed ?? DEFAULT_BOOTSTRAP_SEED;

  const estimators = ESTIMATOR_IDS.map((estimator, k) => {
    const r = estimator === result.estimator ? result : solveCampaign(file, { ...solveOptions, estimator, previous: result });
    const bootstrap = bootstrapFigure(file, {
      model: result.model, estimator, weighting: result.weighting, latitudeKind: solveOptions.latitudeKind, referenceEllipsoid: solveOptions.referenceEllipsoid,
      replicates, seed, onProgress: (done, total) => progress(`bootstrap ${estimator}`, k * total + done, ESTIMATOR_IDS.length * total),
    });
    return { estimator, result: r, bootstrap };
  });

  progress('correlated least squares', 0, 1);
  const network = arcNetwork(file, { latitudeKind: solveOptions.latitudeKind, referenceEllipsoid: solveOptions.referenceEllipsoid });
  const correlated = fitCorrelatedArcs(network);
  const comparison = correlated.figure
    ? compareWithEllipsoids({ ...correlated.figure, covarianceAF: correlated.covariance })
    : result.figure ? compareWithEllipsoids(result.figure) : [];

  const reliability = campaignReliability(file, {
    model: result.model, estimator: result.estimator, latitudeKind: solveOptions.latitudeKind, referenceEllipsoid: solveOptions.referenceEllipsoid,
    onProgress: (done, total) => progress('reliability', done, total),
  });
  const sufficiency = stationSufficiency(file, { targetSigmaArcsec: options.targetSigmaArcsec, latitudeKind: network.kind });
  const lats = network.stations.map((s) => s.latitudeDeg);
  const planRange = options.planRange ?? (lats.length > 0
    ? { fromDeg: Math.max(-90, Math.floor(Math.min(...lats)) - 5), toDeg: Math.min(90, Math.ceil(Math.max(...lats)) + 5), stepDeg: 1 }
    : undefined);
  progress('planner', 0, 1);
  const plan = planCampaign(file, { latitudeKind: solveOptions.latitudeKind, referenceEllipsoid: solveOptions.referenceEllipsoid, ...(planRange ? { range: planRange } : {}) });

  // Chart data.
  const reference = ellipsoidById(solveOptions.referenceEllipsoid ?? 'wgs84');
  const excluded = new Set((file.exclusions ?? []).map((e) => e.readingId));
  const latitudes = reduceStationLatitudes(file.stations, file.latitudeReadings, { excludedIds: excluded, suspectThreshold: result.suspectThreshold });
  const prepared = prepareArcs(file.arcReadings, file.stations, latitudes, network.kind, result.weighting, reference, excluded)
    .filter((a) => a.geometry !== null)
    .sort((p, q) => (p.geometry?.row.midLatitudeDeg ?? 0) - (q.geometry?.row.midLatitudeDeg ?? 0));
  const readingById = new Map(result.readings.map((r) => [r.id, r]));
  const degreePoints: DegreePoint[] = prepared.map((a) => {
    const row = a.geometry?.row;
    const rr = readingById.get(a.id);
    const fitted = a.geometry ? fittedDegreeLength(correlated, a.geometry.latitude1Deg, a.geometry.latitude2Deg) : null;
    return {
      label: `${a.fromStation}–${a.toStation}`, x: row?.x ?? 0, y: row?.y ?? 0, sigmaY: row?.sigmaY ?? 0, suspect: rr?.suspect ?? false, excluded: a.excluded,
      fittedY: fitted?.y ?? null, fittedHalfWidth95: fitted ? Z95 * fitted.sd : null,
    };
  });
  const arcResiduals: ArcResidual[] = prepared.map((a) => {
    const rr = readingById.get(a.id);
    return { label: `${a.fromStation}–${a.toStation}`, z: rr?.standardizedResidual ?? 0, suspect: rr?.suspect ?? false, excluded: a.excluded };
  });
  const curve = fittedCurve(correlated, prepared.map((a) => a.geometry?.row.midLatitudeDeg ?? 0));
  const repeats: StationRepeats[] = file.stations.map((s) => ({
    code: s.code,
    readings: file.latitudeReadings.filter((r) => r.station === s.code && r.kind === network.kind).map((r) => {
      const rr = readingById.get(r.id);
      return { id: r.id, residualArcsec: rr?.residual ?? 0, suspect: rr?.suspect ?? false, excluded: excluded.has(r.id) };
    }),
  })).filter((s) => s.readings.length > 0);

  const pairs = prepared.filter((a) => !a.excluded).map((a) => ({ latitude1Deg: a.geometry?.latitude1Deg ?? 0, latitude2Deg: a.geometry?.latitude2Deg ?? 0 }));
  const linearModelError = degreeModelError(pairs, 'degree', reference, reference.name);
  progress('done', 1, 1);
  return {
    file, generatedAt: options.generatedAt, result, estimators, correlated, comparison, reliability, sufficiency, plan, linearModelError,
    chart: { degreePoints, curve, arcResiduals, repeats }, seed, replicates,
  };
}

/**
 * The fitted figure's mean degree length over one arc, ŷ = a·|g(φ₂) − g(φ₁)|/|Δφ| (the quantity the
 * data points measure), with its standard error by the delta method (∂/∂f by a central difference,
 * step 1e-7).
 */
function fittedDegreeLength(fit: CorrelatedFit, lat1: number, lat2: number): { y: number; sd: number } | null {
  if (!fit.figure || !fit.covariance) return null;
  const a = fit.semiMajorAxisM;
  const f = fit.flattening;
  const C = fit.covariance;
  const dPhi = Math.abs(lat2 - lat1);
  const g = (ff: number): number => Math.abs(meridianDistancePerUnitA(ff, lat2) - meridianDistancePerUnitA(ff, lat1));
  const h = 1e-7;
  const ga = g(f) / dPhi;
  const gf = (a * (g(f + h) - g(f - h))) / (2 * h) / dPhi;
  return { y: a * ga, sd: Math.sqrt(Math.max(0, ga * ga * C[0] + 2 * ga * gf * C[1] + gf * gf * C[3])) };
}

/**
 * Degree length of the correlated least-squares figure, M(φ)·π/180, over the campaign's mid
 * latitudes, with its 95 % band by the delta method: var y = gᵀCg, g = (∂y/∂a, ∂y/∂f); y is linear
 * in a, and ∂y/∂f is a central difference (step 1e-7: truncation O(h²) ≈ 1e-14 relative).
 */
function fittedCurve(fit: CorrelatedFit, midLatitudesDeg: readonly number[]): CurvePoint[] {
  if (!fit.figure || !fit.covariance || midLatitudesDeg.length === 0) return [];
  const a = fit.semiMajorAxisM;
  const f = fit.flattening;
  const C = fit.covariance;
  const lo = Math.min(...midLatitudesDeg);
  const hi = Math.max(...midLatitudesDeg);
  const h = 1e-7;
  const perDeg = Math.PI / 180;
  const out: CurvePoint[] = [];
  for (let k = 0; k <= CURVE_POINTS; k++) {
    const phi = lo + ((hi - lo) * k) / CURVE_POINTS;
    const mu = meridianRadiusPerUnitA(f, phi);
    const y = a * mu * perDeg;
    const ga = mu * perDeg;
    const gf = a * perDeg * (meridianRadiusPerUnitA(f + h, phi) - meridianRadiusPerUnitA(f - h, phi)) / (2 * h);
    const sd = Math.sqrt(Math.max(0, ga * ga * C[0] + 2 * ga * gf * C[1] + gf * gf * C[3]));
    const s = Math.sin(phi * perDeg);
    out.push({ x: s * s, y, lower: y - Z95 * sd, upper: y + Z95 * sd });
  }
  return out;
}
