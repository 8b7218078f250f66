// The repository the screens use: every save validates its record with the campaign schema,
// commits it with its change-log row in one transaction (commit-record.ts) and returns the row
// as read back. Deletes and undos are tombstones. Reads live in campaign-queries.ts.
// The schemas load with the first write (load-record-checks.ts), before any transaction opens:
// a Dexie transaction must not await anything but Dexie, and the app's first screen needs no zod.
import type { ArcReading, Exclusion, LatitudeReading, Station } from '../campaign/records.ts';
import { InputError } from '../errors.ts';
import { ArcfieldDb, type IndexedDbDeps } from './arcfield-db.ts';
import type { CampaignRecord } from './campaign-record.ts';
import { commitRecord, tableOf } from './commit-record.ts';
import { loadDeviceContext, type DeviceContext, type DeviceContextOptions } from './device-context.ts';
import type {
  ArcReadingRow, CampaignRow, ExclusionRow, GnssFixRow, LatitudeReadingRow, RecordRowByKind, StationRow,
} from './rows.ts';
import { loadRecordChecks } from './load-record-checks.ts';
import { observedMsOf } from './schema-v2.ts';

export interface FieldStoreOptions extends IndexedDbDeps, DeviceContextOptions {
  name?: string;
}

export type NewCampaign = Omit<CampaignRecord, 'id' | 'createdAt'>;
export type StationInput = Omit<Station, 'id'> & { id?: string };
export type LatitudeReadingInput = Omit<LatitudeReading, 'id'> & { id?: string };
export type ArcReadingInput = Omit<ArcReading, 'id'> & { id?: string };

type MutableKind = 'campaign' | 'station' | 'latitudeReading' | 'arcReading' | 'exclusion';

export class FieldStore {
  constructor(readonly db: ArcfieldDb, readonly ctx: DeviceContext) {}

  get deviceId(): string {
    return this.ctx.deviceId;
  }

  async createCampaign(input: NewCampaign): Promise<CampaignRow> {
    const id = this.ctx.newId();
    const { validateRecord, CampaignRecordSchema } = await loadRecordChecks('campaign', id);
    const record = validateRecord(CampaignRecordSchema, { ...input, id, createdAt: new Date(this.ctx.now()).toISOString() }, 'campaign');
    return commitRecord(this.db, this.ctx, {
      kind: 'campaign', campaignId: id, recordId: id, op: 'put',
      build: (_cur, meta) => ({ ...meta, record }),
    });
  }

  async updateCampaign(id: string, patch: Partial<NewCampaign>): Promise<CampaignRow> {
    const { validateRecord, CampaignRecordSchema } = await loadRecordChecks('campaign', id);
    return commitRecord(this.db, this.ctx, {
      kind: 'campaign', campaignId: id, recordId: id, op: 'put',
      build: (cur, meta) => {
        if (!cur?.record || cur.deleted) throw new InputError('campaign', id, 'no such campaign on this device');
        const record = validateRecord(CampaignRecordSchema, { ...cur.record, ...patch }, 'campaign');
        return { ...meta, record };
      },
    });
  }

  async saveStation(campaignId: string, input: StationInput): Promise<StationRow> {
    const id = input.id ?? this.ctx.newId();
    const { validateRecord, StationSchema } = await loadRecordChecks('station', id);
    const record = validateRecord(StationSchema, { ...input, id }, 'station') as Station & { id: string };
    return commitRecord(this.db, this.ctx, {
      kind: 'station', campaignId, recordId: id, op: 'put', alsoTables: [this.db.campaigns],
      build: async (cur, meta) => {
        await this.requireCampaign(campaignId);
        this.requireSameCampaign(cur, campaignId, id);
        const clash = await this.db.stations.where('[campaignId+deleted+code]').equals([campaignId, 0, record.code]).first();
        if (clash && clash.id !== id) throw new InputError('code', record.code, `station ${record.code} already exists in this campaign`);
        return { ...meta, code: record.code, record };
      },
    });
  }

  /**
   * Save a latitude reading. `rawFixIds` are raw GNSS fixes already kept by `keepRawFix` during the
   * capture; they are linked to the reading in the same transaction.
   */
  async saveLatitudeReading(campaignId: string, input: LatitudeReadingInput, rawFixIds: readonly string[] = []): Promise<LatitudeReadingRow> {
    const id = input.id ?? this.ctx.newId();
    const { validateRecord, LatitudeReadingSchema } = await loadRecordChecks('latitudeReading', id);
    const record = validateRecord(LatitudeReadingSchema, { ...input, id }, 'latitude reading');
    return commitRecord(this.db, this.ctx, {
      kind: 'latitudeReading', campaignId, recordId: id, op: 'put', alsoTables: [this.db.stations, this.db.gnssFixes],
      build: async (cur, meta) => {
        this.requireSameCampaign(cur, campaignId, id);
        await this.requireStation(campaignId, record.station, 'station');
        if (rawFixIds.length) await this.db.gnssFixes.where('id').anyOf([...rawFixIds]).modify({ readingId: id });
        return { ...meta, station: record.station, observedMs: observedMsOf(record.observedAt), record };
      },
    });
  }

