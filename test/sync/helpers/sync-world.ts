// A simulated crew for the fault-injection tests: K devices (in-memory SyncStores, each with its
// own skewable clock and the real SyncClient), the real server in-process on a real SQLite file,
// and a fault layer between them that drops requests, loses responses, delivers requests twice,
// holds requests back to deliver them later (reordering), and crashes the server mid-batch or
// between commit and reply (close and reopen the SQLite file). Everything is driven by values the
// test draws from its seed: no Math.random, no wall clock.
import type { FastifyInstance } from 'fastify';
import { createServer } from '../../../src/server/create-server.ts';
import { createCampaign } from '../../../src/server/create-campaign.ts';
import { SqliteStorage } from '../../../src/server/sqlite-storage.ts';
import type { StoredRecord } from '../../../src/server/storage.ts';
import { newToken } from '../../../src/server/tokens.ts';
import { HybridLogicalClock } from '../../../src/sync/hlc.ts';
import { MemorySyncStore } from '../../../src/sync/memory-sync-store.ts';
import type { CrewRole } from '../../../src/sync/protocol.ts';
import { SyncClient, type TimerApi } from '../../../src/sync/sync-client.ts';
import type { PushResponse } from '../../../src/sync/wire.ts';
import { tempSqlite, type TempSqlite } from '../../server/helpers/fixtures.ts';
import { injectFetch } from './inject-fetch.ts';

export type Fault = 'ok' | 'drop' | 'lose' | 'dup' | 'hold' | 'crash-mid-batch' | 'crash-after-commit';

export interface FaultCounts {
  requests: number;
  drop: number;
  lose: number;
  dup: number;
  hold: number;
  heldDelivered: number;
  'crash-mid-batch': number;
  'crash-after-commit': number;
  restarts: number;
  clockSkews: number;
}

export const emptyCounts = (): FaultCounts => ({
  requests: 0, drop: 0, lose: 0, dup: 0, hold: 0, heldDelivered: 0, 'crash-mid-batch': 0, 'crash-after-commit': 0, restarts: 0, clockSkews: 0,
});

/** Timers that never fire: cycles are driven by the test, and no request hangs in-process. */
const inertTimers: TimerApi = { set: () => 0, clear: () => undefined };

export interface Device {
  index: number;
  deviceId: string;
  role: CrewRole;
  store: MemorySyncStore;
  clock: HybridLogicalClock;
  client: SyncClient;
  skewMs: number;
  /** Faults for the next requests of this device, consumed in order. */
  plan: Fault[];
}

interface Held {
  url: string;
  init: RequestInit;
}

export class SyncWorld {
  readonly campaignId = 'cmp-invented-arc';
  readonly devices: Device[] = [];
  readonly counts = emptyCounts();
  /** Change ids the server acknowledged in a response that reached a device. */
  readonly acked = new Set<string>();
  /** Every change any device made (created locally). */
  readonly made = new Set<string>();
  readonly deletedKeys = new Set<string>();
  private held: Held[] = [];
  private storage!: SqliteStorage;
  private app!: FastifyInstance;
  private crashAt: number | null = null;
  private timeMs = Date.UTC(2026, 5, 1, 6, 0, 0);
  private idCounter = 0;
  private readonly db: TempSqlite = tempSqlite();

  /** Virtual time: every command moves it on, so stamps move too. */
  tick(ms = 1_000): void {
    this.timeMs += ms;
  }

  now = (): number => this.timeMs;

  newId = (prefix: string): string => {
    this.idCounter += 1;
    return `${prefix}-${String(this.idCounter).padStart(6, '0')}`;
  };

  async setup(roles: readonly CrewRole[]): Promise<void> {
    await this.open();
    const made = await createCampaign(this.storage, 'Invented meridian arc', { campaignId: this.campaignId, now: new Date(this.timeMs) });
    roles.forEach((role, index) => {
      const deviceId = `dev-${index}`;
      this.devices.push(this.makeDevice(index, deviceId, role));
    });
    for (const d of this.devices) {
      if (d.index === 0 && d.role === 'lead') continue;
      const t = newToken(this.campaignId, d.role, `device ${d.index}`, d.deviceId, new Date(this.timeMs));
      await this.storage.insertToken(t.row);
      this.tokens.set(d.deviceId, t.token);
    }
    if (roles[0] === 'lead') this.tokens.set('dev-0', made.leadToken);
  }

  private readonly tokens = new Map<string, string>();

