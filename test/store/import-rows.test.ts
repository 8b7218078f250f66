// Batch import into an existing campaign under fake-indexeddb, fed by the real producer (the CSV
// import of src/io, as the app's panel calls it): one change-log row per written record, nothing
// stored from a rejected file or an aborted transaction (every table counted before and after),
// replace as tombstones with delete changes, and a second import of the same file changing nothing.
import { describe, expect, it } from 'vitest';
import type { DBCore, DBCoreTable } from 'dexie';
import type { CampaignFile, LatitudeReading } from '../../src/campaign/records.ts';
import { InputError, ValidationError } from '../../src/errors.ts';
import { importCsvTable } from '../../src/io/index.ts';
import {
  ArcfieldDb, CampaignMirror, FieldStore, StorageError, importRows, lastChangeSeq, loadCampaignRecords,
  loadCampaignSnapshot, loadDeviceContext, openFieldStore, readingPage,
} from '../../src/store/index.ts';
import { PROTOCOL_VERSION } from '../../src/sync/protocol.ts';
import { campaignFileOf } from '../../src/ui/decisions/campaign-file-of.ts';

const T0 = Date.UTC(2031, 5, 14, 20, 0, 0);
const dbName = () => `import-rows-${Math.random()}`;

function scriptedIds(prefix = 'id') {
  let n = 0;
  return () => `${prefix}-${String(++n).padStart(4, '0')}`;
}

async function storeOn(db: ArcfieldDb, ids = scriptedIds()): Promise<FieldStore> {
  let t = T0;
  await db.open();
  return new FieldStore(db, await loadDeviceContext(db, { newId: ids, now: () => (t += 1000) }));
}

/** A campaign with K01, K02, one latitude reading at K01 and one arc. */
async function seeded(store: FieldStore) {
  const c = await store.createCampaign({ name: 'Import ridge' });
  await store.saveStation(c.id, { code: 'K01', heightM: 410 });
  await store.saveStation(c.id, { code: 'K02', heightM: 380 });
  const r = await store.saveLatitudeReading(c.id, { station: 'K01', kind: 'astronomic', latitudeDeg: 8.12, sigmaArcsec: 0.3, observedAt: '2031-06-14T20:00:00Z' });
  const a = await store.saveArcReading(c.id, { fromStation: 'K01', toStation: 'K02', distanceM: 524885.3, sigmaM: 1.1 });
  return { cid: c.id, readingId: r.id, arcId: a.id };
}

/** The campaign as the panel gets it: records and change-log position read together. */
async function fileOf(store: FieldStore, cid: string): Promise<{ file: CampaignFile; seq: number }> {
  const snap = await loadCampaignSnapshot(store.db, cid);
  if (!snap) throw new Error('no campaign');
  return { file: campaignFileOf(snap.records), seq: snap.seq };
}

/** Rows in every table of the database (the "nothing stored" check counts them all). */
async function tableCounts(db: ArcfieldDb): Promise<Record<string, number>> {
  return Object.fromEntries(await Promise.all(db.tables.map(async (t) => [t.name, await t.count()] as const)));
}

const LATITUDE_CSV = [
  'id,station,kind,latitude_deg,sigma_arcsec,observed_at',
  'L-101,K01,astronomic,8.1200010,0.25,2031-06-15T20:00:00Z',
  'L-102,K02,astronomic,12.8610440,0.30,2031-06-16T20:00:00Z',
  'L-103,K03,geodetic,17.5832500,0.10,2031-06-17T20:00:00Z',
].join('\r\n') + '\r\n';

