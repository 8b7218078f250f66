// The difference between a campaign as stored and an imported campaign file (the app's CSV import
// hands over the whole campaign after the import): which records are new, which changed, which a
// replaced table no longer holds. Pure — the caller reads the rows inside its transaction and
// passes them in, so the plan is made against the snapshot the write commits on.
//
// Matching rules:
// - a reading or exclusion is the stored one with the same id (same id = update);
// - a station is the stored one with the same id, else the live one with the same code (readings
//   name stations by code, so a station file without ids, or with another device's ids, updates
//   the stations it names instead of duplicating them);
// - a new record keeps the file's id when no row on this device has it, so importing the same file
//   twice changes nothing; when the id belongs to another campaign on this device (primary keys are
//   per device) it gets a fresh device-made id, and exclusions of the file follow the new reading id;
// - a reading or exclusion whose id is a tombstone of this campaign is refused: a deleted record
//   never comes back under its id (DEVELOPERS.md "Merge rules"); a station is matched by code, so
//   a tombstoned station id just gets a fresh id;
// - only a replaced collection loses records: live records it lacks become tombstones. A record
//   missing from any other collection is left as stored.
import type { ArcReading, CampaignFile, Exclusion, LatitudeReading, Station } from '../campaign/records.ts';
import { crossRecordProblems } from '../campaign/validate-campaign.ts';
import type { Problem } from '../errors.ts';
import type { ArcReadingRow, ExclusionRow, LatitudeReadingRow, StationRow } from './rows.ts';

export const IMPORT_COLLECTIONS = ['stations', 'latitudeReadings', 'arcReadings', 'exclusions'] as const;
export type ImportCollection = (typeof IMPORT_COLLECTIONS)[number];

export interface ImportCounts {
  added: number;
  changed: number;
  removed: number;
  unchanged: number;
}

interface RecordOf { stations: Station & { id: string }; latitudeReadings: LatitudeReading; arcReadings: ArcReading; exclusions: Exclusion }
interface RowOfCollection { stations: StationRow; latitudeReadings: LatitudeReadingRow; arcReadings: ArcReadingRow; exclusions: ExclusionRow }

/** One write: a put (create when `current` is undefined, else an update on it) or a tombstone. */
export type PlannedWrite<C extends ImportCollection> =
  | { op: 'put'; id: string; record: RecordOf[C]; current: RowOfCollection[C] | undefined }
  | { op: 'delete'; id: string; current: RowOfCollection[C] };

export type PlannedWrites = { [C in ImportCollection]: PlannedWrite<C>[] };

export interface ImportPlanInput {
  campaignId: string;
  /** Already checked with the record schemas (import-rows.ts). */
  file: CampaignFile;
  /** Live (not deleted) rows of the campaign, per collection. */
  live: { [C in ImportCollection]: readonly RowOfCollection[C][] };
  /** Rows of this device with an id the file uses that is not a live row of the campaign (tombstones, other campaigns). */
  taken: { [C in ImportCollection]: ReadonlyMap<string, RowOfCollection[C]> };
  replace: ReadonlySet<ImportCollection>;
  newId: () => string;
}

export interface ImportPlan {
  writes: PlannedWrites;
  counts: Record<ImportCollection, ImportCounts>;
  problems: Problem[];
}

const zero = (): ImportCounts => ({ added: 0, changed: 0, removed: 0, unchanged: 0 });

/** Key order and absent-versus-undefined do not make two records different; array order does. */
export function sameRecord(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (Array.isArray(a) || Array.isArray(b)) {
    return Array.isArray(a) && Array.isArray(b) && a.length === b.length && a.every((x, i) => sameRecord(x, b[i]));
  }
  if (a === null || b === null || typeof a !== 'object' || typeof b !== 'object') return Object.is(a, b);
  const ra = a as Record<string, unknown>;
  const rb = b as Record<string, unknown>;
  const keys = new Set([...Object.keys(ra), ...Object.keys(rb)]);
  for (const k of keys) if (!sameRecord(ra[k], rb[k])) return false;
  return true;
}

/** The file's id for a new reading or exclusion: kept when free, fresh when another campaign uses it, refused on a tombstone. */
function newRecordId<C extends ImportCollection>(input: ImportPlanInput, collection: C, index: number, fileId: string, problems: Problem[]): string | null {
  const other = input.taken[collection].get(fileId);
  if (!other) return fileId;
  if (other.campaignId === input.campaignId && other.deleted) {
    problems.push({
      field: `${collection}[${index}].id`, value: fileId,
      reason: 'this record was deleted on this device and a deleted record never comes back under its id; leave the id cell empty to import it as a new record',
    });
    return null;
  }
  return input.newId();
}

