// solveCampaign: records in, one complete result out — station latitudes, reduced arcs, the fit of
// the chosen model and estimator, the derived figure with uncertainties, every reading's residual,
// standardized residual, suspect flag and hint, fit quality and the model-error statement.
// Pure: no I/O, no clock, no randomness. Data-dependent outcomes are a `status`, never a throw;
// unknown option values (a programmer or schema error) throw InputError.
//
// Order of the degenerate checks: every station at one latitude → 'one-latitude'; fewer arcs in
// the fit than parameters → 'too-few-arcs'; all arcs at one value of sin²φ_mid → 'one-latitude'
// (the slope, or f, is undetermined); otherwise the fit layer's 'rank-deficient' (scaled pivot
// test) or 'not-converged' (iteration cap; numbers shown with the warning).
import { ellipsoidById, meridianDistancePerUnitA } from '../geodesy/index.ts';
import { chiSquareUpperTail, leastSquaresDiagnostics } from '../fit/index.ts';
import type { FitResult, LinearProblem } from '../fit/types.ts';
import { InputError } from '../errors.ts';
import { ENGINE_VERSION } from './engine-version.ts';
import {
  ESTIMATOR_IDS, LATITUDE_KINDS, MODEL_IDS, WEIGHTING_IDS,
  type CampaignRecords, type EstimatorId, type LatitudeKind, type ModelId, type WeightingId,
} from './records.ts';
import type { CampaignResult, Coefficient, Figure, FitQuality, ReadingResult, SolveOptions, SolveStatus, StationSummary } from './result.ts';
import { reduceStationLatitudes, type StationLatitude } from './station-latitudes.ts';
import { MIN_ARC_SPAN_DEG, prepareArcs, type PreparedArc } from './prepare-arcs.ts';
import { fitEllipsoidToArcs } from './rigorous-fit.ts';
import { DEGREE_COEFFICIENT_NAMES, fitDegreeModel } from './degree-model.ts';
import { degreeFigure, ellipsoidFigure } from './figure-uncertainty.ts';
import { degreeModelError } from './model-error.ts';
import { flagResiduals } from './residual-flags.ts';
import { formatSigma } from './format-sigma.ts';

export const DEFAULT_SUSPECT_THRESHOLD = 3;
export const DEFAULT_REFERENCE_ELLIPSOID = 'wgs84';
/** Two arcs are "at one latitude" when their sin²φ_mid differ by less than this (≈ 0.02″ of latitude). */
export const SAME_X_TOLERANCE = 1e-9;
/** Significance of the global χ² test (upper tail): α = 5 %, common practice in network adjustment. */
export const CHI_SQUARE_ALPHA = 0.05;

function pick<T extends string>(field: string, value: T | undefined, fallback: T | undefined, allowed: readonly T[], dflt: T): T {
  const v = value ?? fallback ?? dflt;
  if (!allowed.includes(v)) throw new InputError(field, v, `must be one of ${allowed.join(', ')}`);
  return v;
}

interface FitOutcome {
  status: SolveStatus;
  message: string;
  coefficients: Coefficient[];
  figure: Figure | null;
  /** Residual and weight of every prepared arc that has geometry (null otherwise). */
  residualOf: (arc: PreparedArc) => number;
  weightOf: (arc: PreparedArc) => number;
  problem: LinearProblem | null;
  fit: FitResult | null;
  objective: number;
  iterations: number;
  converged: boolean;
  reason: string;
  p: number;
}

const finiteOrNull = (v: number | null | undefined): number | null => (v !== null && v !== undefined && Number.isFinite(v) ? v : null);

