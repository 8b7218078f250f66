// Averaging GNSS fixes into one geodetic latitude reading (field-traps ).
//
// Gates, in order, each with its own reason: finite values; freshness (a fix stamped before the
// capture started, or more than FUTURE_MARGIN_MS after the device clock, is a cached or bogus fix;
// the first fix of each watch session is dropped because platforms often replay their last cached
// position first); accuracy (the device's own estimate above the gate); then outliers, judged in a
// local metric frame around the median position (north = Δφ·M(φ), east = Δλ·N(φ)·cos φ on WGS 84,
// closed forms: M = a(1−e²)/(1−e² sin²φ)^{3/2}, N = a/(1−e² sin²φ)^{1/2}; over a few metres the
// frame's error is far below a millimetre) with a robust radius OUTLIER_K × 1.4826 × median
// distance, floored at OUTLIER_ACCURACY_FACTOR × the median device accuracy (and 1 m).
//
// The mean is weighted by 1/accuracy². The spread reported is the weighted RMS scatter of the kept
// fixes about their mean — never accuracy/√n: successive fixes are strongly correlated, so the
// scatter (not divided by √n) is the honest sigma for the averaged latitude.
import { ellipsoidById, eccentricitySquared, meridianRadiusM } from '../../geodesy/index.ts';

export interface RawFix {
  latitudeDeg: number;
  longitudeDeg: number;
  /** Device estimate of horizontal accuracy, metres (its confidence level varies by platform). */
  accuracyM: number;
  altitudeM: number | null;
  /** Fix time from the plugin, epoch ms. */
  fixMs: number;
  /** Which watch session delivered it (a new session restarts the first-fix drop). */
  sessionId: string;
}

export type FixRejection = 'not-finite' | 'before-capture' | 'in-future' | 'first-of-session' | 'too-inaccurate' | 'outlier';

export interface FixVerdict {
  fix: RawFix;
  accepted: boolean;
  reason: FixRejection | null;
  /** Horizontal distance from the median position, metres (null for fixes gated before it). */
  distanceM: number | null;
}

/** A fix stamped more than this after the device clock is refused (clock jitter allowance). */
export const FUTURE_MARGIN_MS = 2_000;
/** Default accuracy gate: a fix whose device estimate is worse than this is not measurement grade. */
export const DEFAULT_MAX_ACCURACY_M = 15;
export const DEFAULT_MIN_FIXES = 5;
export const DEFAULT_MIN_SPAN_S = 10;
/** Outlier radius in robust scales (1.4826 × median distance ≈ σ at the normal). */
export const OUTLIER_K = 3;
/** Floor of the outlier radius: below a metre the device scatter is not resolvable. */
export const MIN_OUTLIER_RADIUS_M = 1;
/**
 * A fix within this many median device accuracies of the median position is never an outlier:
 * when most fixes coincide the robust scale is 0, and a fix inside the phone's own error estimate
 * must not be thrown out for that. Device accuracies are 68 % radii on some platforms, 95 % on others.
 */
export const OUTLIER_ACCURACY_FACTOR = 2;
const MAD_TO_SIGMA = 1.4826;
/** Reference figure for the local metric frame (WGS 84, the GNSS datum). */
const FRAME = ellipsoidById('wgs84');

export interface AverageOptions {
  captureStartMs: number;
  nowMs: number;
  maxAccuracyM?: number;
  minFixes?: number;
  minSpanS?: number;
}

export type AverageStatus = 'ok' | 'too-few-fixes' | 'too-short';

export interface GnssAverage {
  status: AverageStatus;
  /** Plain words for the capture screen. */
  message: string;
  latitudeDeg: number | null;
  longitudeDeg: number | null;
  /** Fixes kept. */
  n: number;
  /** Time from the first to the last kept fix, seconds. */
  spanS: number;
  /** Weighted RMS horizontal scatter about the mean, metres. */
  scatterM: number | null;
  /** Weighted RMS north–south scatter, metres and arcseconds (the suggested sigma of the reading). */
  northScatterM: number | null;
  northScatterArcsec: number | null;
  /** Median device accuracy of the kept fixes, metres. */
  medianAccuracyM: number | null;
  /**
   * Suggested sigma of the averaged latitude, arcseconds: the north scatter, but never below
   * ACCURACY_SIGMA_FLOOR × the median device accuracy — fixes seconds apart share most of their
   * error (multipath, atmosphere), so a tight cluster does not mean a small error.
   */
  suggestedSigmaArcsec: number | null;
  verdicts: FixVerdict[];
}

/** Floor of the suggested sigma as a share of the median device accuracy (see GnssAverage). */
export const ACCURACY_SIGMA_FLOOR = 0.5;

const RAD = Math.PI / 180;