function diffOne<C extends ImportCollection>(collection: C, current: RowOfCollection[C] | undefined, id: string, record: RecordOf[C], writes: PlannedWrite<C>[], counts: ImportCounts): void {
  if (!current) {
    writes.push({ op: 'put', id, record, current: undefined });
    counts.added += 1;
  } else if (sameRecord(current.record, record)) {
    counts.unchanged += 1;
  } else {
    writes.push({ op: 'put', id, record, current });
    counts.changed += 1;
  }
}

function removals<C extends ImportCollection>(input: ImportPlanInput, collection: C, matched: ReadonlySet<string>, writes: PlannedWrite<C>[], counts: ImportCounts): RowOfCollection[C][] {
  const kept: RowOfCollection[C][] = [];
  for (const row of input.live[collection]) {
    if (matched.has(row.id)) continue;
    if (input.replace.has(collection)) {
      writes.push({ op: 'delete', id: row.id, current: row });
      counts.removed += 1;
    } else kept.push(row);
  }
  return kept;
}

export function planImport(input: ImportPlanInput): ImportPlan {
  const problems: Problem[] = [];
  const counts = { stations: zero(), latitudeReadings: zero(), arcReadings: zero(), exclusions: zero() };
  const writes: PlannedWrites = { stations: [], latitudeReadings: [], arcReadings: [], exclusions: [] };

  // Stations: by id within the campaign, else by code among the live stations.
  const liveStationById = new Map(input.live.stations.map((r) => [r.id, r]));
  const liveStationByCode = new Map(input.live.stations.map((r) => [r.code, r]));
  const matchedStations = new Set<string>();
  const finalStations: Station[] = [];
  for (const s of input.file.stations) {
    let current = s.id !== undefined ? liveStationById.get(s.id) : undefined;
    if (!current || matchedStations.has(current.id)) {
      const byCode = liveStationByCode.get(s.code);
      current = byCode && !matchedStations.has(byCode.id) ? byCode : undefined;
    }
    const id = current?.id ?? (s.id !== undefined && !input.taken.stations.has(s.id) && !liveStationById.has(s.id) ? s.id : input.newId());
    if (current) matchedStations.add(current.id);
    const record = { ...s, id };
    finalStations.push(record);
    diffOne('stations', current, id, record, writes.stations, counts.stations);
  }
  for (const row of removals(input, 'stations', matchedStations, writes.stations, counts.stations)) if (row.record) finalStations.push(row.record);

  // Readings, then exclusions (which follow a reading that had to take a fresh id).
  const readingIdOf = new Map<string, string>();
  const readings = <C extends 'latitudeReadings' | 'arcReadings'>(collection: C, records: readonly RecordOf[C][]): RecordOf[C][] => {
    const liveById = new Map<string, RowOfCollection[C]>(input.live[collection].map((r) => [r.id, r]));
    const matched = new Set<string>();
    const final: RecordOf[C][] = [];
    records.forEach((r, i) => {
      const current = liveById.get(r.id);
      const id = current ? r.id : newRecordId(input, collection, i, r.id, problems);
      if (id === null) return;
      if (current) matched.add(id);
      readingIdOf.set(r.id, id);
      const record = { ...r, id };
      final.push(record);
      diffOne(collection, current, id, record, writes[collection], counts[collection]);
    });
    for (const row of removals(input, collection, matched, writes[collection], counts[collection])) if (row.record) final.push(row.record as RecordOf[C]);
    return final;
  };
  const finalLatitude = readings('latitudeReadings', input.file.latitudeReadings);
  const finalArcs = readings('arcReadings', input.file.arcReadings);

  const liveExclusionById = new Map(input.live.exclusions.map((r) => [r.id, r]));
  const matchedExclusions = new Set<string>();
  const finalExclusions: Exclusion[] = [];
  (input.file.exclusions ?? []).forEach((e, i) => {
    const current = liveExclusionById.get(e.id);
    const id = current ? e.id : newRecordId(input, 'exclusions', i, e.id, problems);
    if (id === null) return;
    if (current) matchedExclusions.add(id);
    const record = { ...e, id, readingId: readingIdOf.get(e.readingId) ?? e.readingId };
    finalExclusions.push(record);
    diffOne('exclusions', current, id, record, writes.exclusions, counts.exclusions);
  });
  for (const row of removals(input, 'exclusions', matchedExclusions, writes.exclusions, counts.exclusions)) if (row.record) finalExclusions.push(row.record);

  // The campaign as it will be after the commit must hold together (unique codes and ids, stations
  // that exist, exclusions that point at a reading). File records come first in each list, so a
  // problem's index is the file's index.
  problems.push(...crossRecordProblems({ stations: finalStations, latitudeReadings: finalLatitude, arcReadings: finalArcs, exclusions: finalExclusions }));
  return { writes, counts, problems };
}
