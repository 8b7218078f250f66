// Batch import into an EXISTING campaign (the app's CSV import with column mapping). The imported
// campaign file is compared with the campaign on the device (import-plan.ts has the rules), and
// every new, changed or removed record is written with its change-log row — so sync pushes it —
// in ONE read-write transaction, then read back before success is reported (as commit-record.ts
// does for one record). Every record of the file passes its record schema first and the campaign
// after the import must hold together; any problem throws ValidationError and nothing is written
// (style.md §12). Deletes are tombstones. The file's name, description and settings are not
// imported: this writes rows, the campaign record is edited on its own screen.
import { Dexie, type Table } from 'dexie';
import { RECORD_SCHEMAS, type CampaignFile, type RecordKind } from '../campaign/records.ts';
import { crossRecordProblems } from '../campaign/validate-campaign.ts';
import { InputError, ValidationError, type Problem } from '../errors.ts';
import { PROTOCOL_VERSION } from '../sync/protocol.ts';
import { lastChangeSeq } from './campaign-mirror.ts';
import { SAVE_WATCHDOG_MS } from './commit-record.ts';
import { SETTING_HLC } from './device-context.ts';
import type { FieldStore } from './field-store.ts';
import { IMPORT_COLLECTIONS, planImport, type ImportCollection, type ImportCounts, type ImportPlanInput, type PlannedWrite } from './import-plan.ts';
import type { ArcReadingRow, ChangeRow, ExclusionRow, LatitudeReadingRow, RowMeta, StationRow } from './rows.ts';
import { observedMsOf } from './schema-v2.ts';
import { classifyStorageError, StorageError } from './storage-error.ts';
import { validateRecord } from './validate-record.ts';

/**
 * Watchdog of a batch: the single-save allowance plus this much per written record. IndexedDB
 * writes thousands of small rows a second; 5 ms a record is a wide margin on a slow phone (not
 * measured on one). When it fires the import is reported "not saved yet", as a single save is.
 */
export const IMPORT_WATCHDOG_MS_PER_RECORD = 5;

export interface ImportRowsOptions {
  /** Collections the file replaces: their live records that the file lacks become tombstones. */
  replace?: readonly ImportCollection[];
  /**
   * The campaign's last change-log sequence when the file was built (`loadCampaignSnapshot`).
   * Given, the import is refused if anything was written to the campaign since (a save, a sync),
   * because the file would silently undo it.
   */
  expectedSeq?: number;
  /** A name for the messages (the CSV file name). */
  source?: string;
}

export interface ImportRowsSummary extends ImportCounts {
  campaignId: string;
  byCollection: Record<ImportCollection, ImportCounts>;
}

const KIND_OF: Record<ImportCollection, Exclude<RecordKind, 'campaign'>> = {
  stations: 'station', latitudeReadings: 'latitudeReading', arcReadings: 'arcReading', exclusions: 'exclusion',
};

/** Every record of the file against its record schema, then the file's own cross-record checks; all problems at once. */
function validateRows(file: CampaignFile, source: string): CampaignFile {
  const problems: Problem[] = [];
  const out: Record<ImportCollection, unknown[]> = { stations: [], latitudeReadings: [], arcReadings: [], exclusions: [] };
  for (const collection of IMPORT_COLLECTIONS) {
    const list: unknown = (file as Partial<Record<ImportCollection, unknown>>)[collection] ?? (collection === 'exclusions' ? [] : undefined);
    if (!Array.isArray(list)) {
      problems.push({ field: collection, value: list, reason: 'a list of records is expected', source });
      continue;
    }
    list.forEach((record: unknown, i) => {
      const where = `${collection}[${i}]`;
      try {
        out[collection].push(validateRecord(RECORD_SCHEMAS[KIND_OF[collection]], record, where));
      } catch (err) {
        if (!(err instanceof ValidationError)) throw err;
        for (const p of err.problems) problems.push({ ...p, field: p.field === where ? where : `${where}.${p.field}`, source });
      }
    });
  }
  if (problems.length === 0) problems.push(...crossRecordProblems(out).map((p) => ({ ...p, source })));
  if (problems.length > 0) throw new ValidationError(problems, source);
  return { ...file, ...(out as Pick<CampaignFile, ImportCollection>) };
}