  private makeDevice(index: number, deviceId: string, role: CrewRole): Device {
    const dev = { index, deviceId, role, skewMs: 0, plan: [] as Fault[] } as Device;
    dev.clock = new HybridLogicalClock(() => this.timeMs + dev.skewMs);
    dev.store = new MemorySyncStore(deviceId, dev.clock, () => this.newId(`${deviceId}-c`));
    dev.client = new SyncClient({
      serverUrl: 'http://arcfield.test', campaignId: this.campaignId, deviceId,
      token: () => this.tokens.get(deviceId) ?? null,
      store: dev.store, clock: dev.clock, fetch: this.faultyFetch(dev),
      now: () => this.timeMs + dev.skewMs, random: () => 0.5, timers: inertTimers,
      batchSize: 3, pageSize: 4, clockWarnMs: 10 * 60_000,
    });
    return dev;
  }

  private async open(): Promise<void> {
    this.storage = new SqliteStorage(this.db.path);
    await this.storage.migrate();
    this.app = await createServer({
      storage: this.storage, now: this.now,
      limits: { perToken: { burst: 1e6, perSecond: 1e6 } },
      testHooks: { duringPush: (i) => {
        if (this.crashAt !== null && i >= this.crashAt) {
          this.crashAt = null;
          throw new Error('simulated crash inside the push transaction');
        }
      } },
    });
  }

  /** Close the server and its SQLite file, then open them again (a process restart). */
  async restart(): Promise<void> {
    this.counts.restarts += 1;
    await this.app.close();
    await this.storage.close();
    await this.open();
  }

  private faultyFetch(dev: Device): typeof fetch {
    const real = injectFetch(() => this.app);
    return async (input, init) => {
      const url = typeof input === 'string' ? input : input instanceof URL ? input.href : input.url;
      const fault = dev.plan.shift() ?? 'ok';
      this.counts.requests += 1;
      if (fault !== 'ok') this.counts[fault] += 1;
      const isPush = init?.method === 'POST';
      const deliver = async () => {
        const res = await real(url, init);
        if (isPush && res.ok) {
          const body = await res.clone().json() as PushResponse;
          return { res, body };
        }
        return { res, body: null };
      };
      switch (fault) {
        case 'drop':
          throw new TypeError('simulated: request lost on the way');
        case 'hold':
          if (init) this.held.push({ url, init });
          throw new TypeError('simulated: request held back (delivered later)');
        case 'lose':
          await deliver();
          throw new TypeError('simulated: response lost on the way back');
        case 'dup': {
          await deliver();
          const second = await deliver();
          this.noteAcks(second.body);
          return second.res;
        }
        case 'crash-mid-batch': {
          this.crashAt = 0;
          await real(url, init).catch(() => undefined);
          this.crashAt = null;
          await this.restart();
          throw new TypeError('simulated: connection reset (server crashed mid-batch)');
        }
        case 'crash-after-commit':
          await deliver();
          await this.restart();
          throw new TypeError('simulated: connection reset (server crashed before replying)');
        case 'ok': {
          const r = await deliver();
          this.noteAcks(r.body);
          return r.res;
        }
      }
    };
  }

  private noteAcks(body: PushResponse | null): void {
    for (const r of body?.results ?? []) if (r.status === 'acked') this.acked.add(r.changeId);
  }

  /** Deliver the oldest held request now (its answer goes nowhere: the device gave up on it). */
  async deliverHeld(which: number): Promise<void> {
    if (this.held.length === 0) return;
    const [h] = this.held.splice(which % this.held.length, 1);
    this.counts.heldDelivered += 1;
    await injectFetch(() => this.app)(h.url, h.init);
  }

  async deliverAllHeld(): Promise<void> {
    while (this.held.length > 0) await this.deliverHeld(0);
  }

  /** A mid-batch crash on the next push of any device: the hook throws after `index` changes. */
  armCrash(index: number): void {
    this.crashAt = index;
  }

  async serverRecords(): Promise<StoredRecord[]> {
    return this.storage.listRecords(this.campaignId);
  }

  async serverConflicts() {
    return this.storage.listConflicts(this.campaignId);
  }

  /** Every change the server holds, in sequence order (read through the real pull path). */
  async serverChanges() {
    const out = [];
    let after = 0;
    for (;;) {
      const page = await this.storage.pull(this.campaignId, after, 500);
      out.push(...page.changes);
      after = page.nextCursor;
      if (!page.hasMore) break;
    }
    return out;
  }

  tokenOf(deviceId: string): string {
    const t = this.tokens.get(deviceId);
    if (!t) throw new Error(`no token for ${deviceId}`);
    return t;
  }

  serverApp(): FastifyInstance {
    return this.app;
  }

  async teardown(): Promise<void> {
    await this.app.close();
    await this.storage.close();
    this.db.cleanup();
  }
}
