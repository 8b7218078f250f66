// End to end with the real device store: two field devices on the Dexie database (fake-indexeddb),
// writing through commitRecord, syncing with the real SyncClient against the real server on a
// SQLite file. A concurrent edit becomes the same conflict on both devices and on the server, the
// lead's resolution closes it everywhere, and a deletion beats a late edit from an offline device.
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { LatitudeReading } from '../../src/campaign/records.ts';
import { createCampaign } from '../../src/server/create-campaign.ts';
import { createServer } from '../../src/server/create-server.ts';
import type { SqliteStorage } from '../../src/server/sqlite-storage.ts';
import { newToken } from '../../src/server/tokens.ts';
import { ArcfieldDb } from '../../src/store/arcfield-db.ts';
import { commitRecord } from '../../src/store/commit-record.ts';
import { loadDeviceContext, type DeviceContext } from '../../src/store/device-context.ts';
import { DexieSyncStore } from '../../src/store/dexie-sync-store.ts';
import type { LatitudeReadingRow } from '../../src/store/rows.ts';
import { resolutionFor } from '../../src/sync/resolution.ts';
import { SyncClient } from '../../src/sync/sync-client.ts';
import { latitudeRecord, tempSqlite } from '../server/helpers/fixtures.ts';
import { injectFetch } from './helpers/inject-fetch.ts';

const CAMPAIGN = 'cmp-dexie';

interface FieldDevice {
  db: ArcfieldDb;
  ctx: DeviceContext;
  store: DexieSyncStore;
  client: SyncClient;
  setTime: (ms: number) => void;
}

describe('two Dexie devices and the server', () => {
  const sqlite = tempSqlite();
  let storage: SqliteStorage;
  let app: FastifyInstance;
  let lead: FieldDevice;
  let crew: FieldDevice;

  async function device(name: string, role: 'lead' | 'observer', leadToken: string): Promise<FieldDevice> {
    let t = Date.UTC(2026, 8, 1, 20, 0, 0);
    let n = 0;
    const db = new ArcfieldDb(`arcfield-e2e-${name}`);
    await db.open();
    const ctx = await loadDeviceContext(db, { now: () => t, newId: () => `${name}-${++n}` });
    let token = leadToken;
    if (role !== 'lead') {
      const made = newToken(CAMPAIGN, role, name, ctx.deviceId, new Date(t));
      await storage.insertToken(made.row);
      token = made.token;
    }
    const store = new DexieSyncStore(db, ctx);
    const client = new SyncClient({ serverUrl: 'http://arcfield.test', campaignId: CAMPAIGN, deviceId: ctx.deviceId, token: () => token, store, clock: ctx.clock, fetch: injectFetch(() => app), now: () => t,
      clockWarnMs: 366 * 86_400_000 }); // device clocks are scripted; the server runs on real time
    return { db, ctx, store, client, setTime: (ms) => { t = ms; } };
  }

  function save(d: FieldDevice, rec: LatitudeReading, op: 'put' | 'delete' = 'put', resolves?: string[]) {
    return commitRecord(d.db, d.ctx, {
      kind: 'latitudeReading', campaignId: CAMPAIGN, recordId: rec.id, op, resolves,
      build: (current, meta): LatitudeReadingRow => ({ ...meta, station: rec.station, observedMs: Date.parse(rec.observedAt), record: op === 'delete' ? current?.record ?? null : rec }),
    });
  }

  const reading = (lat: number) => latitudeRecord('r-k05-1', lat, 'K05') as unknown as LatitudeReading;

  beforeAll(async () => {
    storage = sqlite.open();
    await storage.migrate();
    const c = await createCampaign(storage, 'Invented arc, Dexie', { campaignId: CAMPAIGN });
    app = await createServer({ storage });
    lead = await device('lead', 'lead', c.leadToken);
    crew = await device('crew', 'observer', c.leadToken);
  });
  afterAll(async () => {
    lead.db.close();
    crew.db.close();
    await app.close();
    await storage.close();
    sqlite.cleanup();
  });

  const serverRow = async (id: string) => (await storage.listRecords(CAMPAIGN)).find((r) => r.recordId === id);

  it('a concurrent edit is the same conflict everywhere, and the resolution closes it everywhere', async () => {
    await save(lead, reading(44.1));
    const first = await lead.client.syncNow();
    expect(first.status, JSON.stringify(first)).toBe('synced');
    await crew.client.syncNow();
    expect((await crew.db.latitudeReadings.get('r-k05-1'))?.record?.latitudeDeg).toBe(44.1);

    // Both edit the same reading before either syncs; the crew's clock is later, so the crew wins.
    await save(lead, reading(44.2));
    crew.setTime(Date.UTC(2026, 8, 1, 21, 0, 0));
    await save(crew, reading(44.3));
    await lead.client.syncNow();
    await crew.client.syncNow();
    await lead.client.syncNow();

    const server = await serverRow('r-k05-1');
    expect(server?.record).toMatchObject({ latitudeDeg: 44.3 });
    for (const d of [lead, crew]) {
      const row = await d.db.latitudeReadings.get('r-k05-1');
      expect(row?.record?.latitudeDeg).toBe(44.3);
      expect(row?.changeId).toBe(server?.version.changeId);
    }
    const [onServer] = await storage.listConflicts(CAMPAIGN);
    expect(onServer).toMatchObject({ reason: 'concurrent-edit', status: 'open' });
    expect(onServer.loser.record).toMatchObject({ latitudeDeg: 44.2 });
    expect(await lead.store.conflicts(CAMPAIGN)).toEqual([onServer]);
    expect(await crew.store.conflicts(CAMPAIGN)).toEqual([onServer]);
    expect(lead.client.getState()).toMatchObject({ status: 'needs-attention', openConflicts: 1 });

    // The lead keeps the losing value; the resolution is an edit like any other.
    const r = resolutionFor(onServer, { keep: 'loser' });
    lead.setTime(Date.UTC(2026, 8, 1, 22, 0, 0));
    await save(lead, r.record as LatitudeReading, 'put', r.resolves);
    await lead.client.syncNow();
    await crew.client.syncNow();
    for (const d of [lead, crew]) {
      expect((await d.db.latitudeReadings.get('r-k05-1'))?.record?.latitudeDeg).toBe(44.2);
      expect((await d.store.conflicts(CAMPAIGN))[0]).toMatchObject({ status: 'resolved' });
    }
    expect(crew.client.getState()).toMatchObject({ status: 'synced', openConflicts: 0 });
  });

  it('a deletion beats a late edit from a device that was offline', async () => {
    lead.setTime(Date.UTC(2026, 8, 2, 20, 0, 0));
    await save(lead, reading(44.2), 'delete');
    crew.setTime(Date.UTC(2026, 9, 2, 20, 0, 0)); // a month later, still offline
    await save(crew, reading(44.9));
    await lead.client.syncNow();
    await crew.client.syncNow();
    await lead.client.syncNow();
    expect((await serverRow('r-k05-1'))?.version.deleted).toBe(true);
    for (const d of [lead, crew]) expect((await d.db.latitudeReadings.get('r-k05-1'))?.deleted).toBe(1);
    const late = (await storage.listConflicts(CAMPAIGN)).find((c) => c.reason === 'edit-after-delete');
    expect(late?.loser.record).toMatchObject({ latitudeDeg: 44.9 });
    expect((await crew.store.conflicts(CAMPAIGN)).map((c) => c.conflictId)).toContain(late?.conflictId);
  });
});
