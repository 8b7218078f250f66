// Model-based fault-injection test of the sync promise (fast-check commands, asyncModelRun):
// K simulated devices with the real SyncClient and in-memory stores, the real server on a real
// SQLite file, random creates / edits / deletes / exclusions / conflict resolutions, and injected
// drops, duplicates, held-back (reordered) requests, lost responses, server crashes mid-batch and
// between commit and reply, server restarts and clock skew. After healing the network and two
// full sync rounds, the invariants (checked by brute force over the whole state, not by the code
// under test): every device equals the server; every change made and every change acknowledged is
// on the server exactly once; no deleted record lives anywhere; conflicts are the same everywhere;
// replaying the whole feed changes nothing.
//
// Default run ~10 s. Extensive: ARCFIELD_SYNC_RUNS=300 ARCFIELD_SYNC_COMMANDS=80. Replay one
// failure: ARCFIELD_SEED=<seed> (and ARCFIELD_SYNC_PATH=<path> from the failure report); pin it as
// test/fixtures/regressions/sync-<defect>.json ({ "seed": …, "path": …, "note": … }).
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import type { RecordKind } from '../../src/campaign/records.ts';
import { resolutionFor } from '../../src/sync/resolution.ts';
import { PROTOCOL_VERSION } from '../../src/sync/protocol.ts';
import { PushResponseSchema } from '../../src/sync/wire.ts';
import { emptyCounts, SyncWorld, type Fault, type FaultCounts } from './helpers/sync-world.ts';

const RUNS = Number(process.env.ARCFIELD_SYNC_RUNS ?? 30);
const MAX_COMMANDS = Number(process.env.ARCFIELD_SYNC_COMMANDS ?? 40);
const ROLES = ['lead', 'observer', 'observer', 'viewer'] as const;

interface Model { devices: number }
type Real = SyncWorld;

const STATIONS = ['K01', 'K02', 'K03', 'K04', 'K05'];

function recordFor(kind: RecordKind, id: string, n: number): Record<string, unknown> {
  switch (kind) {
    case 'station':
      return { id, code: STATIONS[n % STATIONS.length], name: `invented station ${n % 97}`, heightM: (n % 900) + 12.5 };
    case 'arcReading':
      return { id, fromStation: STATIONS[n % 5], toStation: STATIONS[(n + 1) % 5], distanceM: 100_000 + (n % 5000) * 3.25, sigmaM: 0.8 };
    default:
      return { id, station: STATIONS[n % 5], kind: 'astronomic', latitudeDeg: 40 + (n % 1000) / 997, sigmaArcsec: 0.3 + (n % 7) / 10, observedAt: '2026-06-01T21:00:00Z' };
  }
}

function liveKeys(w: SyncWorld, dev: number, kinds: readonly RecordKind[]): string[] {
  return [...w.devices[dev].store.records(w.campaignId).values()]
    .filter((r) => !r.version.deleted && kinds.includes(r.recordKind))
    .map((r) => `${r.recordKind}/${r.recordId}`).sort();
}

const writer = (w: SyncWorld, d: number) => w.devices[d % w.devices.length].role !== 'viewer';

class Create implements fc.AsyncCommand<Model, Real> {
  constructor(readonly dev: number, readonly kind: RecordKind, readonly n: number) {}
  check = () => true;
  async run(_m: Model, w: Real): Promise<void> {
    const d = w.devices[this.dev % w.devices.length];
    if (d.role === 'viewer') return;
    w.tick();
    const id = w.newId(`${d.deviceId}-rec`);
    w.made.add(d.store.edit(w.campaignId, this.kind, id, 'put', recordFor(this.kind, id, this.n)).changeId);
    await d.client.notifyLocalChange();
  }
  toString = () => `Create(dev ${this.dev}, ${this.kind}, ${this.n})`;
}

class Edit implements fc.AsyncCommand<Model, Real> {
  constructor(readonly dev: number, readonly pick: number, readonly n: number) {}
  check = () => true;
  async run(_m: Model, w: Real): Promise<void> {
    if (!writer(w, this.dev)) return;
    const d = w.devices[this.dev % w.devices.length];
    const keys = liveKeys(w, d.index, ['station', 'latitudeReading', 'arcReading']);
    if (keys.length === 0) return;
    w.tick();
    const [kind, id] = keys[this.pick % keys.length].split('/') as [RecordKind, string];
    w.made.add(d.store.edit(w.campaignId, kind, id, 'put', recordFor(kind, id, this.n)).changeId);
  }
  toString = () => `Edit(dev ${this.dev}, pick ${this.pick}, ${this.n})`;
}

