// Is the crew's data safe on this phone? Persistent storage is requested with the first saved
// reading (the browser may evict non-persistent data under pressure — field-traps ), and the
// status panel shows protection, usage against quota, the unsynced count and the last sync.
import type { ArcfieldDb } from './arcfield-db.ts';
import type { ChangeState } from './rows.ts';

/**
 * Key range over every campaign for one change state. Ids are ASCII (records.ts id pattern), so
 * '\uffff' bounds them; two `Dexie.maxKey` entries in one compound bound make IndexedDB throw DataError.
 */
export function anyCampaign(state: ChangeState): [[string, string, number], [string, string, number]] {
  return [[state, '', -Infinity], [state, '\uffff', Infinity]];
}

/** Usage above this share of the quota gets a warning. */
export const STORAGE_WARN_FRACTION = 0.8;

export const SETTING_PERSIST = 'storagePersist';
export const SETTING_LAST_SYNC_PREFIX = 'lastSyncAt:';

/** The part of `navigator.storage` we use, injectable for tests. */
export interface StorageManagerLike {
  persist?: () => Promise<boolean>;
  persisted?: () => Promise<boolean>;
  estimate?: () => Promise<{ usage?: number; quota?: number }>;
}

export interface StorageStatus {
  /** null when the browser has no StorageManager (then nothing can be promised). */
  persisted: boolean | null;
  /** Whether persistence has been asked for already (it is asked once, with the first reading). */
  persistAsked: boolean;
  usageBytes: number | null;
  quotaBytes: number | null;
  nearlyFull: boolean;
  unsyncedCount: number;
  rejectedCount: number;
  /** Latest successful sync of any campaign, ISO 8601, or null when never synced. */
  lastSyncAt: string | null;
}

export function browserStorage(): StorageManagerLike | undefined {
  return typeof navigator !== 'undefined' ? navigator.storage : undefined;
}

/** Ask once for persistent storage; later calls return the stored answer. */
export async function requestPersistenceOnce(db: ArcfieldDb, storage: StorageManagerLike | undefined = browserStorage()): Promise<boolean | null> {
  const asked = await db.settings.get(SETTING_PERSIST);
  if (asked) return (asked.value as { granted: boolean | null }).granted;
  let granted: boolean | null = null;
  if (storage?.persist) {
    const already = storage.persisted ? await storage.persisted() : false;
    granted = already || await storage.persist();
  }
  await db.settings.put({ key: SETTING_PERSIST, value: { granted, askedAt: new Date().toISOString() } });
  return granted;
}

export async function storageStatus(db: ArcfieldDb, storage: StorageManagerLike | undefined = browserStorage()): Promise<StorageStatus> {
  const [persisted, estimate, asked, unsyncedCount, rejectedCount, syncRows] = await Promise.all([
    storage?.persisted ? storage.persisted() : Promise.resolve(null),
    storage?.estimate ? storage.estimate() : Promise.resolve(null),
    db.settings.get(SETTING_PERSIST),
    db.changes.where('[state+campaignId+seq]').between(...anyCampaign('pending')).count(),
    db.changes.where('[state+campaignId+seq]').between(...anyCampaign('rejected')).count(),
    db.settings.where('key').startsWith(SETTING_LAST_SYNC_PREFIX).toArray(),
  ]);
  const usage = estimate?.usage ?? null;
  const quota = estimate?.quota ?? null;
  const syncTimes = syncRows.map((r) => r.value).filter((v): v is string => typeof v === 'string').sort();
  return {
    persisted,
    persistAsked: asked !== undefined,
    usageBytes: usage,
    quotaBytes: quota,
    nearlyFull: usage !== null && quota !== null && quota > 0 && usage / quota > STORAGE_WARN_FRACTION,
    unsyncedCount,
    rejectedCount,
    lastSyncAt: syncTimes.length ? syncTimes[syncTimes.length - 1] : null,
  };
}
