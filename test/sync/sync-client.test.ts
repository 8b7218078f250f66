// The sync client loop against the real server in-process (inject fetch, real SQLite file): the
// state the sync screen shows, timeouts, back-off, the 413 split, the one-tab lock, version and
// clock checks. Timers are a manual queue the test fires, so nothing depends on wall time.
import type { FastifyInstance } from 'fastify';
import { afterEach, describe, expect, it } from 'vitest';
import { createCampaign } from '../../src/server/create-campaign.ts';
import { createServer, type ServerOptions } from '../../src/server/create-server.ts';
import type { SqliteStorage } from '../../src/server/sqlite-storage.ts';
import { newToken } from '../../src/server/tokens.ts';
import { backoffDelay } from '../../src/sync/backoff.ts';
import { HybridLogicalClock } from '../../src/sync/hlc.ts';
import { MemorySyncStore } from '../../src/sync/memory-sync-store.ts';
import type { CrewRole } from '../../src/sync/protocol.ts';
import { SyncClient, type LockFn, type SyncClientOptions, type TimerApi } from '../../src/sync/sync-client.ts';
import type { SyncState } from '../../src/sync/sync-state.ts';
import { latitudeRecord, tempSqlite } from '../server/helpers/fixtures.ts';
import { injectFetch } from './helpers/inject-fetch.ts';

const T0 = Date.UTC(2026, 6, 1, 4, 0, 0);

class ManualTimers implements TimerApi {
  private next = 1;
  readonly pending = new Map<number, { fn: () => void; ms: number }>();
  readonly delays: number[] = [];
  set(fn: () => void, ms: number): number {
    const id = this.next++;
    this.pending.set(id, { fn, ms });
    this.delays.push(ms);
    return id;
  }
  clear(h: unknown): void {
    this.pending.delete(h as number);
  }
  /** Fire every pending timer whose delay is at most `ms`. */
  fire(ms = Infinity): void {
    for (const [id, t] of [...this.pending]) if (t.ms <= ms) {
      this.pending.delete(id);
      t.fn();
    }
  }
}

interface Rig {
  app: FastifyInstance;
  storage: SqliteStorage;
  tokens: Record<string, string>;
  cleanup: () => Promise<void>;
}

const rigs: Rig[] = [];
afterEach(async () => {
  for (const r of rigs.splice(0)) await r.cleanup();
});

async function rig(devices: Record<string, CrewRole>, server: Partial<ServerOptions> = {}): Promise<Rig> {
  const db = tempSqlite();
  const storage = db.open();
  await storage.migrate();
  const c = await createCampaign(storage, 'Invented arc C', { campaignId: 'cmp-c', now: new Date(T0) });
  const tokens: Record<string, string> = { lead: c.leadToken };
  for (const [dev, role] of Object.entries(devices)) {
    const t = newToken('cmp-c', role, dev, dev, new Date(T0));
    await storage.insertToken(t.row);
    tokens[dev] = t.token;
  }
  const app = await createServer({ storage, now: () => T0, ...server });
  const r: Rig = { app, storage, tokens, cleanup: async () => { await app.close(); await storage.close(); db.cleanup(); } };
  rigs.push(r);
  return r;
}

function device(r: Rig, deviceId: string, over: Partial<SyncClientOptions> = {}) {
  let n = 0;
  const clock = new HybridLogicalClock(() => T0);
  const store = new MemorySyncStore(deviceId, clock, () => `${deviceId}-c${++n}`);
  const timers = new ManualTimers();
  const client = new SyncClient({
    serverUrl: 'http://arcfield.test', campaignId: 'cmp-c', deviceId, token: () => r.tokens[deviceId] ?? null,
    store, clock, fetch: injectFetch(() => r.app), now: () => T0, random: () => 1, timers, ...over,
  });
  return { client, store, timers, clock };
}

