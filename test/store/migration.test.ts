// Schema migration: seed a database at the released v1 schema (from the frozen fixture, not from
// the code), open it with the current code and check every row survived, row by row, with the
// v2 field derived. Expected epoch values were computed independently (Python, see the fixture).
import { readFileSync } from 'node:fs';
import { Dexie } from 'dexie';
import { describe, expect, it } from 'vitest';
import { ArcfieldDb, DB_SCHEMA_VERSION, SCHEMA_V1, openFieldStore, loadCampaignRecords, readingPage } from '../../src/store/index.ts';

const here = new URL('./fixtures/', import.meta.url);
const frozen = JSON.parse(readFileSync(new URL('schema-v1.json', here), 'utf8')) as { version: number; stores: Record<string, string> };
type Row = Record<string, unknown> & { id?: string; key?: string };
const seed = JSON.parse(readFileSync(new URL('seed-v1.json', here), 'utf8')) as Record<string, Row[]> & { expectedObservedMs: Record<string, number> };
const TABLES = ['campaigns', 'stations', 'latitudeReadings', 'arcReadings', 'exclusions', 'changes', 'settings'] as const;

async function seedV1(name: string): Promise<void> {
  const old = new Dexie(name);
  old.version(frozen.version).stores(frozen.stores);
  await old.open();
  for (const t of TABLES) await old.table(t).bulkAdd(seed[t]);
  old.close();
}

describe('schema versions', () => {
  it('v1 in the code is exactly the frozen released schema', () => {
    expect(SCHEMA_V1).toEqual(frozen.stores);
    expect(DB_SCHEMA_VERSION).toBe(2);
  });

  it('upgrades a seeded v1 database to v2 keeping every row and deriving observedMs', async () => {
    const name = `mig-${Math.random()}`;
    await seedV1(name);
    const db = new ArcfieldDb(name);
    await db.open();
    expect(db.verno).toBe(2);
    for (const t of TABLES) {
      const rows = await db.table<Row>(t).toArray();
      expect(rows.length, `${t} row count`).toBe(seed[t].length);
      for (const original of seed[t]) {
        const key = t === 'settings' ? original.key : t === 'changes' ? undefined : original.id;
        if (key === undefined) continue;
        const now = await db.table<Row>(t).get(key);
        expect(now, `${t} ${key}`).toMatchObject(original);
      }
    }
    const change = await db.changes.where('changeId').equals('chg-lat-1').first();
    expect(change).toMatchObject(seed.changes[0]);
    for (const t of ['latitudeReadings', 'arcReadings'] as const) {
      for (const row of await db.table<Row & { observedMs: number }>(t).toArray()) {
        expect(row.observedMs, `${t} ${row.id} observedMs`).toBe(seed.expectedObservedMs[row.id as string]);
      }
    }
    // The new v2 index answers in observation order (lat-2 at 20:05Z precedes lat-1 at 21:30Z).
    const page = await readingPage(db, 'cmp-0001', 'latitude', 0, 10);
    expect(page.rows.map((r) => r.id)).toEqual(['lat-2', 'lat-1', 'lat-3', 'lat-4']);
    expect(page.total).toBe(4);
    expect(await db.conflicts.count()).toBe(0);
    db.close();
  });

  it('the upgraded database keeps working through the store API (device id and clock restored)', async () => {
    const name = `mig-${Math.random()}`;
    await seedV1(name);
    const store = await openFieldStore({ name, now: () => 1939150000000 });
    expect(store.deviceId).toBe('dev-seed');
    // The seeded clock stamp was at wall 1939150000040; a new stamp must sort after it even though
    // the injected wall clock is behind.
    const row = await store.saveStation('cmp-0001', { code: 'K04' });
    expect(row.hlc > '0001939150000040:00000').toBe(true);
    expect(row.hlc.startsWith('0001939150000040:')).toBe(true);
    const recs = await loadCampaignRecords(store.db, 'cmp-0001');
    expect(recs?.stations.map((s) => s.code).sort()).toEqual(['K01', 'K02', 'K03', 'K04']);
    expect(recs?.latitudeReadings).toHaveLength(4); // the tombstone lat-5 is left out
    expect(recs?.exclusions).toHaveLength(1);
    store.db.close();
  });
});
