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
import { ellipsoidById } from '../geodesy/index.ts';
import { chiSquareUpperTail, leastSquaresDiagnostics } from '../fit/index.ts';
import type { FitResult, LinearProblem } from '../fit/types.ts';
import { InputError } from '../errors.ts';
import { ENGINE_VERSION } from './engine-version.ts';
import {
  ESTIMATOR_IDS, LATITUDE_KINDS, MODEL_IDS, WEIGHTING_IDS,
  type CampaignRecords, type EstimatorId, type LatitudeKind, type ModelId, type WeightingId,
} from './records.ts';
import type { CampaignResult, FitQuality, ReadingResult, SolveOptions, SolveStatus, StationSummary } from './result.ts';
import { reduceStationLatitudes, type StationLatitude } from './station-latitudes.ts';
import { MIN_ARC_SPAN_DEG, prepareArcs, type PreparedArc } from './prepare-arcs.ts';
import { fitEllipsoidToArcs } from './rigorous-fit.ts';
import { fitDegreeModel } from './degree-model.ts';
import { degreeFigure, ellipsoidFigure } from './figure-uncertainty.ts';
import { degreeModelError } from './model-error.ts';
import { flagResiduals } from './residual-flags.ts';
import { formatSigma } from './format-sigma.ts';
import { networkFromReductions, type ArcNetwork } from './reliability-network.ts';
import { glsDegreeOutcome, glsEllipsoidOutcome } from './correlated-fit.ts';
import {
  degreeCoefficients, degreeResidual, ellipsoidCoefficients, ellipsoidResidual, finiteOrNull, noFit, type ArcFitNumbers, type FitOutcome,
} from './fit-outcome.ts';

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

/** Any station used by two or more arcs in the fit: their rows are then correlated. */
function sharesStation(inFit: readonly PreparedArc[]): boolean {
  const seen = new Set<string>();
  for (const a of inFit) {
    for (const code of [a.fromStation, a.toStation]) {
      if (seen.has(code)) return true;
      seen.add(code);
    }
  }
  return false;
}

/**
 * The fit of the chosen model and estimator. Least squares under `propagated` weights is the
 * generalised least squares with the full covariance of the arcs (correlated-fit.ts), started for
 * the rigorous model from the independent-rows fit below; everything else is the independent-rows
 * fit (robust estimators are not whitened: see DEVELOPERS.md "Correlated arcs").
 */
function runFit(
  model: ModelId, estimator: EstimatorId, weighting: WeightingId, inFit: PreparedArc[], network: () => ArcNetwork, previous: CampaignResult | undefined,
): FitOutcome {
  const independent = runIndependentFit(model, estimator, inFit, previous);
  const correlated = sharesStation(inFit);
  if (weighting !== 'propagated') return independent;
  if (estimator !== 'least-squares') {
    return correlated
      ? { ...independent, note: `the ${estimator} fit treats arcs that share a station as independent (a robust fit is not whitened with the full arc covariance, which would smear a blunder over the neighbouring arcs)` }
      : independent;
  }
  if (independent.figure === null || independent.status === 'too-few-arcs' || independent.status === 'rank-deficient') return independent;
  // Gauss–Newton needs a converged start (the independent-rows search did not find an optimum).
  if (model === 'ellipsoid' && independent.status !== 'ok') {
    return { ...independent, note: 'with no converged start the generalised least squares was not run: the arcs are treated as independent' };
  }
  const net = network();
  if (net.arcs.length !== inFit.length) throw new InputError('network', net.arcs.length, `must hold the ${inFit.length} arcs in the fit`);
  const gls = model === 'ellipsoid'
    ? glsEllipsoidOutcome(net, { semiMajorAxisM: independent.figure.semiMajorAxisM, flattening: independent.figure.flattening }, independent.iterations, independent.reason)
    : glsDegreeOutcome(net, inFit, model);
  if ('fallback' in gls) return { ...independent, note: `${gls.fallback}: the arcs are treated as independent, so the standard errors ignore their shared stations` };
  return gls;
}