const isOurs = (err: unknown): boolean =>
  err instanceof StorageError || err instanceof InputError || err instanceof ValidationError
  || (err instanceof Error && (err.name === 'InputError' || err.name === 'ValidationError'));

/**
 * Write the difference between the campaign and `file` (the whole campaign after an import).
 * Resolves with what was added, changed and removed once every written row has been read back;
 * rejects with ValidationError (nothing written), InputError (no such campaign, or it moved since
 * `expectedSeq`) or StorageError (classified; nothing written).
 */
export async function importRows(store: FieldStore, campaignId: string, file: CampaignFile, options: ImportRowsOptions = {}): Promise<ImportRowsSummary> {
  const source = options.source ?? 'import';
  const checked = validateRows(file, source);
  const { db, ctx } = store;
  const replace = new Set(options.replace ?? []);
  const tables = [db.campaigns, db.stations, db.latitudeReadings, db.arcReadings, db.exclusions, db.changes, db.settings];
  const live = [[campaignId, 0, Dexie.minKey], [campaignId, 0, Dexie.maxKey]] as const;
  const written: { [C in ImportCollection]: Map<string, string> } = { stations: new Map(), latitudeReadings: new Map(), arcReadings: new Map(), exclusions: new Map() };
  // The watchdog is armed for the file's size and re-armed for the real number of writes once the
  // plan is known (a replace can remove more records than the file holds).
  let timer: ReturnType<typeof setTimeout> | undefined;
  let fire: (err: StorageError) => void = () => undefined;
  const watchdog = new Promise<never>((_, reject) => { fire = reject; });
  const arm = (records: number): void => {
    clearTimeout(timer);
    timer = setTimeout(() => fire(new StorageError('timeout', 'campaigns', campaignId, 'TimeoutError')), SAVE_WATCHDOG_MS + IMPORT_WATCHDOG_MS_PER_RECORD * records);
  };
  arm(IMPORT_COLLECTIONS.reduce((n, c) => n + (checked[c]?.length ?? 0), 0));

  const tx = db.transaction('rw', tables, async () => {
    // Checks that need the stored rows run inside the transaction, on the snapshot the write commits against.
    const campaign = await db.campaigns.get(campaignId);
    if (!campaign || campaign.deleted) throw new InputError('campaign', campaignId, 'no such campaign on this device');
    if (options.expectedSeq !== undefined) {
      const seq = await lastChangeSeq(db, campaignId);
      if (seq !== options.expectedSeq) throw new InputError('campaign', campaignId, 'the campaign changed since the file was checked (a save or a sync); check the file again');
    }
    const [stations, latitudeReadings, arcReadings, exclusions] = await Promise.all([
      db.stations.where('[campaignId+deleted+id]').between(...live).toArray(),
      db.latitudeReadings.where('[campaignId+deleted+id]').between(...live).toArray(),
      db.arcReadings.where('[campaignId+deleted+id]').between(...live).toArray(),
      db.exclusions.where('[campaignId+deleted+id]').between(...live).toArray(),
    ]);
    const liveRows = { stations, latitudeReadings, arcReadings, exclusions };
    const othersOf = async <R extends { id: string }>(rows: readonly R[], ids: readonly (string | undefined)[], table: Table<R, string>): Promise<Map<string, R>> => {
      const mine = new Set(rows.map((r) => r.id));
      const wanted = [...new Set(ids.filter((id): id is string => id !== undefined && !mine.has(id)))];
      const found = await table.bulkGet(wanted);
      return new Map(found.filter((r): r is R => r !== undefined).map((r) => [r.id, r]));
    };
    const taken: ImportPlanInput['taken'] = {
      stations: await othersOf(stations, checked.stations.map((s) => s.id), db.stations),
      latitudeReadings: await othersOf(latitudeReadings, checked.latitudeReadings.map((r) => r.id), db.latitudeReadings),
      arcReadings: await othersOf(arcReadings, checked.arcReadings.map((r) => r.id), db.arcReadings),
      exclusions: await othersOf(exclusions, (checked.exclusions ?? []).map((r) => r.id), db.exclusions),
    };
    const plan = planImport({ campaignId, file: checked, live: liveRows, taken, replace, newId: ctx.newId });
    if (plan.problems.length > 0) throw new ValidationError(plan.problems.map((p) => ({ ...p, source })), source);

    // Stamps are taken here because the plan needs the snapshot; ticking the clock is in memory
    // and synchronous, so nothing outside IndexedDB is awaited inside the transaction (style.md §8).
    const nowMs = ctx.now();
    const changes: ChangeRow[] = [];
    const metaOf = <C extends ImportCollection>(collection: C, w: PlannedWrite<C>): RowMeta => {
      const hlc = ctx.clock.tick();
      const changeId = ctx.newId();
      const baseHlc = w.current?.hlc ?? null;
      changes.push({
        changeId, campaignId, recordKind: KIND_OF[collection], recordId: w.id, op: w.op, record: w.op === 'put' ? w.record : null,
        hlc, deviceId: ctx.deviceId, baseHlc, protocolVersion: PROTOCOL_VERSION, state: 'pending', loggedMs: nowMs,
      });
      written[collection].set(w.id, hlc);
      return { id: w.id, campaignId, changeId, hlc, deviceId: ctx.deviceId, baseHlc, deleted: w.op === 'delete' ? 1 : 0, savedMs: nowMs };
    };
    // A tombstone keeps its last record and index fields (as FieldStore.deleteRecord does).
    const stationRows: StationRow[] = plan.writes.stations.map((w) => w.op === 'delete'
      ? { ...w.current, ...metaOf('stations', w) }
      : { ...metaOf('stations', w), code: w.record.code, record: w.record });
    const latitudeRows: LatitudeReadingRow[] = plan.writes.latitudeReadings.map((w) => w.op === 'delete'
      ? { ...w.current, ...metaOf('latitudeReadings', w) }
      : { ...metaOf('latitudeReadings', w), station: w.record.station, observedMs: observedMsOf(w.record.observedAt), record: w.record });
    const arcRows: ArcReadingRow[] = plan.writes.arcReadings.map((w) => w.op === 'delete'
      ? { ...w.current, ...metaOf('arcReadings', w) }
      : { ...metaOf('arcReadings', w), fromStation: w.record.fromStation, toStation: w.record.toStation, observedMs: observedMsOf(w.record.observedAt), record: w.record });
    const exclusionRows: ExclusionRow[] = plan.writes.exclusions.map((w) => w.op === 'delete'
      ? { ...w.current, ...metaOf('exclusions', w) }
      : { ...metaOf('exclusions', w), readingId: w.record.readingId, record: w.record });
    arm(changes.length);

    await db.stations.bulkPut(stationRows);
    await db.latitudeReadings.bulkPut(latitudeRows);
    await db.arcReadings.bulkPut(arcRows);
    await db.exclusions.bulkPut(exclusionRows);
    await db.changes.bulkAdd(changes);
    if (changes.length > 0) await db.settings.put({ key: SETTING_HLC, value: ctx.clock.current() });
    return plan.counts;
  });

  let byCollection: Record<ImportCollection, ImportCounts>;
  try {
    byCollection = await Promise.race([tx, watchdog]);
  } catch (err) {
    if (isOurs(err)) throw err;
    throw classifyStorageError(err, 'campaigns', campaignId);
  } finally {
    clearTimeout(timer);
  }

  // Read back every written row before reporting success.
  try {
    for (const collection of IMPORT_COLLECTIONS) {
      const ids = [...written[collection].keys()];
      if (ids.length === 0) continue;
      const back = await db.table<{ id: string; hlc: string }, string>(collection).bulkGet(ids);
      back.forEach((row, i) => {
        if (!row || row.hlc !== written[collection].get(ids[i])) throw new StorageError('unknown', collection, ids[i], 'ReadBackMismatch');
      });
    }
  } catch (err) {
    throw classifyStorageError(err, 'campaigns', campaignId);
  }
  const total = (k: keyof ImportCounts): number => IMPORT_COLLECTIONS.reduce((n, c) => n + byCollection[c][k], 0);
  return { campaignId, byCollection, added: total('added'), changed: total('changed'), removed: total('removed'), unchanged: total('unchanged') };
}