function runFit(model: ModelId, estimator: EstimatorId, inFit: PreparedArc[], previous: CampaignResult | undefined): FitOutcome {
  const empty = { coefficients: [] as Coefficient[], figure: null, problem: null, fit: null, objective: 0, iterations: 0, converged: false } as const;
  const p = model === 'degree2' ? 3 : 2;
  const geo = inFit.map((a) => a.geometry).filter((g) => g !== null);
  if (model === 'ellipsoid') {
    const r = fitEllipsoidToArcs(inFit.map((a, i) => ({
      id: a.id, latitude1Deg: geo[i].latitude1Deg, latitude2Deg: geo[i].latitude2Deg, distanceM: geo[i].reducedDistanceM, weight: geo[i].weightM,
    })), estimator, { warmStart: warmStartF(previous, model, estimator) });
    if (r.status === 'too-few-rows' || r.status === 'rank-deficient') {
      return { ...empty, status: r.status === 'too-few-rows' ? 'too-few-arcs' : 'rank-deficient', message: r.reason, residualOf: () => 0, weightOf: () => 1, reason: r.reason, p };
    }
    const { semiMajorAxisM: a, flattening: f } = r;
    const cov = r.covariance;
    const figure = ellipsoidFigure(a, f, cov);
    const coefficients: Coefficient[] = [
      { name: 'a', value: a, standardError: finiteOrNull(figure.semiMajorAxisStdM), unit: 'm' },
      { name: 'inverseFlattening', value: 1 / f, standardError: finiteOrNull(figure.inverseFlatteningStd), unit: '' },
    ];
    return {
      status: r.status === 'not-converged' ? 'not-converged' : 'ok',
      message: r.status === 'not-converged' ? `the search for f did not converge: ${r.reason}` : '',
      coefficients, figure,
      residualOf: (arc) => {
        const g = arc.geometry;
        if (!g) return 0;
        return g.reducedDistanceM - a * Math.abs(meridianDistancePerUnitA(f, g.latitude2Deg) - meridianDistancePerUnitA(f, g.latitude1Deg));
      },
      weightOf: (arc) => arc.geometry?.weightM ?? 1,
      problem: r.linearizedProblem, fit: r.linearized,
      objective: r.objective, iterations: r.iterations, converged: r.converged, reason: r.reason, p,
    };
  }
  const rows = geo.map((g) => g.row);
  const warm = previous && previous.model === model && previous.estimator === estimator && previous.status === 'ok' &&
    previous.coefficients.length === p ? Float64Array.from(previous.coefficients, (c) => c.value) : undefined;
  const { problem, fit } = fitDegreeModel(rows, model, estimator, warm ? { warmStart: { coefficients: warm } } : {});
  if (fit.status === 'too-few-rows' || fit.status === 'rank-deficient') {
    return { ...empty, status: fit.status === 'too-few-rows' ? 'too-few-arcs' : 'rank-deficient', message: fit.reason, residualOf: () => 0, weightOf: () => 1, reason: fit.reason, p };
  }
  const beta = Array.from(fit.coefficients);
  const cov = fit.covariance && fit.covariance.every(Number.isFinite) ? fit.covariance : null;
  const figure = degreeFigure(beta, cov, rows);
  const names = DEGREE_COEFFICIENT_NAMES[model];
  const coefficients: Coefficient[] = names.map((name, j) => ({
    name, value: beta[j], standardError: cov ? finiteOrNull(Math.sqrt(cov[j * p + j])) : null, unit: 'm/degree',
  }));
  return {
    status: fit.converged ? 'ok' : 'not-converged',
    message: fit.converged ? '' : `the ${estimator} iteration did not converge: ${fit.reason}`,
    coefficients, figure,
    residualOf: (arc) => {
      const row = arc.geometry?.row;
      if (!row) return 0;
      return row.y - (beta[0] + beta[1] * row.x + (p === 3 ? beta[2] * row.x * row.x : 0));
    },
    weightOf: (arc) => arc.geometry?.row.weight ?? 1,
    problem, fit,
    objective: fit.objective, iterations: fit.iterations, converged: fit.converged, reason: fit.reason, p,
  };
}

