// The sync loop of a device (runs in the page; no background-sync API is relied on). One cycle:
// an authenticated session request (the connectivity check), push the outbox oldest first in
// batches until it is empty, then pull pages after the local cursor until the server has no more.
// Cycles run on launch, resume, the `online` event, "sync now" and a foreground timer; one tab at
// a time (the injected lock — Web Locks in the browser); failures back off exponentially with
// jitter (backoff.ts), reset on success and on a connectivity change. Everything that touches the
// outside world is injected (fetch, clock, timers, lock, store), so fault tests can replace it.
import type { HybridLogicalClock } from './hlc.ts';
import { DEFAULT_BACKOFF, backoffDelay, type BackoffPolicy } from './backoff.ts';
import { MAX_PUSH_CHANGES, PROTOCOL_VERSION } from './protocol.ts';
import { SyncHttpError, syncRequest, type HttpDeps } from './sync-http.ts';
import { INITIAL_SYNC_STATE, type SyncErrorInfo, type SyncState } from './sync-state.ts';
import type { SyncStore } from './sync-store.ts';
import { PullResponseSchema, PushResponseSchema, SessionSchema } from './wire.ts';
import { isOlderVersion } from './version-compare.ts';

export type SyncTrigger = 'launch' | 'resume' | 'online' | 'manual' | 'timer' | 'retry';

/** Runs `fn` holding the named lock, or returns 'busy' at once when another tab holds it. */
export type LockFn = (name: string, fn: () => Promise<void>) => Promise<'ran' | 'busy'>;

export interface TimerApi {
  set(fn: () => void, ms: number): unknown;
  clear(handle: unknown): void;
}

export interface SyncClientOptions {
  /** Origin of the sync server ('' = the page's own origin). */
  serverUrl: string;
  campaignId: string;
  deviceId: string;
  /** The crew token (null when the device has none yet: the state says so). */
  token: () => string | null | Promise<string | null>;
  store: SyncStore;
  /** The device's clock: the same instance that stamps local edits (see sync-store.ts). */
  clock: HybridLogicalClock;
  fetch: typeof fetch;
  now?: () => number;
  random?: () => number;
  lock?: LockFn;
  timers?: TimerApi;
  /** This app build (semver), compared with the server's minimum. */
  clientVersion?: string;
  requestTimeoutMs?: number;
  batchSize?: number;
  pageSize?: number;
  /** Foreground timer between successful cycles. */
  intervalMs?: number;
  backoff?: BackoffPolicy;
  /** Warn when device and server clocks differ by more than this. */
  clockWarnMs?: number;
}

/** Caps on rounds per cycle: a healthy outbox or feed drains long before them. */
const MAX_PUSH_ROUNDS = 1_000;
const MAX_PULL_ROUNDS = 10_000;

const runDirectly: LockFn = async (_name, fn) => {
  await fn();
  return 'ran';
};

const defaultTimers: TimerApi = {
  set: (fn, ms) => setTimeout(fn, ms),
  clear: (h) => clearTimeout(h as ReturnType<typeof setTimeout>),
};

export class SyncClient {
  private state: SyncState = { ...INITIAL_SYNC_STATE };
  private readonly listeners = new Set<(s: SyncState) => void>();
  private readonly now: () => number;
  private readonly random: () => number;
  private readonly lock: LockFn;
  private readonly timers: TimerApi;
  private readonly http: HttpDeps;
  private batchSize: number;
  private failures = 0;
  private timer: unknown = null;
  private running: Promise<void> | null = null;
  private again = false;
  private started = false;
  private readonly waiters: ((s: SyncState) => void)[] = [];

  constructor(private readonly opts: SyncClientOptions) {
    this.now = opts.now ?? Date.now;
    this.random = opts.random ?? Math.random;
    this.lock = opts.lock ?? runDirectly;
    this.timers = opts.timers ?? defaultTimers;
    this.batchSize = Math.min(opts.batchSize ?? 100, MAX_PUSH_CHANGES);
    this.http = { fetch: opts.fetch, timeoutMs: opts.requestTimeoutMs ?? 15_000, setTimer: (fn, ms) => this.timers.set(fn, ms), clearTimer: (h) => this.timers.clear(h) };
  }

  getState(): SyncState {
    return this.state;
  }

  /** Listen to state changes; the listener is called at once with the current state. Returns the unsubscribe. */
  subscribe(listener: (s: SyncState) => void): () => void {
    this.listeners.add(listener);
    listener(this.state);
    return () => this.listeners.delete(listener);
  }

  /** Start the automatic cycles (runs one now). Calling it while started only triggers a cycle. */
  start(reason: SyncTrigger = 'launch'): void {
    this.started = true;
    this.trigger(reason);
  }

  /** Stop the timer; a cycle in flight finishes, no new one starts automatically. */
  stop(): void {
    this.started = false;
    this.clearTimer();
    this.publish({ nextAttemptAt: null });
  }

