// The sync port over Dexie: outbox order and acknowledgement, pulled changes merged with the shared
// rules (src/sync/merge.ts), own echoes ignored, tombstone wins, cursor monotonic, and a batch with
// one bad record stored not at all (cursor unchanged).
import { describe, expect, it } from 'vitest';
import { ValidationError } from '../../src/errors.ts';
import { DexieSyncStore, openFieldStore, loadCampaignRecords, stationsOf } from '../../src/store/index.ts';
import { PROTOCOL_VERSION } from '../../src/sync/protocol.ts';
import type { PulledChange } from '../../src/sync/sync-store.ts';

const stamp = (ms: number, c = 0) => `${String(ms).padStart(16, '0')}:${String(c).padStart(5, '0')}`;
const T0 = Date.UTC(2031, 5, 14, 20, 0, 0);

async function setup() {
  const store = await openFieldStore({ name: `sync-${Math.random()}`, now: () => T0 });
  const c = await store.createCampaign({ name: 'Sync test' });
  return { store, cid: c.id, sync: new DexieSyncStore(store.db, store.ctx) };
}

let seq = 0;
function pulled(cid: string, partial: Partial<PulledChange> & Pick<PulledChange, 'recordKind' | 'recordId' | 'op' | 'record' | 'hlc'>): PulledChange {
  seq += 1;
  return {
    changeId: `remote-${seq}`, campaignId: cid, deviceId: 'dev-other', baseHlc: null, protocolVersion: PROTOCOL_VERSION,
    serverSeq: seq, receivedAt: '2031-06-14T20:00:00.000Z', ...partial,
  };
}

describe('DexieSyncStore', () => {
  it('lists the outbox oldest first without local fields, and acknowledgement empties it', async () => {
    const { store, cid, sync } = await setup();
    await store.saveStation(cid, { code: 'K01' });
    await store.saveStation(cid, { code: 'K02' });
    const out = await sync.pendingChanges(cid, 10);
    expect(out.map((c) => c.recordKind)).toEqual(['campaign', 'station', 'station']);
    expect(Object.keys(out[0]).sort()).toEqual(['baseHlc', 'campaignId', 'changeId', 'deviceId', 'hlc', 'op', 'protocolVersion', 'record', 'recordId', 'recordKind']);
    expect(await sync.pendingChanges(cid, 2)).toHaveLength(2);
    await sync.markAcknowledged(out.slice(0, 2).map((c) => c.changeId));
    expect(await sync.pendingCount(cid)).toBe(1);
    await sync.markRejected([{ changeId: out[2].changeId, reason: 'viewer may not push' }]);
    expect(await sync.pendingCount(cid)).toBe(0);
    expect(await sync.rejectedCount(cid)).toBe(1);
  });

  it('applies a remote create, ignores its own echo, lets a tombstone win, and never moves the cursor back', async () => {
    const { store, cid, sync } = await setup();
    const own = (await sync.pendingChanges(cid, 10))[0];
    const k05 = pulled(cid, { recordKind: 'station', recordId: 'stn-k05', op: 'put', record: { id: 'stn-k05', code: 'K05', heightM: 120 }, hlc: stamp(T0 + 5000) });
    await sync.applyPulled(cid, [{ ...own, serverSeq: 1, receivedAt: '2031-06-14T20:00:01.000Z' }, k05], 7);
    expect((await stationsOf(store.db, cid)).map((s) => s.code)).toEqual(['K05']);
    expect(await sync.cursor(cid)).toBe(7);
    // A delete made on top of the create, then an older concurrent edit arriving late.
    const del = pulled(cid, { recordKind: 'station', recordId: 'stn-k05', op: 'delete', record: null, hlc: stamp(T0 + 9000), baseHlc: k05.hlc });
    const late = pulled(cid, { recordKind: 'station', recordId: 'stn-k05', op: 'put', record: { id: 'stn-k05', code: 'K05', heightM: 121 }, hlc: stamp(T0 + 6000), baseHlc: k05.hlc, deviceId: 'dev-third' });
    await sync.applyPulled(cid, [del, late], 5);
    expect(await stationsOf(store.db, cid)).toEqual([]);
    expect((await store.db.stations.get('stn-k05'))?.deleted).toBe(1);
    expect(await sync.cursor(cid)).toBe(7);
    // The clock has moved past every pulled stamp: a local edit now sorts after them.
    expect(store.ctx.clock.tick() > del.hlc).toBe(true);
  });

  it('stores nothing from a batch with one invalid record, and keeps the cursor', async () => {
    const { store, cid, sync } = await setup();
    const good = pulled(cid, { recordKind: 'station', recordId: 'stn-a', op: 'put', record: { id: 'stn-a', code: 'K01' }, hlc: stamp(T0 + 1000) });
    const bad = pulled(cid, { recordKind: 'station', recordId: 'stn-b', op: 'put', record: { id: 'stn-b', code: 'K 02!' }, hlc: stamp(T0 + 2000) });
    const err = await sync.applyPulled(cid, [good, bad], 3).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).problems[0]).toMatchObject({ field: 'code', value: 'K 02!' });
    expect(await store.db.stations.count()).toBe(0);
    expect(await sync.cursor(cid)).toBe(0);
  });

  it('keeps the server conflict rows (upsert by conflict id) and the solver sees merged readings', async () => {
    const { store, cid, sync } = await setup();
    await store.saveStation(cid, { code: 'K01' });
    await store.saveStation(cid, { code: 'K02' });
    const arc = pulled(cid, { recordKind: 'arcReading', recordId: 'arc-r1', op: 'put', record: { id: 'arc-r1', fromStation: 'K01', toStation: 'K02', distanceM: 254812.37, sigmaM: 0.9 }, hlc: stamp(T0 + 3000) });
    const conflict = {
      conflictId: 'remote-x', campaignId: cid, recordKind: 'arcReading' as const, recordId: 'arc-r1', reason: 'concurrent-edit' as const,
      loser: { ...arc, changeId: 'remote-x' }, winner: { changeId: arc.changeId, hlc: arc.hlc, deviceId: 'dev-other', deleted: false },
      status: 'open' as const, resolvedBy: null, serverSeq: 9, detectedAt: '2031-06-14T20:00:05.000Z', resolvedAt: null,
    };
    await sync.applyPulled(cid, [arc], 9, [conflict]);
    await sync.applyPulled(cid, [], 10, [{ ...conflict, status: 'resolved', resolvedBy: 'c-9', serverSeq: 10, resolvedAt: '2031-06-14T21:00:00.000Z' }]);
    const list = await sync.conflicts(cid);
    expect(list.map((c) => [c.conflictId, c.status])).toEqual([['remote-x', 'resolved']]);
    expect((await loadCampaignRecords(store.db, cid))?.arcReadings.map((a) => a.id)).toEqual(['arc-r1']);
    await sync.setLastSyncAt(cid, '2031-06-14T21:00:00.000Z');
    expect(await sync.lastSyncAt(cid)).toBe('2031-06-14T21:00:00.000Z');
  });
});
