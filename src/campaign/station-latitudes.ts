// Repeat latitude readings at one station → one station latitude per kind, with standard error,
// spread and within-station suspect flags.
//
// Estimator: the weighted Huber M-estimate of location (Huber 1964; k = 1.345, 95 % efficiency at
// the normal), weights wᵢ = 1/σᵢ², solved by iteratively reweighted means from the weighted median.
// Scale: the MAD scale of the whitened residuals about the weighted median, floored at 1 — i.e. the
// readings' own sigmas are trusted unless the repeats scatter more than they claim. The floor keeps
// identical repeats (zero MAD) and pessimistic sigmas from flagging every reading.
// Standard error (Huber 1981, §6.6, with weights): se² = s²·[Σψ(uᵢ)²/(n−1)] / [Σψ′(uᵢ)/n]² / Σwᵢ,
// and never less than the a-priori 1/√Σwᵢ (repeat scatter misses the systematic part — common practice).
// Small n: one reading is its own mean (se = σ); two readings give the weighted mean, and when they
// disagree neither can be blamed, so the hint asks for a third reading instead of flagging one.
//
// Astronomic (instrument, plumb line) and geodetic (GNSS, ellipsoid normal) latitudes are different
// quantities and are never averaged together; their difference is the north–south deflection of the
// vertical ξ = Φ − φ (arcseconds, positive when the plumb line points to the north of the normal).
import type { LatitudeKind, LatitudeReading, Station } from './records.ts';
import { LATITUDE_KINDS } from './records.ts';
import { formatSigma } from './format-sigma.ts';

export const HUBER_LOCATION_K = 1.345;
/** Convergence of the location iteration: 1e-9 arcsec (0.03 µm on the ground), far below any reading's sigma. */
export const LOCATION_TOLERANCE_ARCSEC = 1e-9;
export const LOCATION_MAX_ITERATIONS = 200;
/** 1/Φ⁻¹(3/4): MAD → σ at the normal. */
const MAD_TO_SIGMA = 1.482602218505602;

export interface LatitudeReadingFit {
  id: string;
  /** Reading minus the station estimate, arcseconds. */
  residualArcsec: number;
  standardizedResidual: number;
  suspect: boolean;
  excluded: boolean;
  hint: string;
}

export interface LatitudeEstimate {
  kind: LatitudeKind;
  latitudeDeg: number;
  standardErrorArcsec: number;
  /** Scatter of the repeats in arcseconds: MAD scale of the whitened residuals × median sigma (two readings:
   *  |difference|/√2 in the same units); 0 for a single reading. Not floored, unlike the flagging scale. */
  spreadArcsec: number;
  /** Readings used (not excluded). */
  count: number;
  iterations: number;
  converged: boolean;
  reason: string;
  readings: LatitudeReadingFit[];
}

export interface StationLatitude {
  code: string;
  byKind: Partial<Record<LatitudeKind, LatitudeEstimate>>;
  /** ξ = astronomic − geodetic, arcseconds, when both kinds have readings. */
  deflectionNorthArcsec: number | null;
  deflectionNorthStdArcsec: number | null;
}

export interface StationLatitudeOptions {
  excludedIds?: ReadonlySet<string>;
  suspectThreshold?: number;
}

function weightedMedian(values: readonly number[], weights: readonly number[]): number {
  const order = values.map((_, i) => i).sort((i, j) => values[i] - values[j]);
  const total = weights.reduce((s, w) => s + w, 0);
  let acc = 0;
  for (let k = 0; k < order.length; k++) {
    acc += weights[order[k]];
    // Exactly half the weight below: the midpoint of the two middle values (the unweighted rule).
    if (Math.abs(acc - total / 2) <= 1e-12 * total && k + 1 < order.length) return (values[order[k]] + values[order[k + 1]]) / 2;
    if (acc > total / 2) return values[order[k]];
  }
  return values[order[order.length - 1]];
}

function plainMedian(values: readonly number[]): number {
  const s = [...values].sort((x, y) => x - y);
  const m = s.length >> 1;
  return s.length % 2 === 1 ? s[m] : (s[m - 1] + s[m]) / 2;
}

const psi = (u: number, k: number): number => Math.max(-k, Math.min(k, u));
const psiPrime = (u: number, k: number): number => (Math.abs(u) <= k ? 1 : 0);

interface Location { offsetArcsec: number; scale: number; rawScale: number; se: number; iterations: number; converged: boolean; reason: string }

