// Repository behaviour under fake-indexeddb: one change-log row per save in the same transaction,
// read-back before "saved", tombstones, refusals naming field and value, and a transaction aborted
// mid-write leaving neither the record nor its change-log row (style.md §8).
import { describe, expect, it } from 'vitest';
import type { DBCore, DBCoreTable } from 'dexie';
import { ValidationError, InputError } from '../../src/errors.ts';
import {
  ArcfieldDb, FieldStore, StorageError, durabilityOf, loadDeviceContext, openFieldStore, listCampaigns,
  stationsOf, latitudeReadingsOfStation, loadCampaignRecords, readingPage,
} from '../../src/store/index.ts';
import { PROTOCOL_VERSION } from '../../src/sync/protocol.ts';

const T0 = Date.UTC(2031, 5, 14, 20, 0, 0);
const dbName = () => `fs-${Math.random()}`;

function scriptedIds(prefix = 'id') {
  let n = 0;
  return () => `${prefix}-${String(++n).padStart(4, '0')}`;
}

async function freshStore(ids = scriptedIds()) {
  let t = T0;
  return openFieldStore({ name: dbName(), newId: ids, now: () => (t += 1000) });
}

async function campaignWithStations(store: FieldStore, codes = ['K01', 'K02']) {
  const c = await store.createCampaign({ name: 'Ridge test' });
  for (const code of codes) await store.saveStation(c.id, { code, heightM: 400 });
  return c.id;
}