function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Metres per degree north and east at latitude φ on WGS 84 (closed forms above). */
export function metresPerDegree(latitudeDeg: number): { north: number; east: number } {
  const s = Math.sin(latitudeDeg * RAD);
  const n = FRAME.semiMajorAxisM / Math.sqrt(1 - eccentricitySquared(FRAME.flattening) * s * s);
  return { north: meridianRadiusM(FRAME, latitudeDeg) * RAD, east: n * Math.cos(latitudeDeg * RAD) * RAD };
}

export function averageFixes(fixes: readonly RawFix[], opts: AverageOptions): GnssAverage {
  const maxAcc = opts.maxAccuracyM ?? DEFAULT_MAX_ACCURACY_M;
  const minFixes = opts.minFixes ?? DEFAULT_MIN_FIXES;
  const minSpanS = opts.minSpanS ?? DEFAULT_MIN_SPAN_S;
  const seen = new Set<string>();
  const verdicts: FixVerdict[] = fixes.map((fix) => {
    const first = !seen.has(fix.sessionId);
    seen.add(fix.sessionId);
    let reason: FixRejection | null = null;
    if (![fix.latitudeDeg, fix.longitudeDeg, fix.accuracyM, fix.fixMs].every(Number.isFinite) || Math.abs(fix.latitudeDeg) > 90) reason = 'not-finite';
    else if (fix.fixMs < opts.captureStartMs) reason = 'before-capture';
    else if (fix.fixMs > opts.nowMs + FUTURE_MARGIN_MS) reason = 'in-future';
    else if (first) reason = 'first-of-session';
    else if (fix.accuracyM > maxAcc) reason = 'too-inaccurate';
    return { fix, accepted: reason === null, reason, distanceM: null };
  });

  const gated = verdicts.filter((v) => v.accepted);
  if (gated.length) {
    const lat0 = median(gated.map((v) => v.fix.latitudeDeg));
    const lon0 = median(gated.map((v) => v.fix.longitudeDeg));
    const k = metresPerDegree(lat0);
    for (const v of gated) v.distanceM = Math.hypot((v.fix.latitudeDeg - lat0) * k.north, (v.fix.longitudeDeg - lon0) * k.east);
    const floor = Math.max(MIN_OUTLIER_RADIUS_M, OUTLIER_ACCURACY_FACTOR * median(gated.map((v) => v.fix.accuracyM)));
    const radius = Math.max(OUTLIER_K * MAD_TO_SIGMA * median(gated.map((v) => v.distanceM ?? 0)), floor);
    for (const v of gated) if ((v.distanceM ?? 0) > radius) { v.accepted = false; v.reason = 'outlier'; }
  }

  const kept = verdicts.filter((v) => v.accepted).map((v) => v.fix);
  const spanS = kept.length ? (Math.max(...kept.map((f) => f.fixMs)) - Math.min(...kept.map((f) => f.fixMs))) / 1000 : 0;
  const base = { n: kept.length, spanS, verdicts };
  if (kept.length < minFixes) {
    return { ...base, status: 'too-few-fixes', message: `${kept.length} of ${minFixes} usable fixes so far — keep the phone still and wait.`, latitudeDeg: null, longitudeDeg: null, scatterM: null, northScatterM: null, northScatterArcsec: null, suggestedSigmaArcsec: null, medianAccuracyM: kept.length ? median(kept.map((f) => f.accuracyM)) : null };
  }

  let sw = 0, slat = 0, slon = 0;
  for (const f of kept) {
    const w = 1 / Math.max(f.accuracyM, 1e-3) ** 2;
    sw += w; slat += w * f.latitudeDeg; slon += w * f.longitudeDeg;
  }
  const lat = slat / sw, lon = slon / sw;
  const k = metresPerDegree(lat);
  let sNorth = 0, sAll = 0;
  for (const f of kept) {
    const w = 1 / Math.max(f.accuracyM, 1e-3) ** 2;
    const dn = (f.latitudeDeg - lat) * k.north, de = (f.longitudeDeg - lon) * k.east;
    sNorth += w * dn * dn; sAll += w * (dn * dn + de * de);
  }
  const northScatterM = Math.sqrt(sNorth / sw);
  const scatterM = Math.sqrt(sAll / sw);
  const medianAccuracyM = median(kept.map((f) => f.accuracyM));
  const mPerArcsec = k.north / 3600;
  const result = {
    ...base, latitudeDeg: lat, longitudeDeg: lon, scatterM, northScatterM, medianAccuracyM,
    northScatterArcsec: northScatterM / mPerArcsec,
    suggestedSigmaArcsec: Math.max(northScatterM, ACCURACY_SIGMA_FLOOR * medianAccuracyM) / mPerArcsec,
  };
  if (spanS < minSpanS) return { ...result, status: 'too-short', message: `${kept.length} fixes over ${spanS.toFixed(0)} s; wait at least ${minSpanS} s so the average is not one moment.` };
  return { ...result, status: 'ok', message: `${kept.length} fixes over ${spanS.toFixed(0)} s, scatter ${scatterM.toFixed(1)} m.` };
}