/** Weighted Huber location of residual offsets (arcsec) with sigmas (arcsec). */
function huberLocation(x: readonly number[], sigma: readonly number[]): Location {
  const n = x.length;
  const w = sigma.map((s) => 1 / (s * s));
  const sumW = w.reduce((s, v) => s + v, 0);
  const apriori = 1 / Math.sqrt(sumW);
  if (n === 1) return { offsetArcsec: x[0], scale: 1, rawScale: 0, se: sigma[0], iterations: 0, converged: true, reason: 'single reading' };
  if (n === 2) {
    const mean = (w[0] * x[0] + w[1] * x[1]) / sumW;
    const chi = (x[0] - x[1]) ** 2 / (sigma[0] ** 2 + sigma[1] ** 2);
    return { offsetArcsec: mean, scale: Math.max(1, Math.sqrt(chi)), rawScale: Math.sqrt(chi / 2), se: apriori * Math.max(1, Math.sqrt(chi)), iterations: 0, converged: true, reason: 'two readings: weighted mean' };
  }
  const med = weightedMedian(x, w);
  const rawScale = MAD_TO_SIGMA * plainMedian(x.map((v, i) => Math.abs(v - med) / sigma[i]));
  const scale = Math.max(1, rawScale);
  let mu = med;
  let iterations = 0;
  let converged = false;
  let reason = '';
  while (iterations < LOCATION_MAX_ITERATIONS) {
    iterations++;
    let num = 0;
    let den = 0;
    for (let i = 0; i < n; i++) {
      const u = (x[i] - mu) / (sigma[i] * scale);
      const omega = Math.abs(u) <= HUBER_LOCATION_K ? 1 : HUBER_LOCATION_K / Math.abs(u);
      num += w[i] * omega * x[i];
      den += w[i] * omega;
    }
    const next = num / den;
    const step = Math.abs(next - mu);
    mu = next;
    if (step <= LOCATION_TOLERANCE_ARCSEC) {
      converged = true;
      reason = `step ${step.toExponential(1)}″ below ${LOCATION_TOLERANCE_ARCSEC}″`;
      break;
    }
  }
  if (!converged) reason = `stopped at the cap of ${LOCATION_MAX_ITERATIONS} iterations`;
  let sumPsi2 = 0;
  let sumPsiPrime = 0;
  for (let i = 0; i < n; i++) {
    const u = (x[i] - mu) / (sigma[i] * scale);
    sumPsi2 += psi(u, HUBER_LOCATION_K) ** 2;
    sumPsiPrime += psiPrime(u, HUBER_LOCATION_K);
  }
  // Every reading beyond k (ψ′ ≡ 0) leaves the sandwich undefined: fall back to the scaled a-priori error.
  const empirical = sumPsiPrime > 0
    ? scale * Math.sqrt(sumPsi2 / (n - 1)) / (sumPsiPrime / n) * apriori
    : scale * apriori;
  return { offsetArcsec: mu, scale, rawScale, se: Math.max(apriori, empirical), iterations, converged, reason };
}

function estimateKind(code: string, kind: LatitudeKind, all: readonly LatitudeReading[], excluded: ReadonlySet<string>, threshold: number): LatitudeEstimate | undefined {
  const used = all.filter((r) => !excluded.has(r.id));
  if (all.length === 0) return undefined;
  // Work in arcseconds about a reference latitude so that sub-milliarcsecond offsets keep full precision.
  const ref = (used.length > 0 ? used : all)[0].latitudeDeg;
  const offset = (r: LatitudeReading): number => (r.latitudeDeg - ref) * 3600;
  if (used.length === 0) {
    return {
      kind, latitudeDeg: ref, standardErrorArcsec: 0, spreadArcsec: 0, count: 0, iterations: 0, converged: true,
      reason: 'every reading excluded',
      readings: all.map((r) => ({ id: r.id, residualArcsec: offset(r), standardizedResidual: 0, suspect: false, excluded: true, hint: '' })),
    };
  }
  const loc = huberLocation(used.map(offset), used.map((r) => r.sigmaArcsec));
  const medianSigma = plainMedian(used.map((r) => r.sigmaArcsec));
  const readings = all.map((r): LatitudeReadingFit => {
    const residual = offset(r) - loc.offsetArcsec;
    const isExcluded = excluded.has(r.id);
    let standardized = residual / (r.sigmaArcsec * loc.scale);
    if (used.length === 2 && !isExcluded) {
      const other = used.find((o) => o.id !== r.id) ?? r;
      standardized = (offset(r) - offset(other)) / Math.hypot(r.sigmaArcsec, other.sigmaArcsec);
    }
    if (used.length === 1 && !isExcluded) standardized = 0;
    const beyond = Math.abs(standardized) > threshold;
    const suspect = used.length >= 3 && beyond;
    let hint = '';
    if (isExcluded) {
      if (!beyond && used.length >= 2) hint = `excluded, but fits ${code} (${formatSigma(standardized)}): consider restoring ${r.id}`;
    } else if (suspect) {
      hint = `re-observe ${code}: ${kind} latitude reading ${r.id} ${formatSigma(standardized)}`;
    } else if (used.length === 2 && beyond) {
      hint = `observe ${code} again: its two ${kind} latitude readings disagree by ${formatSigma(Math.abs(standardized)).replace('+', '')}`;
    }
    return { id: r.id, residualArcsec: residual, standardizedResidual: standardized, suspect, excluded: isExcluded, hint };
  });
  return {
    kind,
    latitudeDeg: ref + loc.offsetArcsec / 3600,
    standardErrorArcsec: loc.se,
    spreadArcsec: loc.rawScale * medianSigma,
    count: used.length,
    iterations: loc.iterations,
    converged: loc.converged,
    reason: loc.reason,
    readings,
  };
}

/** One entry per station, in station order; stations without readings have an empty `byKind`. */
export function reduceStationLatitudes(
  stations: readonly Pick<Station, 'code'>[],
  readings: readonly LatitudeReading[],
  options: StationLatitudeOptions = {},
): StationLatitude[] {
  const excluded = options.excludedIds ?? new Set<string>();
  const threshold = options.suspectThreshold ?? 3;
  return stations.map((station) => {
    const byKind: Partial<Record<LatitudeKind, LatitudeEstimate>> = {};
    for (const kind of LATITUDE_KINDS) {
      const est = estimateKind(station.code, kind, readings.filter((r) => r.station === station.code && r.kind === kind), excluded, threshold);
      if (est) byKind[kind] = est;
    }
    const astro = byKind.astronomic;
    const geod = byKind.geodetic;
    const both = astro !== undefined && geod !== undefined && astro.count > 0 && geod.count > 0;
    return {
      code: station.code,
      byKind,
      deflectionNorthArcsec: both ? (astro.latitudeDeg - geod.latitudeDeg) * 3600 : null,
      deflectionNorthStdArcsec: both ? Math.hypot(astro.standardErrorArcsec, geod.standardErrorArcsec) : null,
    };
  });
}
