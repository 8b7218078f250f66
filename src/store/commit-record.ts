// The one way a record reaches the device database: ONE short read-write transaction that writes
// the row, its change-log row and the clock stamp, then a read-back by id before anyone says
// "Saved" (field-traps; style.md §8). No network or geolocation call happens inside
// the transaction; checks that need other rows (does the station exist?) run inside it, so they
// see the same snapshot the write commits against.
import type { Table } from 'dexie';
import type { RecordKind } from '../campaign/records.ts';
import { InputError } from '../errors.ts';
import { PROTOCOL_VERSION } from '../sync/protocol.ts';
import type { ArcfieldDb } from './arcfield-db.ts';
import { SETTING_HLC, type DeviceContext } from './device-context.ts';
import type { ChangeRow, RecordRowByKind, RowMeta } from './rows.ts';
import { TABLE_OF_KIND } from './rows.ts';
import { classifyStorageError, StorageError } from './storage-error.ts';

/**
 * A save that has not committed after this long keeps the draft and says "Not saved yet"
 * . A person-paced write normally commits in milliseconds; 10 s covers a phone under load.
 */
export const SAVE_WATCHDOG_MS = 10_000;

export type RowOf<K extends RecordKind> = RecordRowByKind[K];

export interface CommitPlan<K extends RecordKind> {
  kind: K;
  campaignId: string;
  recordId: string;
  op: 'put' | 'delete';
  /**
   * Builds the row inside the transaction from the current row (undefined for a create), after
   * any checks. Throwing here (InputError) aborts the transaction and nothing is written.
   */
  build: (current: RowOf<K> | undefined, meta: RowMeta) => Promise<RowOf<K>> | RowOf<K>;
  /** Extra tables the build step reads or writes. */
  alsoTables?: Table[];
  /** Conflict ids this edit resolves (a lead's resolution, src/sync/resolution.ts). */
  resolves?: readonly string[];
}

export function tableOf<K extends RecordKind>(db: ArcfieldDb, kind: K): Table<RowOf<K>, string> {
  return db.table(TABLE_OF_KIND[kind]);
}

/** Run a commit; resolves with the row as read back, or rejects with InputError / ValidationError / StorageError. */
export async function commitRecord<K extends RecordKind>(db: ArcfieldDb, ctx: DeviceContext, plan: CommitPlan<K>): Promise<RowOf<K>> {
  const table = tableOf(db, plan.kind);
  const hlc = ctx.clock.tick();
  const changeId = ctx.newId();
  const savedMs = ctx.now();
  const meta: RowMeta = {
    id: plan.recordId, campaignId: plan.campaignId, changeId, hlc, deviceId: ctx.deviceId, baseHlc: null,
    deleted: plan.op === 'delete' ? 1 : 0, savedMs,
  };

  const tx = db.transaction('rw', [table, db.changes, db.settings, ...(plan.alsoTables ?? [])], async () => {
    const current = await table.get(plan.recordId);
    if (current?.deleted && plan.op === 'put') {
      // Tombstone wins (merge.ts): a deleted record never comes back under its old id.
      throw new InputError('id', plan.recordId, 'this record was deleted; enter it again as a new one');
    }
    const row = await plan.build(current, { ...meta, baseHlc: current?.hlc ?? null });
    await table.put(row);
    const change: ChangeRow = {
      changeId,
      campaignId: plan.campaignId,
      recordKind: plan.kind,
      recordId: plan.recordId,
      op: plan.op,
      record: plan.op === 'delete' ? null : row.record,
      hlc,
      deviceId: ctx.deviceId,
      baseHlc: current?.hlc ?? null,
      protocolVersion: PROTOCOL_VERSION,
      ...(plan.resolves?.length ? { resolves: [...plan.resolves] } : {}),
      state: 'pending',
      loggedMs: savedMs,
    };
    await db.changes.add(change);
    await db.settings.put({ key: SETTING_HLC, value: ctx.clock.current() });
  });

  let timer: ReturnType<typeof setTimeout> | undefined;
  const watchdog = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new StorageError('timeout', TABLE_OF_KIND[plan.kind], plan.recordId, 'TimeoutError')), SAVE_WATCHDOG_MS);
  });
  try {
    await Promise.race([tx, watchdog]);
  } catch (err) {
    if (err instanceof StorageError) throw err;
    if (err instanceof Error && (err.name === 'InputError' || err.name === 'ValidationError')) throw err;
    throw classifyStorageError(err, TABLE_OF_KIND[plan.kind], plan.recordId);
  } finally {
    clearTimeout(timer);
  }

  const back = await table.get(plan.recordId).catch((err: unknown) => {
    throw classifyStorageError(err, TABLE_OF_KIND[plan.kind], plan.recordId);
  });
  if (!back || back.hlc !== hlc) {
    throw new StorageError('unknown', TABLE_OF_KIND[plan.kind], plan.recordId, 'ReadBackMismatch');
  }
  return back;
}