class Delete implements fc.AsyncCommand<Model, Real> {
  constructor(readonly dev: number, readonly pick: number) {}
  check = () => true;
  async run(_m: Model, w: Real): Promise<void> {
    if (!writer(w, this.dev)) return;
    const d = w.devices[this.dev % w.devices.length];
    const kinds: RecordKind[] = d.role === 'lead' ? ['station', 'latitudeReading', 'arcReading', 'exclusion'] : ['station', 'latitudeReading', 'arcReading'];
    const keys = liveKeys(w, d.index, kinds);
    if (keys.length === 0) return;
    w.tick();
    const key = keys[this.pick % keys.length];
    const [kind, id] = key.split('/') as [RecordKind, string];
    w.made.add(d.store.edit(w.campaignId, kind, id, 'delete', null).changeId);
    w.deletedKeys.add(key);
  }
  toString = () => `Delete(dev ${this.dev}, pick ${this.pick})`;
}

/** Two devices change the same record before either syncs: a concurrent edit (or edit vs delete). */
class Race implements fc.AsyncCommand<Model, Real> {
  constructor(readonly a: number, readonly b: number, readonly pick: number, readonly secondDeletes: boolean, readonly n: number) {}
  check = () => true;
  async run(_m: Model, w: Real): Promise<void> {
    const da = w.devices[this.a % w.devices.length];
    const db = w.devices[this.b % w.devices.length];
    if (da === db || da.role === 'viewer' || db.role === 'viewer') return;
    const kinds: RecordKind[] = ['station', 'latitudeReading', 'arcReading'];
    const inB = new Set(liveKeys(w, db.index, kinds));
    const common = liveKeys(w, da.index, kinds).filter((k) => inB.has(k));
    if (common.length === 0) return;
    const key = common[this.pick % common.length];
    const [kind, id] = key.split('/') as [RecordKind, string];
    w.tick();
    w.made.add(da.store.edit(w.campaignId, kind, id, 'put', recordFor(kind, id, this.n)).changeId);
    w.tick(10);
    if (this.secondDeletes) {
      w.made.add(db.store.edit(w.campaignId, kind, id, 'delete', null).changeId);
      w.deletedKeys.add(key);
    } else {
      w.made.add(db.store.edit(w.campaignId, kind, id, 'put', recordFor(kind, id, this.n + 1)).changeId);
    }
  }
  toString = () => `Race(dev ${this.a} vs ${this.b}, pick ${this.pick}, ${this.secondDeletes ? 'edit/delete' : 'edit/edit'}, ${this.n})`;
}

/** The lead leaves a reading out of the fit (an exclusion is itself a synced record). */
class Exclude implements fc.AsyncCommand<Model, Real> {
  constructor(readonly pick: number) {}
  check = () => true;
  async run(_m: Model, w: Real): Promise<void> {
    const lead = w.devices[0];
    const keys = liveKeys(w, 0, ['latitudeReading', 'arcReading']);
    if (keys.length === 0) return;
    w.tick();
    const readingId = keys[this.pick % keys.length].split('/')[1];
    const id = w.newId('excl');
    w.made.add(lead.store.edit(w.campaignId, 'exclusion', id, 'put', {
      id, readingId, excludedBy: 'crew lead', reason: 'suspect: re-observe', at: new Date(w.now()).toISOString(),
    }).changeId);
  }
  toString = () => `Exclude(pick ${this.pick})`;
}

