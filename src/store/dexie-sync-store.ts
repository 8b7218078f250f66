// The sync client's port (src/sync/sync-store.ts) over the device database. Pulled changes are
// merged with the shared rules (src/sync/merge.ts) and stored, the server's conflict rows are
// upserted and the cursor advances — all in ONE transaction, so a crash never moves the cursor past
// a change that was not stored (field-traps ). Every pulled record passes its schema first.
import type { z } from 'zod';
import { RECORD_SCHEMAS, type RecordKind } from '../campaign/records.ts';
import { ValidationError } from '../errors.ts';
import type { ConflictRecord } from '../sync/conflict.ts';
import { mergeChange, versionOf, type RecordVersion } from '../sync/merge.ts';
import type { Change } from '../sync/protocol.ts';
import type { PulledChange, SyncStore } from '../sync/sync-store.ts';
import type { ArcfieldDb } from './arcfield-db.ts';
import { CampaignRecordSchema } from './campaign-record.ts';
import { tableOf } from './commit-record.ts';
import { SETTING_HLC, type DeviceContext } from './device-context.ts';
import type { ChangeRow, RecordRowByKind, RowMeta } from './rows.ts';
import { observedMsOf } from './schema-v2.ts';
import { SETTING_LAST_SYNC_PREFIX } from './storage-status.ts';
import { validateRecord } from './validate-record.ts';

export const SETTING_CURSOR_PREFIX = 'cursor:';

const SCHEMA_OF_KIND: Record<RecordKind, z.ZodType> = { campaign: CampaignRecordSchema, ...RECORD_SCHEMAS };

const LOCAL_FIELDS = ['seq', 'state', 'rejectReason', 'loggedMs'] as const;

/** A change-log row as it goes on the wire: the local bookkeeping removed. */
export function toWireChange(row: ChangeRow): Change {
  const out: Record<string, unknown> = { ...row };
  for (const f of LOCAL_FIELDS) delete out[f];
  return out as unknown as Change;
}

function versionOfRow(row: RowMeta | undefined): RecordVersion | null {
  if (!row) return null;
  return { changeId: row.changeId, hlc: row.hlc, deviceId: row.deviceId, deleted: row.deleted === 1, baseHlc: row.baseHlc };
}

/** The row a pulled change leaves behind; index fields come from the record (or the old row for a delete). */
function rowAfter<K extends RecordKind>(kind: K, change: PulledChange, record: unknown, prev: RecordRowByKind[K] | undefined, nowMs: number): RecordRowByKind[K] {
  const v = versionOf(change);
  const meta: RowMeta = {
    id: change.recordId, campaignId: change.campaignId, changeId: v.changeId, hlc: v.hlc, deviceId: v.deviceId,
    baseHlc: v.baseHlc, deleted: v.deleted ? 1 : 0, savedMs: nowMs,
  };
  const keep = (prev ?? {}) as Partial<RecordRowByKind[RecordKind]> & Record<string, unknown>;
  const r = (v.deleted ? (prev?.record ?? null) : record) as Record<string, unknown> | null;
  const str = (field: string): string => (typeof r?.[field] === 'string' ? r[field] : typeof keep[field] === 'string' ? keep[field] : '');
  const rows: { [P in RecordKind]: () => RecordRowByKind[P] } = {
    campaign: () => ({ ...meta, record: r as RecordRowByKind['campaign']['record'] }),
    station: () => ({ ...meta, code: str('code'), record: r as RecordRowByKind['station']['record'] }),
    latitudeReading: () => ({ ...meta, station: str('station'), observedMs: observedMsOf(r?.observedAt), record: r as RecordRowByKind['latitudeReading']['record'] }),
    arcReading: () => ({ ...meta, fromStation: str('fromStation'), toStation: str('toStation'), observedMs: observedMsOf(r?.observedAt), record: r as RecordRowByKind['arcReading']['record'] }),
    exclusion: () => ({ ...meta, readingId: str('readingId'), record: r as RecordRowByKind['exclusion']['record'] }),
  };
  return rows[kind]();
}

export class DexieSyncStore implements SyncStore {
  constructor(private readonly db: ArcfieldDb, private readonly ctx: DeviceContext) {}

