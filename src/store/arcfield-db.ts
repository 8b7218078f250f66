// The device database (Dexie 4 over IndexedDB). Opened with strict durability: the browser reports
// a transaction complete only after it reached disk (Chromium's `durability: 'strict'`), which
// costs little because writes are paced by a person (field-traps ).
import { Dexie, type DexieOptions, type Table } from 'dexie';
import { SCHEMA_V1, SCHEMA_V1_VERSION } from './schema-v1.ts';
import { SCHEMA_V2, SCHEMA_V2_VERSION, upgradeToV2 } from './schema-v2.ts';
import type {
  ArcReadingRow, CampaignRow, ChangeRow, ConflictRow, ExclusionRow, GnssFixRow, LatitudeReadingRow,
  SettingRow, StationRow,
} from './rows.ts';

/** The schema version this code opens (the highest `db.version(n)` below). */
export const DB_SCHEMA_VERSION = SCHEMA_V2_VERSION;
export const DEFAULT_DB_NAME = 'arcfield';

/** Injected IndexedDB (fake-indexeddb in Node tests); the browser's globals otherwise. */
export type IndexedDbDeps = Pick<DexieOptions, 'indexedDB' | 'IDBKeyRange'>;

export class ArcfieldDb extends Dexie {
  declare campaigns: Table<CampaignRow, string>;
  declare stations: Table<StationRow, string>;
  declare latitudeReadings: Table<LatitudeReadingRow, string>;
  declare arcReadings: Table<ArcReadingRow, string>;
  declare exclusions: Table<ExclusionRow, string>;
  declare gnssFixes: Table<GnssFixRow, string>;
  declare changes: Table<ChangeRow, number>;
  declare settings: Table<SettingRow, string>;
  declare conflicts: Table<ConflictRow, string>;

  constructor(name: string = DEFAULT_DB_NAME, deps: IndexedDbDeps = {}) {
    // Only pass what was given: an explicit `undefined` would override Dexie's browser defaults.
    const injected: DexieOptions = {};
    if (deps.indexedDB) injected.indexedDB = deps.indexedDB;
    if (deps.IDBKeyRange) injected.IDBKeyRange = deps.IDBKeyRange;
    super(name, { ...injected, chromeTransactionDurability: 'strict' });
    // Released versions are declared in full and never edited.
    this.version(SCHEMA_V1_VERSION).stores(SCHEMA_V1);
    this.version(SCHEMA_V2_VERSION).stores(SCHEMA_V2).upgrade(upgradeToV2);
  }
}

/** The durability the database was opened with (asserted by a unit test, R-1.7). */
export function durabilityOf(db: Dexie): string | undefined {
  const opts = (db as unknown as { _options?: DexieOptions })._options;
  return opts?.chromeTransactionDurability;
}