/** The lead resolves an open conflict it has pulled (keep the loser, or keep what is there now). */
class Resolve implements fc.AsyncCommand<Model, Real> {
  constructor(readonly pick: number, readonly keepLoser: boolean) {}
  check = () => true;
  async run(_m: Model, w: Real): Promise<void> {
    const lead = w.devices[0];
    const open = (await lead.store.conflicts(w.campaignId)).filter((c) => c.status === 'open').sort((a, b) => a.conflictId.localeCompare(b.conflictId));
    if (open.length === 0) return;
    const c = open[this.pick % open.length];
    const current = lead.store.records(w.campaignId).get(`${c.recordKind}/${c.recordId}`);
    if (!current) return;
    // Already resolved locally but not yet pushed: the server would get two resolutions.
    const pending = await lead.store.pendingChanges(w.campaignId, 10_000);
    if (pending.some((p) => p.resolves?.includes(c.conflictId))) return;
    w.tick();
    const r = resolutionFor(c, this.keepLoser ? { keep: 'loser' } : { keep: 'current', currentRecord: current.record, currentDeleted: current.version.deleted });
    let id = c.recordId;
    let record = r.record;
    if (r.asNewRecord) {
      id = w.newId('restored');
      record = { ...(r.record as Record<string, unknown>), id };
    } else if (current.version.deleted && r.op === 'put') {
      return; // a tombstone never comes back: the only way is a new record (asNewRecord)
    } else if (current.version.deleted && r.op === 'delete') {
      return; // nothing to write on a local tombstone; the store refuses edits of deleted records
    }
    w.made.add(lead.store.edit(w.campaignId, c.recordKind, id, r.op, record, r.resolves).changeId);
  }
  toString = () => `Resolve(pick ${this.pick}, ${this.keepLoser ? 'loser' : 'current'})`;
}

class Sync implements fc.AsyncCommand<Model, Real> {
  constructor(readonly dev: number, readonly plan: Fault[]) {}
  check = () => true;
  async run(_m: Model, w: Real): Promise<void> {
    const d = w.devices[this.dev % w.devices.length];
    w.tick(5_000);
    d.plan = [...this.plan];
    await d.client.syncNow();
    d.plan = [];
  }
  toString = () => `Sync(dev ${this.dev}, [${this.plan.join(',')}])`;
}

class DeliverHeld implements fc.AsyncCommand<Model, Real> {
  constructor(readonly which: number) {}
  check = () => true;
  async run(_m: Model, w: Real): Promise<void> {
    await w.deliverHeld(this.which);
  }
  toString = () => `DeliverHeld(${this.which})`;
}

class Restart implements fc.AsyncCommand<Model, Real> {
  check = () => true;
  async run(_m: Model, w: Real): Promise<void> {
    await w.restart();
  }
  toString = () => 'Restart';
}

class Skew implements fc.AsyncCommand<Model, Real> {
  constructor(readonly dev: number, readonly skewMs: number) {}
  check = () => true;
  async run(_m: Model, w: Real): Promise<void> {
    w.devices[this.dev % w.devices.length].skewMs = this.skewMs;
    w.counts.clockSkews += 1;
  }
  toString = () => `Skew(dev ${this.dev}, ${this.skewMs} ms)`;
}

const dev = fc.nat({ max: ROLES.length - 1 });
const faultArb = fc.constantFrom<Fault>('ok', 'ok', 'ok', 'drop', 'lose', 'dup', 'hold', 'crash-mid-batch', 'crash-after-commit');
const createArb = fc.tuple(dev, fc.constantFrom<RecordKind>('latitudeReading', 'latitudeReading', 'arcReading', 'station'), fc.nat(10_000)).map(([d, k, n]) => new Create(d, k, n));
const editArb = fc.tuple(dev, fc.nat(50), fc.nat(10_000)).map(([d, p, n]) => new Edit(d, p, n));
const deleteArb = fc.tuple(dev, fc.nat(50)).map(([d, p]) => new Delete(d, p));
const raceArb = fc.tuple(dev, dev, fc.nat(50), fc.boolean(), fc.nat(10_000)).map(([a, b, p, del, n]) => new Race(a, b, p, del, n));
const syncArb = fc.tuple(dev, fc.array(faultArb, { maxLength: 6 })).map(([d, plan]) => new Sync(d, plan));
const resolveArb = fc.tuple(fc.nat(20), fc.boolean()).map(([p, k]) => new Resolve(p, k));
// Weights by repetition: creates and syncs dominate, as in the field; the rest keep the schedule honest.
const commandArbs = [
  createArb, createArb, createArb, createArb, createArb, createArb,
  editArb, editArb, editArb,
  raceArb, raceArb, raceArb,
  deleteArb,
  fc.nat(50).map((p) => new Exclude(p)),
  resolveArb, resolveArb,
  syncArb, syncArb, syncArb, syncArb, syncArb, syncArb,
  fc.nat(10).map((i) => new DeliverHeld(i)),
  fc.constant(new Restart()),
  // Skews from an hour slow to two days fast (the latter far enough ahead to be flagged).
  fc.tuple(dev, fc.constantFrom(-3_600_000, -90_000, 0, 45_000, 600_000, 172_800_000)).map(([d, s]) => new Skew(d, s)),
];