/** f and σ_f of a previous ellipsoid result with the same estimator, for the warm start. */
function warmStartF(previous: CampaignResult | undefined, model: ModelId, estimator: EstimatorId): { f: number; sigmaF: number } | undefined {
  const fig = previous?.figure;
  if (!previous || !fig || previous.model !== model || previous.estimator !== estimator || previous.status !== 'ok') return undefined;
  const sigmaF = fig.inverseFlatteningStd !== null ? fig.inverseFlatteningStd * fig.flattening * fig.flattening : Math.abs(fig.flattening) * 1e-2;
  return { f: fig.flattening, sigmaF };
}

function stationSummaries(latitudes: readonly StationLatitude[], kind: LatitudeKind): StationSummary[] {
  return latitudes.map((s) => {
    const chosen = s.byKind[kind];
    const other = s.byKind[kind === 'astronomic' ? 'geodetic' : 'astronomic'];
    const usedInFit = chosen !== undefined && chosen.count > 0;
    const est = usedInFit ? chosen : (other ?? chosen);
    return {
      code: s.code,
      latitudeDeg: est?.latitudeDeg ?? 0,
      sigmaArcsec: est?.standardErrorArcsec ?? 0,
      kind: est?.kind ?? kind,
      readingCount: est?.count ?? 0,
      spreadArcsec: est?.spreadArcsec ?? 0,
      deflectionNorthArcsec: s.deflectionNorthArcsec,
      deflectionNorthStdArcsec: s.deflectionNorthStdArcsec,
      suspectReadingIds: LATITUDE_KINDS.flatMap((k) => s.byKind[k]?.readings.filter((r) => r.suspect).map((r) => r.id) ?? []),
      usedInFit,
    };
  });
}

function latitudeReadingResults(latitudes: readonly StationLatitude[], order: readonly string[]): ReadingResult[] {
  const byId = new Map<string, ReadingResult>();
  for (const s of latitudes) {
    for (const k of LATITUDE_KINDS) {
      for (const r of s.byKind[k]?.readings ?? []) {
        byId.set(r.id, {
          id: r.id, kind: 'latitude', residual: r.residualArcsec, residualUnit: 'arcsec',
          standardizedResidual: r.standardizedResidual, suspect: r.suspect, excluded: r.excluded, hint: r.hint,
          usedInFit: !r.excluded, station: s.code,
        });
      }
    }
  }
  return order.map((id) => byId.get(id)).filter((r): r is ReadingResult => r !== undefined);
}

function quality(residuals: readonly number[], whitened: readonly number[], unit: string, outcome: FitOutcome, weighting: WeightingId, estimator: EstimatorId): FitQuality {
  const n = residuals.length;
  if (n === 0) return { rms: 0, mad: 0, maxAbsResidual: 0, unit, varianceFactor: null, chiSquare: null };
  const rms = Math.sqrt(residuals.reduce((s, r) => s + r * r, 0) / n);
  const sorted = [...residuals].sort((x, y) => x - y);
  const med = n % 2 ? sorted[(n - 1) / 2] : (sorted[n / 2 - 1] + sorted[n / 2]) / 2;
  const dev = residuals.map((r) => Math.abs(r - med)).sort((x, y) => x - y);
  const mad = n % 2 ? dev[(n - 1) / 2] : (dev[n / 2 - 1] + dev[n / 2]) / 2;
  const maxAbsResidual = Math.max(...residuals.map(Math.abs));
  const dof = n - outcome.p;
  let varianceFactor: number | null = null;
  let chiSquare: FitQuality['chiSquare'] = null;
  if (estimator === 'least-squares' && dof > 0) {
    const statistic = whitened.reduce((s, z) => s + z * z, 0);
    varianceFactor = statistic / dof;
    // The global test needs a-priori sigmas; with equal weights σ₀² is only the residual variance.
    if (weighting === 'propagated') {
      const pValue = chiSquareUpperTail(statistic, dof);
      chiSquare = { statistic, degreesOfFreedom: dof, pValue, passes: pValue >= CHI_SQUARE_ALPHA };
    }
  }
  return { rms, mad, maxAbsResidual, unit, varianceFactor, chiSquare };
}