function runIndependentFit(model: ModelId, estimator: EstimatorId, inFit: PreparedArc[], previous: CampaignResult | undefined): FitOutcome {
  const p = model === 'degree2' ? 3 : 2;
  const geo = inFit.map((a) => a.geometry).filter((g) => g !== null);
  let problem: LinearProblem;
  let fit: FitResult;
  let outcome: FitOutcome;
  if (model === 'ellipsoid') {
    const r = fitEllipsoidToArcs(inFit.map((a, i) => ({
      id: a.id, latitude1Deg: geo[i].latitude1Deg, latitude2Deg: geo[i].latitude2Deg, distanceM: geo[i].reducedDistanceM, weight: geo[i].weightM,
    })), estimator, { warmStart: warmStartF(previous, model, estimator) });
    if (r.status === 'too-few-rows' || r.status === 'rank-deficient') return noFit(r.status === 'too-few-rows' ? 'too-few-arcs' : 'rank-deficient', r.reason, p);
    const { semiMajorAxisM: a, flattening: f } = r;
    const figure = ellipsoidFigure(a, f, r.covariance);
    problem = r.linearizedProblem;
    fit = r.linearized;
    outcome = {
      status: r.status === 'not-converged' ? 'not-converged' : 'ok',
      message: r.status === 'not-converged' ? `the search for f did not converge: ${r.reason}` : '',
      coefficients: ellipsoidCoefficients(figure), figure,
      residualOf: ellipsoidResidual(a, f),
      weightOf: (arc) => arc.geometry?.weightM ?? 1,
      arcNumbers: new Map(), quadraticForm: null,
      objective: r.objective, iterations: r.iterations, converged: r.converged, reason: r.reason, p, note: '',
    };
  } else {
    const rows = geo.map((g) => g.row);
    const warm = previous && previous.model === model && previous.estimator === estimator && previous.status === 'ok' &&
      previous.coefficients.length === p ? Float64Array.from(previous.coefficients, (c) => c.value) : undefined;
    ({ problem, fit } = fitDegreeModel(rows, model, estimator, warm ? { warmStart: { coefficients: warm } } : {}));
    if (fit.status === 'too-few-rows' || fit.status === 'rank-deficient') return noFit(fit.status === 'too-few-rows' ? 'too-few-arcs' : 'rank-deficient', fit.reason, p);
    const beta = Array.from(fit.coefficients);
    const cov = fit.covariance && fit.covariance.every(Number.isFinite) ? fit.covariance : null;
    outcome = {
      status: fit.converged ? 'ok' : 'not-converged',
      message: fit.converged ? '' : `the ${estimator} iteration did not converge: ${fit.reason}`,
      coefficients: degreeCoefficients(model, beta, cov), figure: degreeFigure(beta, cov, rows),
      residualOf: degreeResidual(beta),
      weightOf: (arc) => arc.geometry?.row.weight ?? 1,
      arcNumbers: new Map(), quadraticForm: null,
      objective: fit.objective, iterations: fit.iterations, converged: fit.converged, reason: fit.reason, p, note: '',
    };
  }
  // Independent rows: z = √w·r / scale with the row weight; least squares adds the diagonal-weight diagnostics.
  const diag = estimator === 'least-squares' && problem.n > problem.p ? leastSquaresDiagnostics(problem, fit) : null;
  let quadraticForm = 0;
  inFit.forEach((arc, k) => {
    const w = outcome.weightOf(arc);
    quadraticForm += w * outcome.residualOf(arc) ** 2;
    const numbers: ArcFitNumbers = { flagWeight: w, inScale: true };
    if (diag) {
      numbers.redundancy = finiteOrNull(diag.redundancy[k]) ?? undefined;
      numbers.wTest = finiteOrNull(diag.wTest[k]) ?? undefined;
      numbers.minimalDetectableBias = finiteOrNull(diag.minimalDetectableBias[k]) ?? undefined;
    }
    outcome.arcNumbers.set(arc.id, numbers);
  });
  if (estimator === 'least-squares') outcome.quadraticForm = quadraticForm;
  return outcome;
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

function quality(residuals: readonly number[], unit: string, outcome: FitOutcome, weighting: WeightingId, estimator: EstimatorId): FitQuality {
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
  if (estimator === 'least-squares' && dof > 0 && outcome.quadraticForm !== null) {
    // vᵀPv: Σwr² for independent rows, vᵀΣ⁻¹v for the generalised least squares.
    const statistic = outcome.quadraticForm;
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
  const network = (): ArcNetwork => networkFromReductions(records, latitudes, arcs, kind, reference, excluded);
  const outcome: FitOutcome = early ? noFit(early.status, early.message, p) : runFit(model, estimator, weighting, inFit, network, options.previous);
  const fitted = outcome.figure !== null;

  // Arc residuals (excluded arcs too, against the fit they did not enter), flags and hints.
  const withGeometry = arcs.map((a) => a.geometry !== null);
  const residuals = arcs.map((a) => (fitted && a.geometry ? outcome.residualOf(a) : 0));
  // Standardized by the fit's own rule (fit-outcome.ts ArcFitNumbers); excluded arcs by their row weight.
  const numbers = arcs.map((a, k) => (withGeometry[k] && !a.excluded ? outcome.arcNumbers.get(a.id) : undefined));
  const flagWeights = arcs.map((a, k) => numbers[k]?.flagWeight ?? outcome.weightOf(a));
  const flags = flagResiduals(residuals, flagWeights, arcs.map((a, k) => withGeometry[k] && !a.excluded && (numbers[k]?.inScale ?? true)), weighting, threshold);
  const unit = model === 'ellipsoid' ? 'm' : 'm/degree';
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
    const nums = numbers[i];
    if (used && nums) {
      if (nums.redundancy !== undefined) result.redundancy = nums.redundancy;
      if (nums.wTest !== undefined && Number.isFinite(nums.wTest)) result.wTest = nums.wTest;
      if (nums.minimalDetectableBias !== undefined && Number.isFinite(nums.minimalDetectableBias)) result.minimalDetectableBias = nums.minimalDetectableBias;
    }
    return result;
  });

  const usedResiduals = arcResults.filter((r) => r.usedInFit).map((r) => r.residual);
  const readings = [...latitudeReadingResults(latitudes, records.latitudeReadings.map((r) => r.id)), ...arcResults];
  const modelError = model !== 'ellipsoid' && fitted
    ? degreeModelError(inFit.map((a) => ({ latitude1Deg: a.geometry?.latitude1Deg ?? 0, latitude2Deg: a.geometry?.latitude2Deg ?? 0 })), model, reference, reference.name)
    : null;

  const notes = [outcome.message, outcome.note];
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
    quality: fitted ? quality(usedResiduals, unit, outcome, weighting, estimator) : { rms: 0, mad: 0, maxAbsResidual: 0, unit, varianceFactor: null, chiSquare: null },
    modelError,
    suspectThreshold: threshold,
  };
}
