// Schema migrations on both databases: a database frozen at schema v1 (test/fixtures/server/*-v1.sql,
// seeded with an invented campaign) upgrades to the current version with its data intact; a
// database from a newer server is refused; a failing migration leaves the previous version whole.
import { readFileSync } from 'node:fs';
import Database from 'better-sqlite3';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { PostgresStorage } from '../../src/server/postgres-storage.ts';
import { POSTGRES_MIGRATIONS } from '../../src/server/postgres-migrations.ts';
import { pushBatch } from '../../src/server/push-batch.ts';
import { SQLITE_MIGRATIONS, type Migration } from '../../src/server/sqlite-migrations.ts';
import { SqliteStorage } from '../../src/server/sqlite-storage.ts';
import type { SyncStorage } from '../../src/server/storage.ts';
import { latitudeRecord, putChange, stamp, tempSqlite } from './helpers/fixtures.ts';
import { announcePgSkip, freshPgSchema, PG_URL, pgRequiredButMissing, type PgSchema } from './helpers/pg-target.ts';

const fixture = (name: string) => readFileSync(new URL(`../fixtures/server/${name}`, import.meta.url), 'utf8');
const BROKEN_V3 = (m: readonly Migration[]): Migration[] => [...m, { version: 3, description: 'broken on purpose', statements: ['CREATE TABLE extra_table (x INTEGER)', 'THIS IS NOT SQL'] }];

async function checkUpgradedV1(storage: SyncStorage): Promise<void> {
  expect(await storage.schemaVersion()).toBe(1);
  expect(await storage.migrate()).toBe(2);
  // Data of v1 intact.
  const records = await storage.listRecords('cmp-old');
  expect(records.map((r) => [r.recordId, r.version.deleted])).toEqual([['r-gone', true], ['r-old', false]]);
  expect(records.find((r) => r.recordId === 'r-old')?.record).toMatchObject({ station: 'K03', latitudeDeg: 44.25 });
  expect(await storage.countChanges('cmp-old')).toBe(2);
  // Migration 2: of the two live tokens bound to dev-k, the newer stays live, the older is revoked.
  const tokens = await storage.listTokens('cmp-old');
  expect(tokens.map((t) => [t.id, t.revokedAt === null])).toEqual([['tok-1', true], ['tok-2', false], ['tok-3', true]]);
  // And the upgraded database keeps working: the next change gets the next sequence.
  const next = putChange('cmp-old', 'dev-k', 'r-new', latitudeRecord('r-new'), stamp(Date.UTC(2026, 1, 1)));
  const [res] = await pushBatch(storage, { campaignId: 'cmp-old', role: 'observer', now: () => Date.UTC(2026, 1, 1) }, [next]);
  expect(res).toMatchObject({ status: 'acked', serverSeq: 3 });
  // The tombstone from v1 still wins over a late put.
  const late = putChange('cmp-old', 'dev-k', 'r-gone', latitudeRecord('r-gone'), stamp(Date.UTC(2026, 1, 2)), '0001768067000000:00000');
  const [res2] = await pushBatch(storage, { campaignId: 'cmp-old', role: 'observer', now: () => Date.UTC(2026, 1, 2) }, [late]);
  expect(res2).toMatchObject({ status: 'acked', outcome: 'tombstoned' });
}

describe('SQLite migrations', () => {
  const dbs: ReturnType<typeof tempSqlite>[] = [];
  afterAll(() => dbs.forEach((d) => d.cleanup()));
  const seeded = (sql: string) => {
    const d = tempSqlite();
    dbs.push(d);
    const raw = new Database(d.path);
    raw.exec(sql);
    raw.close();
    return d;
  };

  it('upgrades the frozen v1 database with its data intact', async () => {
    const storage = seeded(fixture('sqlite-schema-v1.sql')).open();
    try {
      await checkUpgradedV1(storage);
    } finally {
      await storage.close();
    }
  });

  it('refuses a database written by a newer server', async () => {
    const d = seeded("CREATE TABLE schema_migrations (version INTEGER PRIMARY KEY, description TEXT NOT NULL, applied_at TEXT NOT NULL); INSERT INTO schema_migrations VALUES (99, 'future', '2030-01-01T00:00:00Z');");
    const storage = d.open();
    await expect(storage.migrate()).rejects.toThrow(/schema versions up to 2/);
    await storage.close();
  });

  it('a failing migration leaves the previous version whole', async () => {
    const d = tempSqlite();
    dbs.push(d);
    const first = d.open();
    await first.migrate();
    await first.close();
    const broken = new SqliteStorage(d.path, { migrations: BROKEN_V3(SQLITE_MIGRATIONS) });
    await expect(broken.migrate()).rejects.toThrow();
    expect(await broken.schemaVersion()).toBe(2);
    await broken.close();
    const raw = new Database(d.path);
    expect(raw.prepare("SELECT name FROM sqlite_master WHERE name = 'extra_table'").get()).toBeUndefined();
    raw.close();
  });
});

if (PG_URL) {
  describe('PostgreSQL migrations', () => {
    const schemas: PgSchema[] = [];
    afterAll(async () => {
      for (const s of schemas) await s.drop();
    });
    const seeded = async (tag: string, sql: string) => {
      const s = await freshPgSchema(tag);
      schemas.push(s);
      const c = new pg.Client({ connectionString: s.url });
      await c.connect();
      try {
        await c.query(sql);
      } finally {
        await c.end();
      }
      return s;
    };

    it('upgrades the frozen v1 database with its data intact', async () => {
      const s = await seeded('mig_v1', fixture('postgres-schema-v1.sql'));
      const storage = new PostgresStorage(s.url);
      try {
        await checkUpgradedV1(storage);
      } finally {
        await storage.close();
      }
    });

    it('refuses a database written by a newer server', async () => {
      const s = await seeded('mig_future', "CREATE TABLE schema_migrations (version INTEGER PRIMARY KEY, description TEXT NOT NULL, applied_at TEXT NOT NULL); INSERT INTO schema_migrations VALUES (99, 'future', '2030-01-01T00:00:00Z');");
      const storage = new PostgresStorage(s.url);
      await expect(storage.migrate()).rejects.toThrow(/schema versions up to 2/);
      await storage.close();
    });

    it('a failing migration leaves the previous version whole', async () => {
      const s = await seeded('mig_broken', 'SELECT 1');
      const ok = new PostgresStorage(s.url);
      await ok.migrate();
      await ok.close();
      const broken = new PostgresStorage(s.url, { migrations: BROKEN_V3(POSTGRES_MIGRATIONS) });
      await expect(broken.migrate()).rejects.toThrow();
      expect(await broken.schemaVersion()).toBe(2);
      await broken.close();
      const c = new pg.Client({ connectionString: s.url });
      await c.connect();
      expect((await c.query("SELECT to_regclass('extra_table') AS t")).rows[0]).toEqual({ t: null });
      await c.end();
    });
  });
} else if (pgRequiredButMissing()) {
  it('PostgreSQL migrations', () => {
    expect.fail('CI is set but ARCFIELD_TEST_PG_URL is not: the PostgreSQL tests must run in CI');
  });
} else {
  announcePgSkip('migrations');
  it.skip('PostgreSQL migrations (ARCFIELD_TEST_PG_URL not set)', () => undefined);
}