export function solveCampaign(records: CampaignRecords, options: SolveOptions = {}): CampaignResult {
  const settings = records.settings ?? {};
  const model = pick('model', options.model, settings.model, MODEL_IDS, 'ellipsoid');
  const estimator = pick('estimator', options.estimator, settings.estimator, ESTIMATOR_IDS, 'least-squares');
  const weighting = pick('weighting', options.weighting, settings.weighting, WEIGHTING_IDS, 'propagated');
  const kind = pick('latitudeKind', options.latitudeKind, settings.latitudeKind, LATITUDE_KINDS, 'astronomic');
  const threshold = options.suspectThreshold ?? settings.suspectThreshold ?? DEFAULT_SUSPECT_THRESHOLD;
  if (!Number.isFinite(threshold) || threshold <= 0) throw new InputError('suspectThreshold', threshold, 'must be a finite number > 0');
  const referenceId = options.referenceEllipsoid ?? settings.referenceEllipsoid ?? DEFAULT_REFERENCE_ELLIPSOID;
  const reference = ellipsoidById(referenceId);

  const excluded = new Set((records.exclusions ?? []).map((e) => e.readingId));
  const latitudes = reduceStationLatitudes(records.stations, records.latitudeReadings, { excludedIds: excluded, suspectThreshold: threshold });
  const arcs = prepareArcs(records.arcReadings, records.stations, latitudes, kind, weighting, reference, excluded);
  const inFit = arcs.filter((a) => a.geometry !== null && !a.excluded);
  const p = model === 'degree2' ? 3 : 2;

  // Degenerate campaigns: a status and a plain explanation, no fit.
  const stationLats = latitudes.map((s) => s.byKind[kind]).filter((e) => e !== undefined && e.count > 0).map((e) => e?.latitudeDeg ?? 0);
  const xs = inFit.map((a) => a.geometry?.row.x ?? 0);
  let early: { status: SolveStatus; message: string } | null = null;
  if (stationLats.length >= 2 && Math.max(...stationLats) - Math.min(...stationLats) < MIN_ARC_SPAN_DEG) {
    early = { status: 'one-latitude', message: `every station with a ${kind} latitude is at the same latitude: the arcs measure nothing along the meridian` };
  } else if (inFit.length < p) {
    early = { status: 'too-few-arcs', message: `${inFit.length} arc${inFit.length === 1 ? '' : 's'} in the fit for the ${p} parameters of the ${model} model; observe more arcs (or give their stations ${kind} latitudes)` };
  } else if (Math.max(...xs) - Math.min(...xs) < SAME_X_TOLERANCE) {
    early = { status: 'one-latitude', message: `every arc in the fit is centred on the same latitude (sin²φ equal): the change of degree length with latitude, hence the flattening, is undetermined; observe arcs at other latitudes` };
  }
  const outcome: FitOutcome = early
    ? { ...early, coefficients: [], figure: null, residualOf: () => 0, weightOf: () => 1, problem: null, fit: null, objective: 0, iterations: 0, converged: false, reason: early.message, p }
    : runFit(model, estimator, inFit, options.previous);
  const fitted = outcome.figure !== null;

  // Arc residuals (excluded arcs too, against the fit they did not enter), flags and hints.
  const withGeometry = arcs.map((a) => a.geometry !== null);
  const residuals = arcs.map((a) => (fitted && a.geometry ? outcome.residualOf(a) : 0));
  const weights = arcs.map((a) => outcome.weightOf(a));
  const flags = flagResiduals(residuals, weights, arcs.map((a, i) => withGeometry[i] && !a.excluded), weighting, threshold);
  const diag = fitted && estimator === 'least-squares' && outcome.problem && outcome.fit && outcome.problem.n > outcome.problem.p
    ? leastSquaresDiagnostics(outcome.problem, outcome.fit) : null;
  const unit = model === 'ellipsoid' ? 'm' : 'm/degree';
  let fitIndex = 0;
  const arcResults: ReadingResult[] = arcs.map((a, i) => {
    const used = fitted && withGeometry[i] && !a.excluded;
    const z = fitted && withGeometry[i] ? flags.standardized[i] : 0;
    const suspect = fitted && withGeometry[i] && flags.suspect[i];
    const label = `${a.fromStation}–${a.toStation}`;
    let hint = '';
    if (!withGeometry[i]) hint = a.unusableReason;
    else if (a.excluded) hint = fitted && !suspect ? `excluded, but fits arc ${label} (${formatSigma(z)}): consider restoring ${a.id}` : '';
    else if (suspect) hint = `re-observe arc ${label}: ${formatSigma(z)}`;
    const result: ReadingResult = {
      id: a.id, kind: 'arc', residual: residuals[i], residualUnit: unit, standardizedResidual: z,
      suspect, excluded: a.excluded, hint, usedInFit: used, station: label,
    };
    if (used && diag) {
      result.redundancy = finiteOrNull(diag.redundancy[fitIndex]) ?? undefined;
      result.wTest = finiteOrNull(diag.wTest[fitIndex]) ?? undefined;
      result.minimalDetectableBias = finiteOrNull(diag.minimalDetectableBias[fitIndex]) ?? undefined;
    }
    if (withGeometry[i] && !a.excluded) fitIndex++;
    return result;
  });

  const usedResiduals = arcResults.filter((r) => r.usedInFit).map((r) => r.residual);
  const usedWhitened = arcs.map((_, i) => residuals[i] * Math.sqrt(weights[i])).filter((_, i) => arcResults[i].usedInFit);
  const readings = [...latitudeReadingResults(latitudes, records.latitudeReadings.map((r) => r.id)), ...arcResults];
  const modelError = model !== 'ellipsoid' && fitted
    ? degreeModelError(inFit.map((a) => ({ latitude1Deg: a.geometry?.latitude1Deg ?? 0, latitude2Deg: a.geometry?.latitude2Deg ?? 0 })), model, reference, reference.name)
    : null;

  const notes = [outcome.message];
  if (fitted && flags.note) notes.push(flags.note);
  const unusable = arcs.filter((a) => a.geometry === null).length;
  if (unusable > 0) notes.push(`${unusable} arc${unusable === 1 ? '' : 's'} could not enter the fit (see their hints)`);
  if (fitted && inFit.length === p) notes.push('as many arcs as parameters: an exact fit, with no redundancy to estimate uncertainties or flag readings');
  if (fitted && outcome.figure && outcome.figure.semiMajorAxisStdM === null && inFit.length > p) {
    notes.push(`the ${estimator} estimator gives no covariance here: uncertainties of the figure are not available yet`);
  }
  const statusMessage = notes.filter((s) => s !== '').join('; ');
  return {
    engineVersion: ENGINE_VERSION,
    status: outcome.status,
    statusMessage,
    model, estimator, weighting,
    objective: Number.isFinite(outcome.objective) ? outcome.objective : 0,
    converged: outcome.converged,
    iterations: outcome.iterations,
    reason: outcome.reason,
    coefficients: outcome.coefficients,
    figure: outcome.figure,
    stations: stationSummaries(latitudes, kind),
    readings,
    quality: fitted ? quality(usedResiduals, usedWhitened, unit, outcome, weighting, estimator) : { rms: 0, mad: 0, maxAbsResidual: 0, unit, varianceFactor: null, chiSquare: null },
    modelError,
    suspectThreshold: threshold,
  };
}
