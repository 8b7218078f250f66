// Validation of a campaign document: the zod schema (shape, units, ranges, non-finite numbers)
// plus the cross-record checks a schema cannot express (unique ids, station codes that exist,
// exclusions that point at a reading, a reference ellipsoid the geodesy layer knows). Every problem is collected — a crew fixing a file wants the
// whole list at once, not one error per run — and reported as {field path, value, reason}.
import type { z } from 'zod';
import { ValidationError, type Problem } from '../errors.ts';
import { ELLIPSOID_IDS, isEllipsoidId } from '../geodesy/index.ts';
import { CampaignFileSchema, type CampaignFile, type CampaignRecords } from './records.ts';

/** `latitudeReadings[3].sigmaArcsec` from ['latitudeReadings', 3, 'sigmaArcsec']. */
export function formatFieldPath(path: readonly PropertyKey[]): string {
  let out = '';
  for (const key of path) {
    if (typeof key === 'number') out += `[${key}]`;
    else out += (out === '' ? '' : '.') + String(key);
  }
  return out === '' ? '(document)' : out;
}

/** The value at `path` inside raw input, or undefined when the path does not exist. */
function valueAt(input: unknown, path: readonly PropertyKey[]): unknown {
  let cur: unknown = input;
  for (const key of path) {
    if (cur === null || typeof cur !== 'object') return undefined;
    cur = (cur as Record<PropertyKey, unknown>)[key];
  }
  return cur;
}

function zodProblems(input: unknown, error: z.ZodError): Problem[] {
  const problems: Problem[] = [];
  for (const issue of error.issues) {
    // Unknown keys: name each key, so "additional property" points at the exact field.
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) {
        const path = [...issue.path, key];
        problems.push({ field: formatFieldPath(path), value: valueAt(input, path), reason: 'unknown field' });
      }
      continue;
    }
    problems.push({ field: formatFieldPath(issue.path), value: valueAt(input, issue.path), reason: issue.message });
  }
  return problems;
}

const asArray = (v: unknown): unknown[] => (Array.isArray(v) ? v : []);
const asRecord = (v: unknown): Record<string, unknown> =>
  v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as Record<string, unknown>) : {};
const asString = (v: unknown): string | undefined => (typeof v === 'string' ? v : undefined);

/**
 * Cross-record checks. Works on raw (possibly malformed) input so that these problems are listed
 * alongside the schema's even when some records fail the schema; fields of the wrong type are
 * skipped here (the schema already reports them).
 */
export function crossRecordProblems(input: unknown): Problem[] {
  const doc = asRecord(input);
  const problems: Problem[] = [];
  const stations = asArray(doc.stations).map(asRecord);
  const latitudeReadings = asArray(doc.latitudeReadings).map(asRecord);
  const arcReadings = asArray(doc.arcReadings).map(asRecord);
  const exclusions = asArray(doc.exclusions).map(asRecord);

  const codes = new Map<string, number>();
  stations.forEach((s, i) => {
    const code = asString(s.code);
    if (code === undefined) return;
    const first = codes.get(code);
    if (first !== undefined) {
      problems.push({ field: `stations[${i}].code`, value: code, reason: `duplicate station code (also stations[${first}])` });
    } else codes.set(code, i);
  });
  const stationIds = new Map<string, number>();
  stations.forEach((s, i) => {
    const id = asString(s.id);
    if (id === undefined) return;
    const first = stationIds.get(id);
    if (first !== undefined) problems.push({ field: `stations[${i}].id`, value: id, reason: `duplicate station id (also stations[${first}])` });
    else stationIds.set(id, i);
  });

  // Reading and exclusion ids share one namespace: an exclusion names a reading by id alone.
  const ids = new Map<string, string>();
  const claim = (id: unknown, field: string): void => {
    const s = asString(id);
    if (s === undefined) return;
    const first = ids.get(s);
    if (first !== undefined) problems.push({ field, value: s, reason: `duplicate id (also ${first})` });
    else ids.set(s, field);
  };
  latitudeReadings.forEach((r, i) => claim(r.id, `latitudeReadings[${i}].id`));
  arcReadings.forEach((r, i) => claim(r.id, `arcReadings[${i}].id`));
  exclusions.forEach((r, i) => claim(r.id, `exclusions[${i}].id`));

  const needStation = (code: unknown, field: string): void => {
    const s = asString(code);
    if (s !== undefined && !codes.has(s)) problems.push({ field, value: s, reason: 'no station with this code in stations' });
  };
  latitudeReadings.forEach((r, i) => needStation(r.station, `latitudeReadings[${i}].station`));
  arcReadings.forEach((r, i) => {
    needStation(r.fromStation, `arcReadings[${i}].fromStation`);
    needStation(r.toStation, `arcReadings[${i}].toStation`);
    if (asString(r.fromStation) !== undefined && r.fromStation === r.toStation) {
      problems.push({ field: `arcReadings[${i}].toStation`, value: r.toStation, reason: 'an arc needs two different stations' });
    }
  });

  const reference = asString(asRecord(doc.settings).referenceEllipsoid);
  if (reference !== undefined && !isEllipsoidId(reference)) {
    problems.push({ field: 'settings.referenceEllipsoid', value: reference, reason: `unknown ellipsoid; use one of ${ELLIPSOID_IDS.join(', ')}` });
  }

  const readingIds = new Set<string>();
  for (const r of [...latitudeReadings, ...arcReadings]) {
    const s = asString(r.id);
    if (s !== undefined) readingIds.add(s);
  }
  exclusions.forEach((e, i) => {
    const target = asString(e.readingId);
    if (target !== undefined && !readingIds.has(target)) {
      problems.push({ field: `exclusions[${i}].readingId`, value: target, reason: 'no latitude or arc reading with this id' });
    }
  });
  return problems;
}

function dedupe(problems: Problem[]): Problem[] {
  const seen = new Set<string>();
  return problems.filter((p) => {
    const key = `${p.field}\u0000${p.reason}`;
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
}

export type CampaignCheck =
  | { ok: true; file: CampaignFile; problems: [] }
  | { ok: false; problems: Problem[] };

/** Schema plus cross-record checks; every problem, in document order of the schema then cross checks. */
export function checkCampaignFile(input: unknown, source?: string): CampaignCheck {
  const parsed = CampaignFileSchema.safeParse(input);
  const problems = dedupe([...(parsed.success ? [] : zodProblems(input, parsed.error)), ...crossRecordProblems(input)]);
  if (source !== undefined) for (const p of problems) p.source = source;
  if (parsed.success && problems.length === 0) return { ok: true, file: parsed.data, problems: [] };
  return { ok: false, problems };
}

/** Parse unknown JSON into a CampaignFile, or throw ValidationError listing every problem. */
export function validateCampaign(input: unknown, source?: string): CampaignFile {
  const check = checkCampaignFile(input, source);
  if (!check.ok) throw new ValidationError(check.problems, source ?? 'campaign');
  return check.file;
}

/** The cross-record checks for records already held in typed form (the store, the sync server). */
export function checkCampaignRecords(records: CampaignRecords): Problem[] {
  return crossRecordProblems(records);
}