describe('importRows (batch import into an existing campaign)', () => {
  it('a clean file imports every row with exactly one pending change-log row each', async () => {
    const store = await openFieldStore({ name: dbName(), newId: scriptedIds() });
    const { cid } = await seeded(store);
    const { file, seq } = await fileOf(store, cid);
    const result = importCsvTable(file, LATITUDE_CSV, { table: 'latitude', addMissingStations: true, source: 'lat.csv' });
    expect(result.imported).toBe(3);
    expect(result.addedStations).toEqual(['K03']);
    const before = await tableCounts(store.db);

    const summary = await importRows(store, cid, result.file, { expectedSeq: seq, source: 'lat.csv' });
    // 3 readings + the new station K03; the four stored records unchanged.
    expect([summary.added, summary.changed, summary.removed, summary.unchanged]).toEqual([4, 0, 0, 4]);
    expect(summary.byCollection.latitudeReadings).toEqual({ added: 3, changed: 0, removed: 0, unchanged: 1 });
    expect(summary.byCollection.stations).toEqual({ added: 1, changed: 0, removed: 0, unchanged: 2 });

    const after = await tableCounts(store.db);
    expect(after.changes - before.changes).toBe(4);
    expect(after.latitudeReadings - before.latitudeReadings).toBe(3);
    expect(after.stations - before.stations).toBe(1);
    expect(after.arcReadings).toBe(before.arcReadings);
    for (const id of ['L-101', 'L-102', 'L-103']) {
      const row = await store.db.latitudeReadings.get(id);
      expect(row?.deleted).toBe(0);
      expect(row?.observedMs).toBe(Date.parse(row?.record?.observedAt ?? ''));
      const log = await store.db.changes.where('[recordKind+recordId]').equals(['latitudeReading', id]).toArray();
      expect(log).toHaveLength(1);
      expect(log[0]).toMatchObject({ campaignId: cid, op: 'put', state: 'pending', baseHlc: null, hlc: row?.hlc, protocolVersion: PROTOCOL_VERSION, record: row?.record });
    }
    // The new station got a device-made id and its record carries it (the mirror keys stations by it).
    const k03 = await store.db.stations.where('[campaignId+deleted+code]').equals([cid, 0, 'K03']).first();
    expect(k03?.record).toEqual({ code: 'K03', id: k03?.id });
    // Typed values arrive as typed (CSV text → number once).
    expect((await store.db.latitudeReadings.get('L-102'))?.record?.latitudeDeg).toBe(12.861044);
    // Stamps of one import are strictly increasing, and the persisted clock is the last of them.
    const stamps = (await store.db.changes.where('[campaignId+seq]').between([cid, seq + 1], [cid, Infinity]).toArray()).map((c) => c.hlc);
    expect([...stamps].sort()).toEqual(stamps);
    expect(new Set(stamps).size).toBe(stamps.length);
    expect((await store.db.settings.get('hlc'))?.value).toBe(stamps[stamps.length - 1]);
    // Sync finds them in the outbox.
    expect(await store.db.changes.where('[state+campaignId+seq]').between(['pending', cid, seq + 1], ['pending', cid, Infinity]).count()).toBe(4);
  });

  it('a file with one bad row stores nothing and names the row, the field and the value', async () => {
    const store = await openFieldStore({ name: dbName(), newId: scriptedIds() });
    const { cid } = await seeded(store);
    const { file } = await fileOf(store, cid);
    const bad: CampaignFile = structuredClone(file);
    bad.latitudeReadings.push(
      { id: 'L-201', station: 'K01', kind: 'astronomic', latitudeDeg: 8.1201, sigmaArcsec: 0.2, observedAt: '2031-06-15T20:00:00Z' },
      { id: 'L-202', station: 'K02', kind: 'astronomic', latitudeDeg: 91, sigmaArcsec: 0.2, observedAt: '2031-06-15T21:00:00Z' },
    );
    const before = await tableCounts(store.db);
    const err = await importRows(store, cid, bad, { source: 'bad.csv' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    const problems = (err as ValidationError).problems;
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatchObject({ field: 'latitudeReadings[2].latitudeDeg', value: 91, source: 'bad.csv' });
    expect(problems[0].reason).toMatch(/90/);
    expect(await tableCounts(store.db)).toEqual(before);

    // A row the schema accepts but the campaign cannot hold (an arc to a station it lacks) is refused the same way.
    const dangling: CampaignFile = structuredClone(file);
    dangling.arcReadings.push({ id: 'A-201', fromStation: 'K02', toStation: 'K09', distanceM: 110574.5, sigmaM: 0.3 });
    const err2 = await importRows(store, cid, dangling).catch((e: unknown) => e);
    expect(err2).toBeInstanceOf(ValidationError);
    expect((err2 as ValidationError).problems[0]).toMatchObject({ field: 'arcReadings[1].toStation', value: 'K09' });
    expect(await tableCounts(store.db)).toEqual(before);
  });

  it('a transaction aborted in the middle (the arc write fails after the latitude rows went in) leaves nothing', async () => {
    const db = new ArcfieldDb(dbName());
    let failArcs = false;
    db.use({
      stack: 'dbcore', name: 'arc-fault',
      create: (down: DBCore): DBCore => ({
        ...down,
        table: (name: string): DBCoreTable => {
          const t = down.table(name);
          if (name !== 'arcReadings') return t;
          return { ...t, mutate: (req) => failArcs ? Promise.reject(new DOMException('The quota has been exceeded.', 'QuotaExceededError')) : t.mutate(req) };
        },
      }),
    });
    const store = await storeOn(db);
    const { cid } = await seeded(store);
    const { file } = await fileOf(store, cid);
    const withRows = importCsvTable(file, LATITUDE_CSV, { table: 'latitude', addMissingStations: true }).file;
    withRows.arcReadings.push({ id: 'A-301', fromStation: 'K02', toStation: 'K03', distanceM: 524885.3, sigmaM: 1.1 });
    const before = await tableCounts(db);
    const clockBefore = (await db.settings.get('hlc'))?.value;
    failArcs = true;
    const err = await importRows(store, cid, withRows).catch((e: unknown) => e);
    failArcs = false;
    expect(err).toBeInstanceOf(StorageError);
    expect((err as StorageError).kind).toBe('quota');
    expect((err as StorageError).message).toMatch(/no room left/);
    expect(await tableCounts(db)).toEqual(before);
    expect(await db.latitudeReadings.get('L-101')).toBeUndefined();
    expect(await db.changes.where('[recordKind+recordId]').equals(['latitudeReading', 'L-101']).count()).toBe(0);
    expect((await db.settings.get('hlc'))?.value).toBe(clockBefore);
    // The same import goes through once the fault is gone.
    const ok = await importRows(store, cid, withRows);
    expect(ok.added).toBe(5);
  });

  it('replace removes the readings the file lacks as tombstones, with delete changes on the stored version', async () => {
    const store = await openFieldStore({ name: dbName(), newId: scriptedIds() });
    const { cid, readingId } = await seeded(store);
    const first = await fileOf(store, cid);
    await importRows(store, cid, importCsvTable(first.file, LATITUDE_CSV, { table: 'latitude', addMissingStations: true }).file, { expectedSeq: first.seq });
    const l102 = await store.db.latitudeReadings.get('L-102');
    const old = await store.db.latitudeReadings.get(readingId);

    // The new table: L-101 unchanged, L-103 with a new sigma; the seeded reading and L-102 are gone.
    const replacement = [
      'id,station,kind,latitude_deg,sigma_arcsec,observed_at',
      'L-101,K01,astronomic,8.1200010,0.25,2031-06-15T20:00:00Z',
      'L-103,K03,geodetic,17.5832500,0.15,2031-06-17T20:00:00Z',
    ].join('\r\n') + '\r\n';
    const second = await fileOf(store, cid);
    const result = importCsvTable(second.file, replacement, { table: 'latitude', mode: 'replace' });
    const summary = await importRows(store, cid, result.file, { replace: ['latitudeReadings'], expectedSeq: second.seq });
    expect(summary.byCollection.latitudeReadings).toEqual({ added: 0, changed: 1, removed: 2, unchanged: 1 });

    for (const [id, prev] of [[readingId, old], ['L-102', l102]] as const) {
      const row = await store.db.latitudeReadings.get(id);
      expect(row?.deleted, id).toBe(1);
      expect(row?.record, 'a tombstone keeps its last record').toEqual(prev?.record);
      const log = await store.db.changes.where('[recordKind+recordId]').equals(['latitudeReading', id]).sortBy('seq');
      expect(log.map((c) => c.op)).toEqual(['put', 'delete']);
      expect(log[1]).toMatchObject({ record: null, baseHlc: prev?.hlc, state: 'pending' });
    }
    const changed = await store.db.changes.where('[recordKind+recordId]').equals(['latitudeReading', 'L-103']).sortBy('seq');
    expect(changed.map((c) => c.op)).toEqual(['put', 'put']);
    expect(changed[1].baseHlc).toBe(changed[0].hlc);
    expect((changed[1].record as LatitudeReading).sigmaArcsec).toBe(0.15);
    expect((await loadCampaignRecords(store.db, cid))?.latitudeReadings.map((r) => r.id).sort()).toEqual(['L-101', 'L-103']);
    expect((await readingPage(store.db, cid, 'latitude', 0, 10)).total).toBe(2);
    // Tables not replaced keep what the file lacks: the arc is still there.
    expect((await readingPage(store.db, cid, 'arc', 0, 10)).total).toBe(1);

    // A deleted reading never comes back under its id: importing it again is refused, nothing stored.
    const third = await fileOf(store, cid);
    const again = importCsvTable(third.file, LATITUDE_CSV, { table: 'latitude', mode: 'replace' });
    const before = await tableCounts(store.db);
    const err = await importRows(store, cid, again.file, { replace: ['latitudeReadings'] }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).problems).toMatchObject([{ field: 'latitudeReadings[1].id', value: 'L-102' }]);
    expect((err as ValidationError).problems[0].reason).toMatch(/deleted/);
    expect(await tableCounts(store.db)).toEqual(before);
  });

  it('importing the same file again changes nothing (no row, no change-log entry)', async () => {
    const store = await openFieldStore({ name: dbName(), newId: scriptedIds() });
    const { cid } = await seeded(store);
    const { file } = await fileOf(store, cid);
    const result = importCsvTable(file, LATITUDE_CSV, { table: 'latitude', addMissingStations: true });
    await importRows(store, cid, result.file);
    const before = await tableCounts(store.db);
    const seq = await lastChangeSeq(store.db, cid);

    const twice = await importRows(store, cid, result.file);
    expect([twice.added, twice.changed, twice.removed, twice.unchanged]).toEqual([0, 0, 0, 8]);
    // The panel's way round: the same CSV checked against the campaign now, replacing the table.
    const now = await fileOf(store, cid);
    const replaced = importCsvTable(now.file, LATITUDE_CSV, { table: 'latitude', mode: 'replace' });
    const thrice = await importRows(store, cid, replaced.file, { replace: ['latitudeReadings'], expectedSeq: now.seq });
    expect([thrice.added, thrice.changed, thrice.removed]).toEqual([0, 0, 1]); // the seeded reading is not in the CSV
    const fourth = await fileOf(store, cid);
    const again = await importRows(store, cid, importCsvTable(fourth.file, LATITUDE_CSV, { table: 'latitude', mode: 'replace' }).file, { replace: ['latitudeReadings'], expectedSeq: fourth.seq });
    expect([again.added, again.changed, again.removed]).toEqual([0, 0, 0]);
    expect(await lastChangeSeq(store.db, cid)).toBe(seq + 1);
    const after = await tableCounts(store.db);
    expect(after).toEqual({ ...before, changes: before.changes + 1 });
  });

  it('keeps the ids of stored records (an update on their version), and gives a fresh id where another campaign owns the id', async () => {
    const store = await openFieldStore({ name: dbName(), newId: scriptedIds() });
    const { cid, arcId } = await seeded(store);
    const other = await store.createCampaign({ name: 'Other ridge' });
    await store.saveStation(other.id, { code: 'K01' });
    await store.saveLatitudeReading(other.id, { id: 'L-101', station: 'K01', kind: 'astronomic', latitudeDeg: 40, sigmaArcsec: 1, observedAt: '2031-06-01T20:00:00Z' });
    const arcBefore = await store.db.arcReadings.get(arcId);

    const { file, seq } = await fileOf(store, cid);
    const next: CampaignFile = structuredClone(file);
    next.arcReadings[0] = { ...next.arcReadings[0], sigmaM: 0.9 };
    next.latitudeReadings.push({ id: 'L-101', station: 'K02', kind: 'astronomic', latitudeDeg: 12.86, sigmaArcsec: 0.3, observedAt: '2031-06-16T20:00:00Z' });
    next.exclusions = [{ id: 'X-1', readingId: 'L-101', excludedBy: 'crew B', reason: 'clouds (test)', at: '2031-06-16T21:00:00Z' }];
    const summary = await importRows(store, cid, next, { expectedSeq: seq });
    expect(summary.byCollection.arcReadings).toEqual({ added: 0, changed: 1, removed: 0, unchanged: 0 });

    const arcAfter = await store.db.arcReadings.get(arcId);
    expect(arcAfter?.record?.sigmaM).toBe(0.9);
    expect(arcAfter?.baseHlc).toBe(arcBefore?.hlc);
    // L-101 is the other campaign's: this campaign's copy has a new id, and the exclusion follows it.
    expect((await store.db.latitudeReadings.get('L-101'))?.campaignId).toBe(other.id);
    const mine = (await loadCampaignRecords(store.db, cid))!;
    const copy = mine.latitudeReadings.find((r) => r.station === 'K02');
    expect(copy?.id).toMatch(/^id-\d{4}$/);
    expect(mine.exclusions).toEqual([{ id: 'X-1', readingId: copy?.id, excludedBy: 'crew B', reason: 'clouds (test)', at: '2031-06-16T21:00:00Z' }]);
  });

  it('refuses a file built before another write to the campaign, and an unknown campaign', async () => {
    const store = await openFieldStore({ name: dbName(), newId: scriptedIds() });
    const { cid } = await seeded(store);
    const { file, seq } = await fileOf(store, cid);
    await store.saveStation(cid, { code: 'K05' });
    const before = await tableCounts(store.db);
    const stale = importCsvTable(file, LATITUDE_CSV, { table: 'latitude', addMissingStations: true }).file;
    const err = await importRows(store, cid, stale, { expectedSeq: seq }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(InputError);
    expect([(err as InputError).field, (err as InputError).value]).toEqual(['campaign', cid]);
    expect((err as InputError).reason).toMatch(/changed since/);
    const missing = await importRows(store, 'no-such-campaign', stale).catch((e: unknown) => e);
    expect(missing).toBeInstanceOf(InputError);
    expect(await tableCounts(store.db)).toEqual(before);
  });

  it('the live-fit mirror follows a batch import through the change log', async () => {
    const store = await openFieldStore({ name: dbName(), newId: scriptedIds() });
    const { cid } = await seeded(store);
    const mirror = new CampaignMirror(store.db, cid);
    await mirror.refresh();
    const { file, seq } = await fileOf(store, cid);
    const result = importCsvTable(file, LATITUDE_CSV, { table: 'latitude', addMissingStations: true, mode: 'replace' });
    await importRows(store, cid, result.file, { replace: ['latitudeReadings'], expectedSeq: seq });
    const { records, changed } = await mirror.refresh();
    expect(changed).toBe(true);
    const full = await loadCampaignRecords(store.db, cid);
    const ids = (r: typeof records) => ({
      stations: r?.stations.map((s) => s.code).sort(), latitude: r?.latitudeReadings.map((x) => x.id).sort(), arcs: r?.arcReadings.length,
    });
    expect(ids(records)).toEqual(ids(full));
    expect(ids(records)).toEqual({ stations: ['K01', 'K02', 'K03'], latitude: ['L-101', 'L-102', 'L-103'], arcs: 1 });
  });
});
