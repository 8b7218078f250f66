// Seeded bootstrap of the figure for any estimator — the honest uncertainty of the robust ones,
// for which no closed-form covariance is trusted (L1 and minimax have none; Huber/Tukey only an
// asymptotic one).
//
// Method: the PAIRS (case) bootstrap over the arcs in the fit (Efron & Tibshirani, "An
// Introduction to the Bootstrap", 1993, §9.5 — from memory): each replicate draws n arcs with
// replacement from the n in the fit, each arc carrying its reduced distance, its station latitudes
// and its weight, refits with the same model and estimator, and derives (a, 1/f, quadrant) the
// same way as the campaign's own solve. Pairs rather than residuals because it needs no
// assumption that the errors are identically distributed or that the model is exact (the degree
// models are not), and a robust fit's residuals are not a sample of its errors. Limitations, said
// in the result: with few arcs the case bootstrap is noisy and tends to overstate the error; and
// arcs are resampled as independent cases, so the correlation between consecutive arcs through a
// shared station is not reproduced (least squares with the full covariance, reliability-gls.ts,
// is the answer for that).
//
// A replicate whose design cannot determine the figure (every drawn arc at one latitude) is
// redrawn and counted; iterative fits that stop at their cap are kept and counted.
// Percentiles: linear interpolation between order statistics (Hyndman & Fan 1996 type 7, R's default).
//
// Random numbers: mulberry32 through seededRandom (seeded-random.ts), used only to draw indices;
// the same seed always gives the same replicates on every platform.
//
// `method: 'parametric'` instead simulates each replicate from the campaign's own solution, one
// latitude error per station shared by its arcs and one distance error per arc at their a-priori
// sigmas (parametric-bootstrap.ts): that reproduces the shared-station correlation, and measures
// the spread the stated sigmas imply.
import { InputError } from '../errors.ts';
import { ellipsoidById } from '../geodesy/index.ts';
import type { CampaignRecords, EstimatorId, LatitudeKind, ModelId, WeightingId } from './records.ts';
import type { Figure } from './result.ts';
import { reduceStationLatitudes } from './station-latitudes.ts';
import { prepareArcs } from './prepare-arcs.ts';
import { fitEllipsoidToArcs, type ArcForFit } from './rigorous-fit.ts';
import { fitDegreeModel } from './degree-model.ts';
import { degreeFigure, ellipsoidFigure } from './figure-uncertainty.ts';
import type { DegreeRow } from './degree-rows.ts';
import { seededRandom } from './seeded-random.ts';
import { solveCampaign } from './solve-campaign.ts';
import { networkFromReductions } from './reliability-network.ts';
import { parametricSampler } from './parametric-bootstrap.ts';

export const DEFAULT_BOOTSTRAP_REPLICATES = 1000;
export const DEFAULT_BOOTSTRAP_SEED = 20260606;
export const MAX_BOOTSTRAP_REPLICATES = 100_000;
/** Redraws allowed for degenerate resamples, relative to the replicates asked for. */
export const MAX_REDRAW_FACTOR = 1;

export interface BootstrapOptions {
  model?: ModelId;
  estimator?: EstimatorId;
  weighting?: WeightingId;
  latitudeKind?: LatitudeKind;
  referenceEllipsoid?: string;
  replicates?: number;
  seed?: number;
  /** `pairs` (default): resample the arcs; `parametric`: simulate from the solution and the a-priori sigmas. */
  method?: BootstrapMethod;
  /** Called about every 1 % of the replicates and at the end (for the worker's progress bar). */
  onProgress?: (done: number, total: number) => void;
  /** Polled before each replicate; true stops early and returns what was done. */
  shouldStop?: () => boolean;
}

export type BootstrapMethod = 'pairs' | 'parametric';

export interface BootstrapSummary {
  /** The campaign's own estimate (the full data). */
  estimate: number;
  mean: number;
  /** Bootstrap standard error: standard deviation of the replicates (n − 1). */
  standardError: number;
  bias: number;
  /** 2.5 % and 97.5 % percentiles: the percentile 95 % interval. */
  lower95: number;
  upper95: number;
  /** The delta-method standard error of the campaign's own solve, for comparison (null where the estimator gives none). */
  analyticStandardError: number | null;
}