const totals: FaultCounts & { schedules: number; changesMade: number; changesLost: number; acked: number; conflicts: number } = {
  ...emptyCounts(), schedules: 0, changesMade: 0, changesLost: 0, acked: 0, conflicts: 0,
};

const canon = (v: unknown): string => JSON.stringify(v, (_k, x: unknown) => (x && typeof x === 'object' && !Array.isArray(x)
  ? Object.fromEntries(Object.entries(x as Record<string, unknown>).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) : x));

async function heal(w: SyncWorld): Promise<void> {
  await w.deliverAllHeld();
  for (const d of w.devices) d.skewMs = 0;
  // Round 1 pushes every outbox; round 2 pulls everything (conflicts included) everywhere.
  for (let round = 0; round < 2; round++) {
    for (const d of w.devices) {
      d.plan = [];
      const s = await d.client.syncNow();
      expect(s.lastError, `device ${d.deviceId} round ${round}: ${s.lastError?.message}`).toBeNull();
    }
  }
}

async function checkInvariants(w: SyncWorld): Promise<void> {
  const serverRecords = await w.serverRecords();
  const serverMap = new Map(serverRecords.map((r) => [`${r.recordKind}/${r.recordId}`, canon({ v: r.version, r: r.record })]));
  const changes = await w.serverChanges();
  const ids = changes.map((c) => c.changeId);
  // No duplicates: each change once in the feed.
  expect(new Set(ids).size).toBe(ids.length);
  const onServer = new Set(ids);
  // No loss: every change made and every change acknowledged is on the server.
  const lost = [...w.made].filter((id) => !onServer.has(id));
  totals.changesLost += lost.length;
  expect(lost, 'changes made on a device but missing on the server').toEqual([]);
  expect([...w.acked].filter((id) => !onServer.has(id)), 'acknowledged changes missing').toEqual([]);
  // Convergence: every device equals the server (records, tombstones, conflicts); outboxes empty.
  const serverConflicts = canon((await w.serverConflicts()).sort((a, b) => (a.conflictId < b.conflictId ? -1 : 1)));
  for (const d of w.devices) {
    expect(await d.store.pendingCount(w.campaignId), `${d.deviceId} outbox`).toBe(0);
    expect(await d.store.rejectedCount(w.campaignId), `${d.deviceId} rejected: ${JSON.stringify(d.store.rejectedChanges(w.campaignId).map((r) => r.reason))}`).toBe(0);
    const local = new Map([...d.store.records(w.campaignId).values()].map((r) => [`${r.recordKind}/${r.recordId}`, canon({ v: r.version, r: r.record })]));
    expect([...local.keys()].sort(), `${d.deviceId} record keys`).toEqual([...serverMap.keys()].sort());
    for (const [k, v] of serverMap) expect(local.get(k), `${d.deviceId} ${k}`).toBe(v);
    const localConflicts = canon((await d.store.conflicts(w.campaignId)).sort((a, b) => (a.conflictId < b.conflictId ? -1 : 1)));
    expect(localConflicts, `${d.deviceId} conflicts`).toBe(serverConflicts);
  }
  // No resurrection: every record ever deleted is a tombstone on the server (and so everywhere).
  for (const key of w.deletedKeys) {
    const r = serverRecords.find((x) => `${x.recordKind}/${x.recordId}` === key);
    expect(r?.version.deleted, `deleted ${key} came back`).toBe(true);
  }
  // Idempotence: replay the whole feed, each change by its own device's token; nothing moves.
  const before = canon({ r: serverRecords, c: await w.serverConflicts(), n: ids.length });
  for (const d of w.devices) {
    const mine = changes.filter((c) => c.deviceId === d.deviceId)
      .map(({ serverSeq: _s, receivedAt: _r, clockSkewFlag: _f, ...c }) => c);
    for (let i = 0; i < mine.length; i += 100) {
      const res = await w.serverApp().inject({
        method: 'POST', url: `/api/campaigns/${w.campaignId}/push`, headers: { authorization: `Bearer ${w.tokenOf(d.deviceId)}` },
        payload: { protocolVersion: PROTOCOL_VERSION, deviceId: d.deviceId, changes: mine.slice(i, i + 100) },
      });
      expect(res.statusCode).toBe(200);
      const body = PushResponseSchema.parse(res.json());
      expect(body.results.every((r) => r.status === 'acked' && r.duplicate)).toBe(true);
    }
  }
  const after = canon({ r: await w.serverRecords(), c: await w.serverConflicts(), n: (await w.serverChanges()).length });
  expect(after).toBe(before);

  totals.changesMade += w.made.size;
  totals.acked += w.acked.size;
  totals.conflicts += (await w.serverConflicts()).length;
}