describe('FieldStore saves', () => {
  it('opens with strict durability (field-traps R-1.7)', async () => {
    const store = await freshStore();
    expect(durabilityOf(store.db)).toBe('strict');
  });

  it('writes exactly one pending change-log row per save, carrying the record as stored', async () => {
    const store = await freshStore();
    const cid = await campaignWithStations(store);
    const before = await store.db.changes.count();
    const row = await store.saveLatitudeReading(cid, {
      station: 'K01', kind: 'astronomic', latitudeDeg: 41.2092361, sigmaArcsec: 0.4,
      observedAt: '2031-06-14T21:30:00Z', enteredText: `41°12'33.25"N`,
    });
    expect(await store.db.changes.count()).toBe(before + 1);
    const change = await store.db.changes.where('[recordKind+recordId]').equals(['latitudeReading', row.id]).toArray();
    expect(change).toHaveLength(1);
    expect(change[0]).toMatchObject({
      campaignId: cid, op: 'put', hlc: row.hlc, deviceId: store.deviceId, baseHlc: null,
      protocolVersion: PROTOCOL_VERSION, state: 'pending', record: row.record,
    });
    expect(row.record?.latitudeDeg).toBe(41.2092361);
    expect(row.observedMs).toBe(Date.UTC(2031, 5, 14, 21, 30, 0));
    // An edit of the same record names the version it was made on (concurrent-edit detection).
    const edited = await store.saveLatitudeReading(cid, { ...row.record!, sigmaArcsec: 0.5 });
    const second = await store.db.changes.where('[recordKind+recordId]').equals(['latitudeReading', row.id]).sortBy('seq');
    expect(second).toHaveLength(2);
    expect(second[1].baseHlc).toBe(row.hlc);
    expect(edited.hlc > row.hlc).toBe(true);
  });

  it('delete is a tombstone with a delete change; lists and the solver skip it', async () => {
    const store = await freshStore();
    const cid = await campaignWithStations(store, ['K01', 'K02', 'K03']);
    const arc = await store.saveArcReading(cid, { fromStation: 'K01', toStation: 'K02', distanceM: 254812.37, sigmaM: 0.9 });
    const gone = await store.deleteRecord('arcReading', arc.id);
    expect(gone.deleted).toBe(1);
    expect(await store.db.arcReadings.get(arc.id)).toBeDefined();
    const ch = await store.db.changes.where('[recordKind+recordId]').equals(['arcReading', arc.id]).sortBy('seq');
    expect(ch.map((c) => c.op)).toEqual(['put', 'delete']);
    expect(ch[1].record).toBeNull();
    expect(ch[1].baseHlc).toBe(arc.hlc);
    expect((await loadCampaignRecords(store.db, cid))?.arcReadings).toHaveLength(0);
    expect((await readingPage(store.db, cid, 'arc', 0, 10)).total).toBe(0);
  });

  it('refuses bad input naming the field and the value, and writes nothing', async () => {
    const store = await freshStore();
    const cid = await campaignWithStations(store);
    const changes = await store.db.changes.count();
    const bad = store.saveLatitudeReading(cid, { station: 'K01', kind: 'astronomic', latitudeDeg: 91, sigmaArcsec: 0.4, observedAt: '2031-06-14T21:30:00Z' });
    await expect(bad).rejects.toBeInstanceOf(ValidationError);
    await bad.catch((e: ValidationError) => {
      expect(e.problems[0]).toMatchObject({ field: 'latitudeDeg', value: 91 });
      expect(e.problems[0].reason).toMatch(/90/);
    });
    const nan = store.saveArcReading(cid, { fromStation: 'K01', toStation: 'K02', distanceM: Number.NaN, sigmaM: 1 });
    await expect(nan).rejects.toBeInstanceOf(ValidationError);
    const unknown = store.saveArcReading(cid, { fromStation: 'K01', toStation: 'K09', distanceM: 1000, sigmaM: 1 });
    await expect(unknown).rejects.toThrow(InputError);
    await unknown.catch((e: InputError) => expect([e.field, e.value]).toEqual(['toStation', 'K09']));
    const dup = store.saveStation(cid, { code: 'K01' });
    await expect(dup).rejects.toThrow(/K01 already exists/);
    expect(await store.db.changes.count()).toBe(changes);
    expect(await store.db.arcReadings.count()).toBe(0);
  });

  it('a transaction aborted mid-write (duplicate change id) leaves neither the record nor its change row', async () => {
    // The scripted id source hands the change row an id that is already in the log, so the second
    // write of the transaction fails with a ConstraintError after the record write succeeded.
    const ids = ['device', 'cmp-1', 'chg-1', 'stn-1', 'chg-dup', 'stn-2', 'chg-dup'];
    const store = await freshStore(() => ids.shift() ?? 'exhausted');
    const c = await store.createCampaign({ name: 'Abort test' });
    await store.saveStation(c.id, { code: 'K01' });
    const err = await store.saveStation(c.id, { code: 'K02' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StorageError);
    expect((err as StorageError).kind).toBe('constraint');
    expect(await store.db.stations.get('stn-2')).toBeUndefined();
    expect(await store.db.changes.where('[recordKind+recordId]').equals(['station', 'stn-2']).count()).toBe(0);
    expect(await store.db.changes.count()).toBe(2); // the campaign and K01 only
    expect((await stationsOf(store.db, c.id)).map((s) => s.code)).toEqual(['K01']);
  });

  it('a quota failure on the change-log write aborts the whole save with a clear message', async () => {
    const db = new ArcfieldDb(dbName());
    let failChanges = false;
    db.use({
      stack: 'dbcore', name: 'quota-fault',
      create: (down: DBCore): DBCore => ({
        ...down,
        table: (name: string): DBCoreTable => {
          const t = down.table(name);
          if (name !== 'changes') return t;
          return { ...t, mutate: (req) => failChanges ? Promise.reject(new DOMException('The quota has been exceeded.', 'QuotaExceededError')) : t.mutate(req) };
        },
      }),
    });
    await db.open();
    const store = new FieldStore(db, await loadDeviceContext(db, { newId: scriptedIds('q') }));
    const cid = await campaignWithStations(store, ['K01']);
    failChanges = true;
    const err = await store.saveLatitudeReading(cid, { station: 'K01', kind: 'geodetic', latitudeDeg: 41.2, sigmaArcsec: 0.1, observedAt: '2031-06-14T21:30:00Z' })
      .catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StorageError);
    expect((err as StorageError).kind).toBe('quota');
    expect((err as StorageError).message).toMatch(/no room left/);
    expect((err as StorageError).message).toMatch(/kept in the form/);
    failChanges = false;
    expect(await latitudeReadingsOfStation(db, cid, 'K01')).toHaveLength(0);
    expect(await db.latitudeReadings.count()).toBe(0);
  });

  it('lists campaigns with counts and last activity, newest first', async () => {
    const store = await freshStore();
    const a = await campaignWithStations(store, ['K01']);
    const b = await campaignWithStations(store, ['K01', 'K02', 'K03']);
    await store.saveArcReading(b, { fromStation: 'K01', toStation: 'K02', distanceM: 1000, sigmaM: 1 });
    const list = await listCampaigns(store.db);
    expect(list.map((c) => [c.id, c.stationCount, c.arcReadingCount])).toEqual([[b, 3, 1], [a, 1, 0]]);
    expect(list[0].lastActivityMs).toBeGreaterThan(list[1].lastActivityMs);
  });

  it('exclusion and undo are synced records (put, then a tombstone)', async () => {
    const store = await freshStore();
    const cid = await campaignWithStations(store);
    const arc = await store.saveArcReading(cid, { fromStation: 'K01', toStation: 'K02', distanceM: 1000, sigmaM: 1 });
    const ex = await store.excludeReading(cid, arc.id, 'tape kinked', 'crew A');
    await expect(store.excludeReading(cid, arc.id, 'again', 'crew A')).rejects.toThrow(/already excluded/);
    await expect(store.excludeReading(cid, arc.id, ' ', 'crew A')).rejects.toBeInstanceOf(ValidationError);
    expect((await loadCampaignRecords(store.db, cid))?.exclusions).toEqual([ex.record]);
    expect(await store.undoExclusion(cid, arc.id)).toBe(1);
    expect((await loadCampaignRecords(store.db, cid))?.exclusions).toEqual([]);
    const ops = await store.db.changes.where('[recordKind+recordId]').equals(['exclusion', ex.id]).sortBy('seq');
    expect(ops.map((c) => c.op)).toEqual(['put', 'delete']);
  });

  it('links raw GNSS fixes to the reading in the save transaction', async () => {
    const store = await freshStore();
    const cid = await campaignWithStations(store, ['K01']);
    const fixId = await store.keepRawFix({
      campaignId: cid, sessionId: 's1', latitudeDeg: 41.2, longitudeDeg: 2.1, accuracyM: 4, altitudeM: null,
      altitudeAccuracyM: null, headingDeg: null, speedMps: null, fixMs: T0, receivedMs: T0, platform: 'web',
      permission: 'precise', accepted: 1, rejectReason: null,
    });
    const r = await store.saveLatitudeReading(cid, { station: 'K01', kind: 'geodetic', latitudeDeg: 41.2, sigmaArcsec: 0.2, observedAt: '2031-06-14T20:00:00Z' }, [fixId]);
    expect((await store.db.gnssFixes.get(fixId))?.readingId).toBe(r.id);
  });
});