  /**
   * Ask for a cycle. `online`, `resume` and `manual` also reset the back-off: the situation has
   * changed, so waiting out the old delay would only keep the crew waiting.
   */
  trigger(reason: SyncTrigger): void {
    if (reason === 'online' || reason === 'resume' || reason === 'manual') this.failures = 0;
    if (this.running) {
      this.again = true;
      return;
    }
    this.clearTimer();
    this.running = this.loop();
  }

  /** "Sync now": run a cycle (or join the one running) and resolve with the state after it. */
  syncNow(): Promise<SyncState> {
    const done = new Promise<SyncState>((resolve) => this.waiters.push(resolve));
    this.trigger('manual');
    return done;
  }

  /** Refresh the counts shown on the sync screen. */
  async refreshCounts(): Promise<void> {
    await this.publishCounts();
  }

  /**
   * Call after a local edit was committed: the unsynced count updates at once, and a cycle runs
   * now unless the client is backing off after failures (then the scheduled retry takes it).
   */
  async notifyLocalChange(): Promise<void> {
    await this.publishCounts();
    if (this.started && this.failures === 0) this.trigger('timer');
  }

  private async loop(): Promise<void> {
    try {
      do {
        this.again = false;
        await this.cycle();
      } while (this.again);
    } finally {
      // Cleared before anyone is told, with no await in between: a trigger from a waiter's
      // continuation then starts a fresh loop instead of setting `again` on one that has ended.
      this.running = null;
    }
    const waiters = this.waiters.splice(0);
    for (const w of waiters) w(this.state);
    this.scheduleNext();
  }

  private scheduleNext(): void {
    if (!this.started) return;
    const delay = this.failures === 0 ? this.opts.intervalMs ?? 60_000 : this.retryDelay();
    this.clearTimer();
    this.timer = this.timers.set(() => {
      this.timer = null;
      this.trigger(this.failures === 0 ? 'timer' : 'retry');
    }, delay);
    this.publish({ nextAttemptAt: new Date(this.now() + delay).toISOString() });
  }

  private lastRetryAfterMs = 0;
  private retryDelay(): number {
    return Math.max(backoffDelay(this.failures, this.opts.backoff ?? DEFAULT_BACKOFF, this.random), this.lastRetryAfterMs);
  }

  private clearTimer(): void {
    if (this.timer !== null) this.timers.clear(this.timer);
    this.timer = null;
  }

  private async cycle(): Promise<void> {
    const { campaignId } = this.opts;
    let outcome: 'ran' | 'busy';
    try {
      outcome = await this.lockedCycle(campaignId);
    } catch (err) {
      // The lock itself failed (e.g. Web Locks refused): nothing ran; say so and retry later.
      this.failures += 1;
      this.recordFailure(err);
      outcome = 'busy';
    }
    if (outcome === 'busy') await this.publishCounts(); // another tab is syncing; just show fresh counts
  }

  private lockedCycle(campaignId: string): Promise<'ran' | 'busy'> {
    return this.lock(`arcfield-sync:${campaignId}`, async () => {
      this.publish({ status: 'syncing', lastAttemptAt: new Date(this.now()).toISOString(), nextAttemptAt: null });
      try {
        await this.exchange();
        this.failures = 0;
        this.lastRetryAfterMs = 0;
        const at = new Date(this.now()).toISOString();
        await this.opts.store.setLastSyncAt(campaignId, at);
        this.publish({ lastSuccessAt: at, lastError: null, connectivity: 'online' });
      } catch (err) {
        this.failures += 1;
        this.recordFailure(err);
      }
      await this.publishCounts();
    });
  }

  private recordFailure(err: unknown): void {
    const at = new Date(this.now()).toISOString();
    let info: SyncErrorInfo;
    if (err instanceof SyncHttpError) {
      info = { kind: err.kind, message: err.message, at, ...(err.status !== undefined ? { status: err.status } : {}) };
      this.lastRetryAfterMs = err.retryAfterMs ?? 0;
    } else {
      info = { kind: 'store', message: `local store: ${err instanceof Error ? err.message : String(err)}`, at };
    }
    const connectivity = info.kind === 'network' || info.kind === 'timeout' ? 'offline'
      : info.kind === 'server' || info.kind === 'rate-limited' ? 'limited' : this.state.connectivity === 'unknown' ? 'online' : this.state.connectivity;
    this.publish({ lastError: info, connectivity, appOutOfDate: this.state.appOutOfDate || info.kind === 'app-out-of-date' });
  }

