// The same contract against both real databases: a temp SQLite file and PostgreSQL (a schema of
// its own in ARCFIELD_TEST_PG_URL). Expected values are worked out by hand from the merge rules in
// DEVELOPERS.md ("Sync"), never read back from the code under test.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCampaign } from '../../src/server/create-campaign.ts';
import { PostgresStorage } from '../../src/server/postgres-storage.ts';
import { pushBatch, type PushContext } from '../../src/server/push-batch.ts';
import type { SyncStorage } from '../../src/server/storage.ts';
import { hashToken, newToken } from '../../src/server/tokens.ts';
import type { PushResult } from '../../src/sync/wire.ts';
import { deleteChange, latitudeRecord, putChange, stamp, tempSqlite } from './helpers/fixtures.ts';
import { announcePgSkip, freshPgSchema, PG_URL, pgRequiredButMissing, type PgSchema } from './helpers/pg-target.ts';

const T0 = Date.UTC(2026, 2, 2, 20, 0, 0);

function acked(r: PushResult) {
  if (r.status !== 'acked') throw new Error(`expected an ack, got ${JSON.stringify(r)}`);
  return r;
}

function contract(name: string, open: () => Promise<{ storage: SyncStorage; cleanup: () => Promise<void> }>): void {
  describe(`storage contract: ${name}`, () => {
    let storage: SyncStorage;
    let cleanup: () => Promise<void>;
    let n = 0;
    beforeAll(async () => {
      ({ storage, cleanup } = await open());
    });
    afterAll(async () => {
      await cleanup();
    });
    const fresh = async () => {
      n += 1;
      const c = await createCampaign(storage, `Invented arc ${n}`, { campaignId: `cmp-${n}`, now: new Date(T0) });
      const ctx: PushContext = { campaignId: c.campaignId, role: 'lead', now: () => T0 };
      return { c, ctx };
    };

    it('migrates to the latest schema, and again is a no-op', async () => {
      expect(await storage.migrate()).toBe(2);
      expect(await storage.migrate()).toBe(2);
      expect(await storage.schemaVersion()).toBe(2);
    });

    it('stores only the hash of the first lead token', async () => {
      const { c } = await fresh();
      const row = await storage.findTokenByHash(hashToken(c.leadToken));
      expect(row?.role).toBe('lead');
      expect(row?.tokenHash).toMatch(/^[0-9a-f]{64}$/);
      expect(row?.tokenHash).not.toContain(c.leadToken);
    });

    it('a replayed change gets its original outcome and is stored once; a reused id with other content is refused', async () => {
      const { c, ctx } = await fresh();
      const ch = putChange(c.campaignId, 'dev-a', 'r1', latitudeRecord('r1'), stamp(T0));
      const first = acked((await pushBatch(storage, ctx, [ch]))[0]);
      expect(first).toMatchObject({ serverSeq: 1, outcome: 'applied', duplicate: false });
      const again = acked((await pushBatch(storage, ctx, [ch, ch]))[0]);
      expect(again).toMatchObject({ serverSeq: 1, outcome: 'applied', duplicate: true });
      expect(await storage.countChanges(c.campaignId)).toBe(1);
      const forged = await pushBatch(storage, ctx, [{ ...ch, record: latitudeRecord('r1', 42) }]);
      expect(forged[0]).toMatchObject({ status: 'rejected', field: 'changes[0].changeId' });
      expect(await storage.countChanges(c.campaignId)).toBe(1);
    });

    it('concurrent edits: the greater (hlc, device) wins and the loser is kept whole as a conflict', async () => {
      const { c, ctx } = await fresh();
      const base = putChange(c.campaignId, 'dev-a', 'r1', latitudeRecord('r1', 41.1), stamp(T0));
      const fromB = putChange(c.campaignId, 'dev-b', 'r1', latitudeRecord('r1', 41.2), stamp(T0 + 500), base.hlc);
      const fromC = putChange(c.campaignId, 'dev-c', 'r1', latitudeRecord('r1', 41.3), stamp(T0 + 200), base.hlc);
      const res = await pushBatch(storage, ctx, [base, fromB, fromC]);
      expect(res.map((r) => acked(r).outcome)).toEqual(['applied', 'applied', 'conflict']);
      const [rec] = await storage.listRecords(c.campaignId);
      expect(rec.record).toEqual(latitudeRecord('r1', 41.2));
      const [conflict] = await storage.listConflicts(c.campaignId);
      expect(conflict).toMatchObject({ conflictId: fromC.changeId, reason: 'concurrent-edit', status: 'open', serverSeq: 3 });
      expect(conflict.loser.record).toEqual(latitudeRecord('r1', 41.3));
      expect(conflict.winner.changeId).toBe(fromB.changeId);
    });

    it('a deletion wins and never comes back; the late edit is kept as a conflict', async () => {
      const { c, ctx } = await fresh();
      const create = putChange(c.campaignId, 'dev-a', 'r9', latitudeRecord('r9'), stamp(T0));
      const del = deleteChange(c.campaignId, 'dev-b', 'r9', stamp(T0 + 10), create.hlc);
      // A device offline for weeks edits the old version with a much later clock.
      const late = putChange(c.campaignId, 'dev-c', 'r9', latitudeRecord('r9', 40.5), stamp(T0 + 30 * 86_400_000), create.hlc);
      const res = await pushBatch(storage, ctx, [create, del, late]);
      expect(res.map((r) => acked(r).outcome)).toEqual(['applied', 'applied', 'tombstoned']);
      const [rec] = await storage.listRecords(c.campaignId);
      expect(rec.version.deleted).toBe(true);
      expect(rec.record).toBeNull();
      expect((await storage.listConflicts(c.campaignId))[0]).toMatchObject({ conflictId: late.changeId, reason: 'edit-after-delete' });
    });

    it('a resolution closes its conflict and moves it into the feed at its own sequence', async () => {
      const { c, ctx } = await fresh();
      const base = putChange(c.campaignId, 'dev-a', 'r2', latitudeRecord('r2', 41.1), stamp(T0));
      const win = putChange(c.campaignId, 'dev-b', 'r2', latitudeRecord('r2', 41.2), stamp(T0 + 9), base.hlc);
      const lose = putChange(c.campaignId, 'dev-c', 'r2', latitudeRecord('r2', 41.3), stamp(T0 + 5), base.hlc);
      await pushBatch(storage, ctx, [base, win, lose]);
      const fix = { ...putChange(c.campaignId, 'dev-a', 'r2', latitudeRecord('r2', 41.3), stamp(T0 + 20), win.hlc), resolves: [lose.changeId] };
      expect(acked((await pushBatch(storage, ctx, [fix]))[0]).serverSeq).toBe(4);
      expect((await storage.listConflicts(c.campaignId))[0]).toMatchObject({ status: 'resolved', resolvedBy: fix.changeId, serverSeq: 4 });
      const page = await storage.pull(c.campaignId, 3, 10);
      expect(page.conflicts.map((x) => x.conflictId)).toEqual([lose.changeId]);
      const bad = await pushBatch(storage, ctx, [{ ...putChange(c.campaignId, 'dev-a', 'r2', latitudeRecord('r2'), stamp(T0 + 30), fix.hlc), resolves: ['no-such-conflict'] }]);
      expect(bad[0]).toMatchObject({ status: 'rejected', field: 'changes[0].resolves' });
    });

    it('pulls in pages after a cursor, in sequence order', async () => {
      const { c, ctx } = await fresh();
      const changes = Array.from({ length: 7 }, (_, i) => putChange(c.campaignId, 'dev-a', `p${i}`, latitudeRecord(`p${i}`), stamp(T0 + i)));
      await pushBatch(storage, ctx, changes);
      const p1 = await storage.pull(c.campaignId, 0, 3);
      const p2 = await storage.pull(c.campaignId, p1.nextCursor, 3);
      const p3 = await storage.pull(c.campaignId, p2.nextCursor, 3);
      expect([p1, p2, p3].map((p) => p.changes.map((x) => x.serverSeq))).toEqual([[1, 2, 3], [4, 5, 6], [7]]);
      expect([p1.hasMore, p2.hasMore, p3.hasMore]).toEqual([true, true, false]);
      const empty = await storage.pull(c.campaignId, 7, 3);
      expect(empty).toMatchObject({ changes: [], conflicts: [], nextCursor: 7, hasMore: false });
    });

    it('a crash inside the push transaction stores nothing', async () => {
      const { c, ctx } = await fresh();
      const batch = [0, 1, 2].map((i) => putChange(c.campaignId, 'dev-a', `x${i}`, latitudeRecord(`x${i}`), stamp(T0 + i)));
      await expect(pushBatch(storage, { ...ctx, duringPush: (i) => { if (i === 1) throw new Error('simulated crash'); } }, batch)).rejects.toThrow('simulated crash');
      expect(await storage.countChanges(c.campaignId)).toBe(0);
      expect(await storage.listRecords(c.campaignId)).toEqual([]);
      expect((await storage.findCampaign(c.campaignId))?.lastSeq).toBe(0);
      const res = await pushBatch(storage, ctx, batch);
      expect(res.map((r) => acked(r).serverSeq)).toEqual([1, 2, 3]);
    });

    it('parallel pushes get distinct, gap-free sequences', async () => {
      const { c, ctx } = await fresh();
      const batches = Array.from({ length: 6 }, (_, b) => Array.from({ length: 5 }, (_, i) =>
        putChange(c.campaignId, `dev-${b}`, `q${b}-${i}`, latitudeRecord(`q${b}-${i}`), stamp(T0 + i))));
      const results = await Promise.all(batches.map((batch) => pushBatch(storage, ctx, batch)));
      const seqs = results.flat().map((r) => acked(r).serverSeq).sort((a, b) => a - b);
      expect(seqs).toEqual(Array.from({ length: 30 }, (_, i) => i + 1));
      // Within one batch the order is kept.
      for (const r of results) {
        const s = r.map((x) => acked(x).serverSeq);
        expect([...s].sort((a, b) => a - b)).toEqual(s);
      }
    });

    it('flags a stamp far ahead of the server clock but accepts it', async () => {
      const { c, ctx } = await fresh();
      const ahead = putChange(c.campaignId, 'dev-a', 'f1', latitudeRecord('f1'), stamp(T0 + 86_400_000));
      const near = putChange(c.campaignId, 'dev-a', 'f2', latitudeRecord('f2'), stamp(T0 + 60_000));
      const res = await pushBatch(storage, ctx, [ahead, near]);
      expect(res.map((r) => acked(r).flags)).toEqual([['clock-ahead'], []]);
      expect((await storage.pull(c.campaignId, 0, 10)).changes.map((x) => x.clockSkewFlag ?? false)).toEqual([true, false]);
    });

    it('binds a token to one device, one live token per device, and revokes', async () => {
      const { c } = await fresh();
      const a = newToken(c.campaignId, 'observer', 'crew A', null, new Date(T0));
      const b = newToken(c.campaignId, 'observer', 'crew B', null, new Date(T0));
      await storage.insertToken(a.row);
      await storage.insertToken(b.row);
      expect(await storage.bindTokenDevice(a.row.id, 'dev-a')).toBe(true);
      expect(await storage.bindTokenDevice(a.row.id, 'dev-z')).toBe(false);
      expect(await storage.bindTokenDevice(b.row.id, 'dev-a')).toBe(false);
      expect(await storage.revokeToken(c.campaignId, a.row.id, new Date(T0).toISOString())).toBe(true);
      expect(await storage.revokeToken(c.campaignId, a.row.id, new Date(T0).toISOString())).toBe(false);
      expect(await storage.bindTokenDevice(b.row.id, 'dev-a')).toBe(true);
    });
  });
}

contract('SQLite (temp file)', async () => {
  const db = tempSqlite();
  const storage = db.open();
  await storage.migrate();
  return { storage, cleanup: async () => { await storage.close(); db.cleanup(); } };
});

if (PG_URL) {
  contract('PostgreSQL', async () => {
    const schema: PgSchema = await freshPgSchema('contract');
    const storage = new PostgresStorage(schema.url);
    await storage.migrate();
    return { storage, cleanup: async () => { await storage.close(); await schema.drop(); } };
  });
} else if (pgRequiredButMissing()) {
  it('PostgreSQL storage contract', () => {
    expect.fail('CI is set but ARCFIELD_TEST_PG_URL is not: the PostgreSQL tests must run in CI');
  });
} else {
  announcePgSkip('storage contract');
  it.skip('PostgreSQL storage contract (ARCFIELD_TEST_PG_URL not set)', () => undefined);
}