  async saveArcReading(campaignId: string, input: ArcReadingInput): Promise<ArcReadingRow> {
    const id = input.id ?? this.ctx.newId();
    const { validateRecord, ArcReadingSchema } = await loadRecordChecks('arcReading', id);
    const record = validateRecord(ArcReadingSchema, { ...input, id }, 'arc reading');
    return commitRecord(this.db, this.ctx, {
      kind: 'arcReading', campaignId, recordId: id, op: 'put', alsoTables: [this.db.stations],
      build: async (cur, meta) => {
        this.requireSameCampaign(cur, campaignId, id);
        await this.requireStation(campaignId, record.fromStation, 'fromStation');
        await this.requireStation(campaignId, record.toStation, 'toStation');
        return { ...meta, fromStation: record.fromStation, toStation: record.toStation, observedMs: observedMsOf(record.observedAt), record };
      },
    });
  }

  /** A person leaves one reading out of the fit, with a reason (an exclusion record, synced). */
  async excludeReading(campaignId: string, readingId: string, reason: string, excludedBy: string): Promise<ExclusionRow> {
    const id = this.ctx.newId();
    const { validateRecord, ExclusionSchema } = await loadRecordChecks('exclusion', id);
    const record: Exclusion = validateRecord(ExclusionSchema, {
      id, readingId, reason: reason.trim(), excludedBy: excludedBy.trim(), at: new Date(this.ctx.now()).toISOString(),
    }, 'exclusion');
    return commitRecord(this.db, this.ctx, {
      kind: 'exclusion', campaignId, recordId: id, op: 'put', alsoTables: [this.db.latitudeReadings, this.db.arcReadings],
      build: async (_cur, meta) => {
        const reading = (await this.db.arcReadings.get(readingId)) ?? (await this.db.latitudeReadings.get(readingId));
        if (!reading || reading.deleted || reading.campaignId !== campaignId) throw new InputError('readingId', readingId, 'no such reading in this campaign');
        const already = await this.db.exclusions.where('[campaignId+readingId+deleted]').equals([campaignId, readingId, 0]).first();
        if (already) throw new InputError('readingId', readingId, 'this reading is already excluded');
        return { ...meta, readingId, record };
      },
    });
  }

  /** Undo every live exclusion of a reading (tombstones). Returns how many were undone. */
  async undoExclusion(campaignId: string, readingId: string): Promise<number> {
    const live = await this.db.exclusions.where('[campaignId+readingId+deleted]').equals([campaignId, readingId, 0]).toArray();
    for (const row of live) await this.deleteRecord('exclusion', row.id);
    return live.length;
  }

  /** Delete = tombstone: the row stays with `deleted: 1` and a `delete` change goes to the log. */
  async deleteRecord<K extends MutableKind>(kind: K, id: string): Promise<RecordRowByKind[K]> {
    const current = await tableOf(this.db, kind).get(id);
    if (!current) throw new InputError('id', id, `no such ${kind} on this device`);
    return commitRecord(this.db, this.ctx, {
      kind, campaignId: current.campaignId, recordId: id, op: 'delete',
      build: (cur, meta) => {
        if (!cur) throw new InputError('id', id, `no such ${kind} on this device`);
        if (cur.deleted) throw new InputError('id', id, `this ${kind} is already deleted`);
        return { ...cur, ...meta };
      },
    });
  }

  /** Keep one raw GNSS fix as it arrives (audit trail, R-3.8); linked to its reading on save. */
  async keepRawFix(fix: Omit<GnssFixRow, 'id' | 'readingId'>): Promise<string> {
    const id = this.ctx.newId();
    await this.db.gnssFixes.add({ ...fix, id, readingId: null });
    return id;
  }

  private async requireCampaign(campaignId: string): Promise<void> {
    const c = await this.db.campaigns.get(campaignId);
    if (!c || c.deleted) throw new InputError('campaign', campaignId, 'no such campaign on this device');
  }

  private requireSameCampaign(cur: { campaignId: string } | undefined, campaignId: string, id: string): void {
    if (cur && cur.campaignId !== campaignId) throw new InputError('id', id, 'this id belongs to another campaign');
  }

  private async requireStation(campaignId: string, code: string, field: string): Promise<void> {
    const s = await this.db.stations.where('[campaignId+deleted+code]').equals([campaignId, 0, code]).first();
    if (!s) throw new InputError(field, code, `station ${code} is not in this campaign; add it first`);
  }
}

/** Open (creating or upgrading) the device database and load the device identity and clock. */
export async function openFieldStore(opts: FieldStoreOptions = {}): Promise<FieldStore> {
  const db = new ArcfieldDb(opts.name, { indexedDB: opts.indexedDB, IDBKeyRange: opts.IDBKeyRange });
  await db.open();
  const ctx = await loadDeviceContext(db, opts);
  return new FieldStore(db, ctx);
}