  /** One session check, the whole outbox, the whole feed. Throws on the first failure. */
  private async exchange(): Promise<void> {
    const { campaignId, deviceId, store, clock } = this.opts;
    const token = await this.opts.token();
    if (!token) throw new SyncHttpError('no-token', 'this device has no crew token for the campaign yet');
    const base = `${this.opts.serverUrl.replace(/\/$/, '')}/api/campaigns/${encodeURIComponent(campaignId)}`;
    const t0 = this.now();
    const session = await syncRequest(this.http, { method: 'GET', url: `${base}/session`, token, deviceId }, SessionSchema);
    const offset = Date.parse(session.serverTime) - (t0 + this.now()) / 2;
    const outOfDate = session.minProtocolVersion > PROTOCOL_VERSION
      || (this.opts.clientVersion !== undefined && isOlderVersion(this.opts.clientVersion, session.minClientVersion));
    this.publish({
      connectivity: 'online', role: session.role, clockOffsetMs: Math.round(offset),
      clockWarning: Math.abs(offset) > (this.opts.clockWarnMs ?? 2 * 60_000), appOutOfDate: outOfDate,
    });
    if (outOfDate) throw new SyncHttpError('app-out-of-date', `the server needs app ${session.minClientVersion} or protocol ${session.minProtocolVersion}; update the app`);

    if (session.role !== 'viewer') {
      for (let round = 0; round < MAX_PUSH_ROUNDS; round++) {
        const pending = await store.pendingChanges(campaignId, this.batchSize);
        if (pending.length === 0) break;
        let res;
        try {
          res = await syncRequest(this.http, { method: 'POST', url: `${base}/push`, token, deviceId, body: { protocolVersion: PROTOCOL_VERSION, deviceId, changes: pending } }, PushResponseSchema);
        } catch (err) {
          // Too large for the server: halve the batch; a single change that is still too large is refused for a person to see.
          if (err instanceof SyncHttpError && err.status === 413) {
            if (pending.length === 1) {
              await store.markRejected([{ changeId: pending[0].changeId, reason: 'larger than the server accepts' }]);
            } else {
              this.batchSize = Math.max(1, Math.floor(pending.length / 2));
            }
            continue;
          }
          throw err;
        }
        if (res.results.length !== pending.length || res.results.some((r, i) => r.changeId !== pending[i].changeId && r.changeId !== `#${i}`)) {
          throw new SyncHttpError('bad-response', `push: ${res.results.length} results for ${pending.length} changes, or out of order`);
        }
        const acked = res.results.filter((r) => r.status === 'acked').map((r) => r.changeId);
        const rejected = res.results.flatMap((r, i) => (r.status === 'rejected' ? [{ changeId: pending[i].changeId, reason: `${r.field}: ${r.reason}` }] : []));
        if (acked.length > 0) await store.markAcknowledged(acked);
        if (rejected.length > 0) await store.markRejected(rejected);
        this.publish({ unsynced: await store.pendingCount(campaignId) });
      }
    }

    let cursor = await store.cursor(campaignId);
    for (let round = 0; round < MAX_PULL_ROUNDS; round++) {
      const page = await syncRequest(this.http, { method: 'GET', url: `${base}/pull?after=${cursor}&limit=${this.opts.pageSize ?? 250}`, token, deviceId }, PullResponseSchema);
      if (page.changes.length > 0 && page.nextCursor <= cursor) {
        throw new SyncHttpError('bad-response', `pull: cursor did not advance past ${cursor}`);
      }
      // Receive every stamp BEFORE the page is committed, so an edit made on a pulled version
      // always sorts after it (merge.ts precondition).
      for (const c of page.changes) clock.receive(c.hlc);
      if (page.changes.length > 0 || page.conflicts.length > 0) await store.applyPulled(campaignId, page.changes, page.nextCursor, page.conflicts);
      cursor = Math.max(cursor, page.nextCursor);
      if (!page.hasMore) break;
    }
  }

  private async publishCounts(): Promise<void> {
    const { store, campaignId } = this.opts;
    try {
      const [unsynced, rejected, conflicts] = await Promise.all([store.pendingCount(campaignId), store.rejectedCount(campaignId), store.conflicts(campaignId)]);
      const openConflicts = conflicts.filter((c) => c.status === 'open').length;
      this.publish({ unsynced, rejected, openConflicts });
    } catch (err) {
      this.publish({ lastError: { kind: 'store', message: `local store: ${err instanceof Error ? err.message : String(err)}`, at: new Date(this.now()).toISOString() } });
    }
    this.publish({ status: this.statusNow() });
  }

  private statusNow(): SyncState['status'] {
    const s = this.state;
    const e = s.lastError;
    if (e && (e.kind === 'network' || e.kind === 'timeout' || e.kind === 'server' || e.kind === 'rate-limited')) return 'offline';
    if (e || s.rejected > 0 || s.openConflicts > 0 || s.appOutOfDate || s.clockWarning) return 'needs-attention';
    return s.lastSuccessAt ? 'synced' : 'offline';
  }

  private publish(patch: Partial<SyncState>): void {
    const next = { ...this.state, ...patch };
    if (Object.keys(patch).every((k) => Object.is(next[k as keyof SyncState], this.state[k as keyof SyncState]))) return;
    this.state = next;
    for (const l of [...this.listeners]) {
      try {
        l(next);
      } catch (err) {
        // A broken listener must not stop sync; report it where a developer sees it.
        queueMicrotask(() => {
          throw err;
        });
      }
    }
  }
}