async function runSchedule(cmds: Iterable<fc.AsyncCommand<Model, Real>>): Promise<void> {
  const w = new SyncWorld();
  await w.setup(ROLES);
  try {
    // A shared starting point: the lead's first records, pulled by everyone, so races start at once.
    for (const [i, kind] of (['station', 'latitudeReading', 'latitudeReading', 'arcReading'] as const).entries()) {
      const id = w.newId('seed-rec');
      w.made.add(w.devices[0].store.edit(w.campaignId, kind, id, 'put', recordFor(kind, id, i)).changeId);
    }
    for (const d of [...w.devices, ...w.devices]) await d.client.syncNow();
    await fc.asyncModelRun(() => ({ model: { devices: ROLES.length }, real: w }), cmds);
    await heal(w);
    await checkInvariants(w);
    totals.schedules += 1;
    for (const k of Object.keys(w.counts) as (keyof FaultCounts)[]) totals[k] += w.counts[k];
  } finally {
    await w.teardown();
  }
}

const scheduleArb = fc.commands(commandArbs, { maxCommands: MAX_COMMANDS, size: 'max' });

describe('sync under injected faults (model-based, seeded)', () => {
  afterAll(() => {
    const faults = totals.drop + totals.lose + totals.dup + totals.hold + totals['crash-mid-batch'] + totals['crash-after-commit'] + totals.restarts + totals.clockSkews;
    console.log(`sync fault injection: ${totals.schedules} schedules, ${totals.requests} requests, ${faults} faults injected ` +
      `(drop ${totals.drop}, lost response ${totals.lose}, duplicate ${totals.dup}, held/reordered ${totals.hold} (delivered late ${totals.heldDelivered}), ` +
      `crash mid-batch ${totals['crash-mid-batch']}, crash after commit ${totals['crash-after-commit']}, restarts ${totals.restarts}, clock skews ${totals.clockSkews}); ` +
      `${totals.changesMade} changes made, ${totals.acked} acknowledged, ${totals.conflicts} conflicts kept, changes lost: ${totals.changesLost}`);
  });

  it('every device converges to the server and nothing acknowledged is lost', async () => {
    const seed = Number(process.env.ARCFIELD_SEED ?? Date.now() % 2 ** 31);
    const path = process.env.ARCFIELD_SYNC_PATH;
    console.log(`sync fault injection: seed ${seed}, ${RUNS} runs of up to ${MAX_COMMANDS} commands (replay: ARCFIELD_SEED=${seed})`);
    await fc.assert(fc.asyncProperty(scheduleArb, runSchedule), { seed, numRuns: RUNS, ...(path ? { path } : {}), endOnFailure: true });
  }, 300_000);

  const regressionsDir = join(import.meta.dirname, '../fixtures/regressions');
  let pinned: { file: string; seed: number; path?: string; note: string }[] = [];
  try {
    pinned = readdirSync(regressionsDir).filter((f) => f.startsWith('sync-') && f.endsWith('.json'))
      .map((f) => ({ file: f, ...(JSON.parse(readFileSync(join(regressionsDir, f), 'utf8')) as { seed: number; path?: string; note: string }) }));
  } catch {
    pinned = [];
  }
  for (const p of pinned) {
    it(`regression ${p.file}: ${p.note}`, async () => {
      await fc.assert(fc.asyncProperty(scheduleArb, runSchedule), { seed: p.seed, numRuns: 1, ...(p.path ? { path: p.path } : {}), endOnFailure: true });
    }, 120_000);
  }
});