  async pendingChanges(campaignId: string, limit: number): Promise<Change[]> {
    const rows = await this.db.changes.where('[state+campaignId+seq]').between(['pending', campaignId, -Infinity], ['pending', campaignId, Infinity]).limit(limit).toArray();
    return rows.map(toWireChange);
  }

  async pendingCount(campaignId: string): Promise<number> {
    return this.db.changes.where('[state+campaignId+seq]').between(['pending', campaignId, -Infinity], ['pending', campaignId, Infinity]).count();
  }

  async markAcknowledged(changeIds: readonly string[]): Promise<void> {
    if (!changeIds.length) return;
    await this.db.changes.where('changeId').anyOf([...changeIds]).modify({ state: 'acked' });
  }

  async markRejected(rejections: readonly { changeId: string; reason: string }[]): Promise<void> {
    await this.db.transaction('rw', this.db.changes, async () => {
      for (const r of rejections) await this.db.changes.where('changeId').equals(r.changeId).modify({ state: 'rejected', rejectReason: r.reason });
    });
  }

  async cursor(campaignId: string): Promise<number> {
    const row = await this.db.settings.get(SETTING_CURSOR_PREFIX + campaignId);
    return typeof row?.value === 'number' ? row.value : 0;
  }

  async applyPulled(campaignId: string, changes: readonly PulledChange[], nextCursor: number, conflicts: readonly ConflictRecord[] = []): Promise<void> {
    // Validate before the transaction: a refused record stops the batch and the cursor stays put.
    const records = changes.map((c, i) => {
      if (c.campaignId !== campaignId) throw new ValidationError([{ field: `changes[${i}].campaignId`, value: c.campaignId, reason: `not the campaign being synced (${campaignId})` }], 'pulled changes');
      return c.op === 'delete' ? null : validateRecord(SCHEMA_OF_KIND[c.recordKind], c.record, `pulled ${c.recordKind} ${c.recordId}`);
    });
    const { db } = this;
    const nowMs = this.ctx.now();
    // The client receives pulled stamps first (sync-store.ts); doing it again is idempotent and
    // keeps the persisted clock past them even when a test or tool calls this port directly.
    for (const c of changes) this.ctx.clock.receive(c.hlc);
    await db.transaction('rw', [db.campaigns, db.stations, db.latitudeReadings, db.arcReadings, db.exclusions, db.changes, db.conflicts, db.settings], async () => {
      for (const [i, change] of changes.entries()) {
        const table = tableOf(db, change.recordKind);
        const prev = await table.get(change.recordId);
        const decision = mergeChange(versionOfRow(prev), change);
        if (decision.action === 'apply') await table.put(rowAfter(change.recordKind, change, records[i], prev, nowMs));
        const known = await db.changes.where('changeId').equals(change.changeId).count();
        if (!known) {
          const { serverSeq: _seq, receivedAt: _at, clockSkewFlag: _skew, ...wire } = change;
          await db.changes.add({ ...wire, state: 'pulled', loggedMs: nowMs });
        }
      }
      for (const c of conflicts) await db.conflicts.put(c);
      const key = SETTING_CURSOR_PREFIX + campaignId;
      const stored = await db.settings.get(key);
      const cur = typeof stored?.value === 'number' ? stored.value : 0;
      if (nextCursor > cur) await db.settings.put({ key, value: nextCursor });
      await db.settings.put({ key: SETTING_HLC, value: this.ctx.clock.current() });
    });
  }

  async conflicts(campaignId: string): Promise<ConflictRecord[]> {
    const rows = await this.db.conflicts.where('[campaignId+status]').between([campaignId, ''], [campaignId, '\uffff']).toArray();
    return rows.sort((a, b) => a.serverSeq - b.serverSeq);
  }

  async rejectedCount(campaignId: string): Promise<number> {
    return this.db.changes.where('[state+campaignId+seq]').between(['rejected', campaignId, -Infinity], ['rejected', campaignId, Infinity]).count();
  }

  async lastSyncAt(campaignId: string): Promise<string | null> {
    const row = await this.db.settings.get(SETTING_LAST_SYNC_PREFIX + campaignId);
    return typeof row?.value === 'string' ? row.value : null;
  }

  async setLastSyncAt(campaignId: string, at: string): Promise<void> {
    await this.db.settings.put({ key: SETTING_LAST_SYNC_PREFIX + campaignId, value: at });
  }
}
