// Station sufficiency: are a station's latitude repeats enough for the target sigma, and if not,
// how many more are needed?
//
// The σ/√n rule: n independent repeats of equal quality give a mean with standard error σ/√n.
// The station's current standard error se_n (station-latitudes.ts: the larger of the a-priori
// error and the repeats' own scatter) implies a per-repeat sigma se_n·√n, so reaching the target
// needs n' = ⌈n·(se_n/target)²⌉ repeats in all. The rule knows only random error: systematic
// errors (refraction anomalies, an instrument or catalogue error common to every repeat, a
// deflection of the vertical) do not average down, and no number of repeats removes them — the
// statement says so.
import { InputError } from '../errors.ts';
import { LATITUDE_KINDS, type CampaignRecords, type LatitudeKind } from './records.ts';
import { reduceStationLatitudes } from './station-latitudes.ts';

/** Default target: 0.1″, about 3 m on the ground — set the campaign's own. */
export const DEFAULT_TARGET_SIGMA_ARCSEC = 0.1;
/** Guards ⌈·⌉ against a ratio that is an integer up to rounding (n·(se/target)² = 4.000000000001 is 4). */
const CEIL_SLACK = 1e-9;

export interface StationSufficiency {
  code: string;
  kind: LatitudeKind;
  readingCount: number;
  standardErrorArcsec: number | null;
  targetSigmaArcsec: number;
  meetsTarget: boolean;
  /** Repeats in all for the target by the σ/√n rule (null with no reading). */
  repeatsNeeded: number | null;
  /** How many more to observe (0 when the target is met). */
  moreRepeats: number | null;
  statement: string;
}

export interface SufficiencyOptions {
  targetSigmaArcsec?: number;
  /** Only this kind (default: every kind that has readings). */
  latitudeKind?: LatitudeKind;
}

export function stationSufficiency(records: CampaignRecords, options: SufficiencyOptions = {}): StationSufficiency[] {
  const target = options.targetSigmaArcsec ?? DEFAULT_TARGET_SIGMA_ARCSEC;
  if (!Number.isFinite(target) || target <= 0) throw new InputError('targetSigmaArcsec', target, 'must be a positive number of arcseconds');
  const excluded = new Set((records.exclusions ?? []).map((e) => e.readingId));
  const latitudes = reduceStationLatitudes(records.stations, records.latitudeReadings, { excludedIds: excluded, suspectThreshold: records.settings?.suspectThreshold });
  const kinds = options.latitudeKind ? [options.latitudeKind] : LATITUDE_KINDS;
  const out: StationSufficiency[] = [];
  for (const s of latitudes) {
    for (const kind of kinds) {
      const est = s.byKind[kind];
      if (!est && options.latitudeKind === undefined) continue;
      const n = est?.count ?? 0;
      if (!est || n === 0) {
        out.push({
          code: s.code, kind, readingCount: 0, standardErrorArcsec: null, targetSigmaArcsec: target, meetsTarget: false,
          repeatsNeeded: null, moreRepeats: null, statement: `${s.code}: no ${kind} latitude reading in the fit yet`,
        });
        continue;
      }
      const se = est.standardErrorArcsec;
      const needed = Math.max(n, Math.ceil(n * (se / target) ** 2 - CEIL_SLACK));
      const more = needed - n;
      const meets = se <= target;
      const statement = meets
        ? `${s.code}: ${n} ${kind} repeat${n === 1 ? '' : 's'} give ${se.toFixed(3)}″, within the target ${target}″`
        : `${s.code}: ${n} ${kind} repeat${n === 1 ? '' : 's'} give ${se.toFixed(3)}″; about ${more} more for ${target}″ (σ/√n rule; systematic errors do not average down)`;
      out.push({ code: s.code, kind, readingCount: n, standardErrorArcsec: se, targetSigmaArcsec: target, meetsTarget: meets, repeatsNeeded: needed, moreRepeats: more, statement });
    }
  }
  return out;
}