export interface BootstrapResult {
  method: BootstrapMethod;
  model: ModelId;
  estimator: EstimatorId;
  seed: number;
  requested: number;
  /** Replicates in the summaries. */
  replicates: number;
  /** Degenerate resamples redrawn. */
  redrawn: number;
  /** Replicates whose iterative fit stopped at its cap (kept). */
  notConverged: number;
  stoppedEarly: boolean;
  arcsInFit: number;
  semiMajorAxisM: BootstrapSummary | null;
  inverseFlattening: BootstrapSummary | null;
  quadrantM: BootstrapSummary | null;
  /** Why there is no summary, or a caveat (few arcs, correlation not reproduced). */
  note: string;
}

function percentile(sorted: readonly number[], q: number): number {
  const h = (sorted.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(sorted.length - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

function summarise(values: readonly number[], estimate: number, analytic: number | null): BootstrapSummary {
  const n = values.length;
  const mean = values.reduce((s, v) => s + v, 0) / n;
  const sd = Math.sqrt(values.reduce((s, v) => s + (v - mean) ** 2, 0) / Math.max(1, n - 1));
  const sorted = [...values].sort((x, y) => x - y);
  return { estimate, mean, standardError: sd, bias: mean - estimate, lower95: percentile(sorted, 0.025), upper95: percentile(sorted, 0.975), analyticStandardError: analytic };
}

/** The pairs bootstrap of the campaign's figure (see the file comment). Pure; deterministic for a seed. */
export function bootstrapFigure(records: CampaignRecords, options: BootstrapOptions = {}): BootstrapResult {
  const settings = records.settings ?? {};
  const model = options.model ?? settings.model ?? 'ellipsoid';
  const estimator = options.estimator ?? settings.estimator ?? 'least-squares';
  const weighting = options.weighting ?? settings.weighting ?? 'propagated';
  const kind = options.latitudeKind ?? settings.latitudeKind ?? 'astronomic';
  const reference = ellipsoidById(options.referenceEllipsoid ?? settings.referenceEllipsoid ?? 'wgs84');
  const requested = options.replicates ?? DEFAULT_BOOTSTRAP_REPLICATES;
  if (!Number.isInteger(requested) || requested < 2 || requested > MAX_BOOTSTRAP_REPLICATES) {
    throw new InputError('replicates', requested, `a whole number from 2 to ${MAX_BOOTSTRAP_REPLICATES}`);
  }
  const method = options.method ?? 'pairs';
  if (method !== 'pairs' && method !== 'parametric') throw new InputError('method', method, 'must be pairs or parametric');
  const seed = options.seed ?? DEFAULT_BOOTSTRAP_SEED;
  if (!Number.isInteger(seed) || seed < 0 || seed > 0xffffffff) throw new InputError('seed', seed, 'a whole number from 0 to 4294967295');

  const base = solveCampaign(records, { model, estimator, weighting, latitudeKind: kind, referenceEllipsoid: reference.id });
  const excluded = new Set((records.exclusions ?? []).map((e) => e.readingId));
  const latitudes = reduceStationLatitudes(records.stations, records.latitudeReadings, { excludedIds: excluded, suspectThreshold: settings.suspectThreshold });
  const arcs = prepareArcs(records.arcReadings, records.stations, latitudes, kind, weighting, reference, excluded)
    .filter((a) => a.geometry !== null && !a.excluded);
  const empty = (note: string): BootstrapResult => ({
    method, model, estimator, seed, requested, replicates: 0, redrawn: 0, notConverged: 0, stoppedEarly: false,
    arcsInFit: arcs.length, semiMajorAxisM: null, inverseFlattening: null, quadrantM: null, note,
  });
  const p = model === 'degree2' ? 3 : 2;
  if (!base.figure) return empty(`no figure to bootstrap: ${base.statusMessage}`);
  if (arcs.length <= p) return empty(`${arcs.length} arcs for ${p} parameters: resampling cannot vary an exact fit`);

  const forFit: ArcForFit[] = [];
  const rows: DegreeRow[] = [];
  for (const a of arcs) {
    const g = a.geometry;
    if (!g) continue;
    forFit.push({ id: a.id, latitude1Deg: g.latitude1Deg, latitude2Deg: g.latitude2Deg, distanceM: g.reducedDistanceM, weight: g.weightM });
    rows.push(g.row);
  }
  const n = forFit.length;
  const rng = seededRandom(seed);
  // Warm start for the rigorous model: replicates scatter by a few standard errors of f around the
  // full-data f, so a local bracket (rigorous-fit.ts widens to the full one when the optimum sits on
  // its edge) saves the 141-point grid of every replicate. σ_f from least squares of the full data.
  const ls = estimator === 'least-squares' ? base : solveCampaign(records, { model, estimator: 'least-squares', weighting, latitudeKind: kind, referenceEllipsoid: reference.id });
  const sigmaF = ls.figure?.inverseFlatteningStd !== null && ls.figure?.inverseFlatteningStd !== undefined ? ls.figure.inverseFlatteningStd * base.figure.flattening ** 2 : null;
  const warmStart = sigmaF !== null && sigmaF > 0 ? { f: base.figure.flattening, sigmaF } : undefined;
  const fitOnce = (idx: readonly number[]): { figure: Figure; converged: boolean } | null => {
    if (model === 'ellipsoid') {
      const r = fitEllipsoidToArcs(idx.map((i) => forFit[i]), estimator, warmStart ? { warmStart } : {});
      if (r.status === 'too-few-rows' || r.status === 'rank-deficient' || !Number.isFinite(r.flattening) || r.flattening === 0) return null;
      return { figure: ellipsoidFigure(r.semiMajorAxisM, r.flattening, null), converged: r.status !== 'not-converged' };
    }
    const sample = idx.map((i) => rows[i]);
    const { fit } = fitDegreeModel(sample, model, estimator);
    if (fit.status === 'too-few-rows' || fit.status === 'rank-deficient') return null;
    return { figure: degreeFigure(Array.from(fit.coefficients), null, sample), converged: fit.converged };
  };

  const aValues: number[] = [];
  const invValues: number[] = [];
  const qValues: number[] = [];
  let redrawn = 0;
  let notConverged = 0;
  let stoppedEarly = false;
  const every = Math.max(1, Math.floor(requested / 100));
  const distinct = new Set<number>();
  const simulate = method === 'parametric'
    ? parametricSampler(networkFromReductions(records, latitudes, arcs, kind, reference, excluded), base,
      { model, estimator, weighting, latitudeKind: kind, referenceEllipsoid: reference.id }, rng)
    : null;
  while (aValues.length < requested) {
    if (options.shouldStop?.()) { stoppedEarly = true; break; }
    let out: ReturnType<typeof fitOnce>;
    if (simulate) {
      out = simulate();
    } else {
      const idx = Array.from({ length: n }, () => Math.min(n - 1, Math.floor(rng.uniform() * n)));
      distinct.clear();
      for (const i of idx) distinct.add(rows[i].x);
      out = distinct.size >= p ? fitOnce(idx) : null;
    }
    if (!out) {
      redrawn++;
      if (redrawn > MAX_REDRAW_FACTOR * requested) break;
      continue;
    }
    if (!out.converged) notConverged++;
    aValues.push(out.figure.semiMajorAxisM);
    invValues.push(out.figure.inverseFlattening);
    qValues.push(out.figure.quadrantM);
    if (aValues.length % every === 0 || aValues.length === requested) options.onProgress?.(aValues.length, requested);
  }
  if (aValues.length < 2) return { ...empty(`too few usable resamples (${aValues.length}); ${redrawn} redrawn`), redrawn, stoppedEarly };
  const f = base.figure;
  const notes = [`${method} bootstrap over ${n} arcs, seed ${seed}`];
  if (method === 'pairs') {
    if (n < 10) notes.push(`only ${n} arcs: the bootstrap error is itself uncertain and tends to be too large`);
    notes.push('arcs are resampled as independent cases: the correlation through shared stations is not reproduced');
  } else {
    notes.push('replicates simulated from the fitted figure and station latitudes with one error per station (shared by its arcs) and per arc at their a-priori sigmas: the spread those sigmas imply, not extra scatter in the data');
  }
  if (stoppedEarly) notes.push(`stopped after ${aValues.length} of ${requested} replicates`);
  return {
    method, model, estimator, seed, requested, replicates: aValues.length, redrawn, notConverged, stoppedEarly, arcsInFit: n,
    semiMajorAxisM: summarise(aValues, f.semiMajorAxisM, f.semiMajorAxisStdM),
    inverseFlattening: summarise(invValues, f.inverseFlattening, f.inverseFlatteningStd),
    quadrantM: summarise(qValues, f.quadrantM, f.quadrantStdM),
    note: notes.join('; '),
  };
}