describe('SyncClient', () => {
  it('pushes, pulls and publishes the state the sync screen shows', async () => {
    const r = await rig({ 'dev-a': 'observer', 'dev-b': 'observer' });
    const a = device(r, 'dev-a');
    const b = device(r, 'dev-b');
    const seen: SyncState['status'][] = [];
    a.client.subscribe((s) => seen.push(s.status));
    a.store.edit('cmp-c', 'latitudeReading', 'r1', 'put', latitudeRecord('r1'));
    await a.client.refreshCounts();
    expect(a.client.getState().unsynced).toBe(1);
    const s = await a.client.syncNow();
    expect(s).toMatchObject({ status: 'synced', unsynced: 0, connectivity: 'online', role: 'observer', lastError: null, lastSuccessAt: new Date(T0).toISOString() });
    expect(seen.filter((x, i) => x !== seen[i - 1])).toEqual(['offline', 'syncing', 'synced']);
    await b.client.syncNow();
    expect(b.store.records('cmp-c').get('latitudeReading/r1')?.record).toEqual(latitudeRecord('r1'));
  });

  it('regression (sync-now lost at the end of a cycle): back-to-back syncNow calls all resolve', async () => {
    // Defect: a syncNow whose caller awaited the previous one started while the old loop was
    // still marked running, so it only set "again" on a loop that had already ended and never resolved.
    const r = await rig({ 'dev-a': 'observer' });
    const a = device(r, 'dev-a');
    for (let i = 0; i < 10; i++) {
      a.store.edit('cmp-c', 'latitudeReading', `r${i}`, 'put', latitudeRecord(`r${i}`));
      expect((await a.client.syncNow()).unsynced).toBe(0);
    }
    expect(await r.storage.countChanges('cmp-c')).toBe(10);
  });

  it('times out a request that never answers, and says offline', async () => {
    const r = await rig({ 'dev-a': 'observer' });
    const hang: typeof fetch = (_u, init) => new Promise((_res, rej) => init?.signal?.addEventListener('abort', () => rej(new DOMException('aborted', 'AbortError'))));
    const a = device(r, 'dev-a', { fetch: hang, requestTimeoutMs: 7_000 });
    const done = a.client.syncNow();
    await new Promise((res) => setImmediate(res));
    expect(a.timers.delays).toEqual([7_000]);
    a.timers.fire();
    const s = await done;
    expect(s).toMatchObject({ status: 'offline', connectivity: 'offline', lastError: { kind: 'timeout' } });
  });

  it('backs off exponentially up to the cap, and resets on success and on online', async () => {
    const r = await rig({ 'dev-a': 'observer' });
    let up = false;
    const real = injectFetch(() => r.app);
    const flaky: typeof fetch = (u, init) => (up ? real(u, init) : Promise.reject(new TypeError('no route to host')));
    const a = device(r, 'dev-a', { fetch: flaky, backoff: { baseMs: 1_000, capMs: 10_000 }, intervalMs: 60_000, requestTimeoutMs: 99_999 });
    const scheduled = () => a.timers.delays.filter((d) => d !== 99_999);
    a.client.start();
    for (let i = 0; i < 6; i++) {
      await new Promise((res) => setTimeout(res, 5));
      a.timers.fire(60_000); // the retry timers, not the request timeouts
    }
    await new Promise((res) => setTimeout(res, 5));
    // random() = 1 gives the ceiling of full jitter: min(cap, base·2^(n−1)) after n failures.
    expect(scheduled().slice(0, 6)).toEqual([1_000, 2_000, 4_000, 8_000, 10_000, 10_000]);
    up = true;
    a.client.trigger('online');
    await new Promise((res) => setTimeout(res, 20));
    expect(a.client.getState().status).toBe('synced');
    expect(scheduled().at(-1)).toBe(60_000); // back to the foreground interval
    a.client.stop();
  });

  it('an unknown token or an old app needs attention', async () => {
    const r = await rig({ 'dev-a': 'observer' }, { minClientVersion: '2.0.0' });
    const noToken = device(r, 'dev-x');
    expect(await noToken.client.syncNow()).toMatchObject({ status: 'needs-attention', lastError: { kind: 'no-token' } });
    const wrong = device(r, 'dev-a', { token: () => 'arcf_wrong' });
    expect(await wrong.client.syncNow()).toMatchObject({ status: 'needs-attention', lastError: { kind: 'auth', status: 401 } });
    const old = device(r, 'dev-a', { clientVersion: '1.9.12' });
    expect(await old.client.syncNow()).toMatchObject({ status: 'needs-attention', appOutOfDate: true, lastError: { kind: 'app-out-of-date' } });
    const current = device(r, 'dev-a', { clientVersion: '2.0.0' });
    expect(await current.client.syncNow()).toMatchObject({ status: 'synced', appOutOfDate: false });
  });

  it('halves the batch when the server says 413, so every change still goes', async () => {
    const r = await rig({ 'dev-a': 'observer' }, { limits: { bodyBytes: 8 * 1024 } });
    const statuses: number[] = [];
    const real = injectFetch(() => r.app);
    const a = device(r, 'dev-a', { batchSize: 8, fetch: async (u, i) => { const res = await real(u, i); statuses.push(res.status); return res; } });
    // About 1.6 kB per change: 8 of them do not fit in 8 KiB, 4 do.
    const fixes = Array.from({ length: 14 }, (_, k) => ({ latitudeDeg: 41.2 + k / 1e5, longitudeDeg: 12.5, accuracyM: 3.5, fixTime: '2026-07-01T04:00:00Z' }));
    for (let i = 0; i < 8; i++) a.store.edit('cmp-c', 'latitudeReading', `r${i}`, 'put', { ...latitudeRecord(`r${i}`), gnssFixes: fixes });
    const s = await a.client.syncNow();
    expect(s).toMatchObject({ status: 'synced', unsynced: 0, rejected: 0 });
    expect(await r.storage.countChanges('cmp-c')).toBe(8);
    expect(statuses.filter((x) => x === 413).length).toBeGreaterThan(0);
  });

  it('a refused change needs attention and keeps its reason', async () => {
    const r = await rig({ 'dev-a': 'observer' });
    const a = device(r, 'dev-a');
    a.store.edit('cmp-c', 'latitudeReading', 'r1', 'put', { ...latitudeRecord('r1'), latitudeDeg: 95 });
    const s = await a.client.syncNow();
    expect(s).toMatchObject({ status: 'needs-attention', rejected: 1, unsynced: 0 });
    expect(a.store.rejectedChanges('cmp-c')[0].reason).toMatch(/^changes\[0\]\.record\.latitudeDeg: /);
  });

  it('does nothing while another tab holds the sync lock', async () => {
    const r = await rig({ 'dev-a': 'observer' });
    let requests = 0;
    const real = injectFetch(() => r.app);
    const busy: LockFn = async () => 'busy';
    const a = device(r, 'dev-a', { lock: busy, fetch: (u, i) => { requests += 1; return real(u, i); } });
    a.store.edit('cmp-c', 'latitudeReading', 'r1', 'put', latitudeRecord('r1'));
    const s = await a.client.syncNow();
    expect(requests).toBe(0);
    expect(s.unsynced).toBe(1);
  });

  it('warns when the device clock is far from the server clock', async () => {
    const r = await rig({ 'dev-a': 'observer' });
    const a = device(r, 'dev-a', { now: () => T0 - 15 * 60_000, clockWarnMs: 2 * 60_000 });
    const s = await a.client.syncNow();
    expect(s).toMatchObject({ status: 'needs-attention', clockWarning: true, clockOffsetMs: 15 * 60_000 });
  });

  it('a viewer pulls but never pushes', async () => {
    const r = await rig({ 'dev-a': 'observer', 'dev-v': 'viewer' });
    const a = device(r, 'dev-a');
    a.store.edit('cmp-c', 'latitudeReading', 'r1', 'put', latitudeRecord('r1'));
    await a.client.syncNow();
    const v = device(r, 'dev-v');
    const s = await v.client.syncNow();
    expect(s.role).toBe('viewer');
    expect(v.store.records('cmp-c').size).toBe(1);
  });
});

describe('backoffDelay', () => {
  const policy = { baseMs: 2_000, capMs: 300_000 };
  it('is 0 before any failure, then full jitter under min(cap, base·2^(n−1)) with a floor of base/2', () => {
    expect(backoffDelay(0, policy, () => 0.5)).toBe(0);
    expect([1, 2, 3, 4].map((n) => backoffDelay(n, policy, () => 0.999999))).toEqual([1_999, 3_999, 7_999, 15_999]);
    expect(backoffDelay(3, policy, () => 0)).toBe(1_000);
    expect(backoffDelay(60, policy, () => 0.999999)).toBe(299_999);
    expect(backoffDelay(5000, policy, () => 1)).toBe(300_000);
  });
});
