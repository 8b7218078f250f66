// Load test of the sync server: 50 devices × 2,000 latitude readings pushed through the real
// server (a separate `arcfield serve` process on a SQLite file, WAL + synchronous FULL) over
// loopback HTTP, then every device pulling the whole campaign with the real SyncClient. Prints
// throughput, latency percentiles per request kind, and the count check: all 100,000 readings on
// the server exactly once and on every device exactly once.
//
//   npx tsx bench/sync-load.ts            (ARCFIELD_BENCH_DEVICES, ARCFIELD_BENCH_READINGS to scale)
//
// Invented data only: stations K01…K20 of an invented campaign.
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import type { ConflictRecord } from '../src/sync/conflict.ts';
import { HybridLogicalClock } from '../src/sync/hlc.ts';
import { MAX_PUSH_CHANGES, PROTOCOL_VERSION, type Change } from '../src/sync/protocol.ts';
import { SyncClient } from '../src/sync/sync-client.ts';
import type { PulledChange, SyncStore } from '../src/sync/sync-store.ts';
import { IssuedTokenSchema, PushResponseSchema } from '../src/sync/wire.ts';

const DEVICES = Number(process.env.ARCFIELD_BENCH_DEVICES ?? 50);
const READINGS = Number(process.env.ARCFIELD_BENCH_READINGS ?? 2000);
const TOTAL = DEVICES * READINGS;
const PAGE = 1000;

/** A device store that keeps its outbox and counts how often each reading arrives by pull. */
class CountingStore implements SyncStore {
  outbox: Change[] = [];
  readonly seen = new Uint8Array(TOTAL);
  cursorValue = 0;
  pulled = 0;
  async pendingChanges(_c: string, limit: number) { return this.outbox.slice(0, limit); }
  async pendingCount() { return this.outbox.length; }
  async markAcknowledged(ids: readonly string[]) {
    const done = new Set(ids);
    this.outbox = this.outbox.filter((c) => !done.has(c.changeId));
  }
  async markRejected(r: readonly { changeId: string; reason: string }[]) {
    if (r.length > 0) throw new Error(`load bench: server refused ${r.length} changes, first: ${r[0].reason}`);
  }
  async cursor() { return this.cursorValue; }
  async applyPulled(_c: string, changes: readonly PulledChange[], next: number, _conflicts?: readonly ConflictRecord[]) {
    for (const ch of changes) {
      const m = /^d(\d+)-r(\d+)$/.exec(ch.recordId);
      if (!m) throw new Error(`load bench: unexpected record id ${ch.recordId}`);
      const idx = Number(m[1]) * READINGS + Number(m[2]);
      if (this.seen[idx] < 255) this.seen[idx] += 1;
    }
    this.pulled += changes.length;
    this.cursorValue = Math.max(this.cursorValue, next);
  }
  async conflicts() { return []; }
  async rejectedCount() { return 0; }
  async lastSyncAt() { return null; }
  async setLastSyncAt() { /* not kept */ }
}

const latencies: Record<string, number[]> = { push: [], pull: [], session: [] };
function timedFetch(): typeof fetch {
  return async (input, init) => {
    const url = typeof input === 'string' ? input : input instanceof URL ? input.href : input.url;
    const kind = /\/push$/.test(url) ? 'push' : /\/pull\?/.test(url) ? 'pull' : 'session';
    const t0 = performance.now();
    const res = await fetch(input, init);
    const body = await res.arrayBuffer();
    latencies[kind].push(performance.now() - t0);
    return new Response(body, { status: res.status, headers: res.headers });
  };
}

function pct(xs: number[], p: number): number {
  const s = [...xs].sort((a, b) => a - b);
  return s.length === 0 ? NaN : s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)];
}
const fmt = (xs: number[]) => `p50 ${pct(xs, 50).toFixed(1)} ms, p90 ${pct(xs, 90).toFixed(1)} ms, p99 ${pct(xs, 99).toFixed(1)} ms, max ${Math.max(...xs).toFixed(1)} ms (n=${xs.length})`;

function runCli(args: string[]): Promise<string> {
  return new Promise((resolve, reject) => {
    const p = spawn(process.execPath, ['bin/arcfield.js', 'serve', ...args], { stdio: ['ignore', 'pipe', 'inherit'] });
    let out = '';
    p.stdout.on('data', (d: Buffer) => { out += d.toString(); });
    p.on('exit', (code) => (code === 0 ? resolve(out) : reject(new Error(`arcfield serve ${args.join(' ')} exited ${code}`))));
  });
}

function startServer(dbPath: string): Promise<{ proc: ChildProcess; url: string }> {
  return new Promise((resolve, reject) => {
    const proc = spawn(process.execPath, ['bin/arcfield.js', 'serve', '--port', '0', '--no-static', '--database', `sqlite:${dbPath}`, '--rate-limit', '100000'],
      { stdio: ['ignore', 'pipe', 'inherit'] });
    let out = '';
    proc.stdout?.on('data', (d: Buffer) => {
      out += d.toString();
      const m = /on (http:\/\/127\.0\.0\.1:\d+)\//.exec(out);
      if (m) resolve({ proc, url: m[1] });
    });
    proc.on('exit', (code) => reject(new Error(`server exited ${code} before listening`)));
  });
}

async function main(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'arcfield-load-'));
  const dbPath = join(dir, 'load.sqlite');
  let server: ChildProcess | null = null;
  try {
    const created = await runCli(['--database', `sqlite:${dbPath}`, '--create-campaign', 'Invented load arc']);
    const campaignId = /campaign id: (\S+)/.exec(created)?.[1];
    const leadToken = /lead token:\s+(\S+)/.exec(created)?.[1];
    if (!campaignId || !leadToken) throw new Error(`could not read the bootstrap output:\n${created}`);
    const started = await startServer(dbPath);
    server = started.proc;
    const base = `${started.url}/api/campaigns/${campaignId}`;
    console.log(`sync-load: ${DEVICES} devices × ${READINGS} readings = ${TOTAL} against ${started.url} (SQLite WAL, synchronous FULL; Node ${process.version})`);

    // Crew tokens, issued by the lead through the API (one per device, bound to it).
    const tokens: string[] = [];
    for (let d = 0; d < DEVICES; d++) {
      const r = await fetch(`${base}/tokens`, { method: 'POST', headers: { authorization: `Bearer ${leadToken}`, 'content-type': 'application/json' },
        body: JSON.stringify({ role: 'observer', label: `load device ${d}`, deviceId: `load-dev-${d}` }) });
      tokens.push(IssuedTokenSchema.parse(await r.json()).token);
    }

    // Every device logs its readings locally first (stamped by its own clock).
    const t0 = Date.UTC(2026, 7, 1, 20, 0, 0);
    const stores = Array.from({ length: DEVICES }, (_, d) => {
      const s = new CountingStore();
      const clock = new HybridLogicalClock(() => t0 + d);
      for (let i = 0; i < READINGS; i++) {
        const id = `d${d}-r${i}`;
        s.outbox.push({ changeId: `d${d}-c${i}`, campaignId, recordKind: 'latitudeReading', recordId: id, op: 'put',
          record: { id, station: `K${String((i % 20) + 1).padStart(2, '0')}`, kind: 'astronomic', latitudeDeg: 40 + (i % 1000) / 1000, sigmaArcsec: 0.4, observedAt: '2026-08-01T20:00:00Z' },
          hlc: clock.tick(), deviceId: `load-dev-${d}`, baseHlc: null, protocolVersion: PROTOCOL_VERSION });
      }
      return { s, clock };
    });

    // Phase 1: all devices push at once, batches of MAX_PUSH_CHANGES, each waiting for its ack.
    const f = timedFetch();
    const pushStart = performance.now();
    await Promise.all(stores.map(async ({ s }, d) => {
      while (s.outbox.length > 0) {
        const batch = s.outbox.slice(0, MAX_PUSH_CHANGES);
        const r = await f(`${base}/push`, { method: 'POST', headers: { authorization: `Bearer ${tokens[d]}`, 'content-type': 'application/json' },
          body: JSON.stringify({ protocolVersion: PROTOCOL_VERSION, deviceId: `load-dev-${d}`, changes: batch }) });
        if (r.status !== 200) throw new Error(`push from device ${d}: HTTP ${r.status} ${await r.text()}`);
        const body = PushResponseSchema.parse(await r.json());
        if (body.results.some((x) => x.status !== 'acked')) throw new Error(`push from device ${d}: a change was refused`);
        await s.markAcknowledged(body.results.map((x) => x.changeId));
      }
    }));
    const pushS = (performance.now() - pushStart) / 1000;
    console.log(`push: ${TOTAL} readings in ${pushS.toFixed(2)} s = ${(TOTAL / pushS).toFixed(0)} readings/s, ${(latencies.push.length / pushS).toFixed(1)} requests/s; latency ${fmt(latencies.push)}`);

    // Phase 2: every device pulls everything with the real sync client (session check + pages).
    const pullStart = performance.now();
    const states = await Promise.all(stores.map(({ s, clock }, d) => new SyncClient({
      serverUrl: started.url, campaignId, deviceId: `load-dev-${d}`, token: () => tokens[d], store: s, clock, fetch: f,
      pageSize: PAGE, requestTimeoutMs: 120_000,
    }).syncNow()));
    const pullS = (performance.now() - pullStart) / 1000;
    const failed = states.filter((x) => x.lastError);
    if (failed.length > 0) throw new Error(`pull: ${failed.length} devices failed, first: ${failed[0].lastError?.message}`);

    // Count check: the server's own tables, read directly, and every device's delivery counts.
    const db = new Database(dbPath, { readonly: true });
    const row = db.prepare('SELECT COUNT(*) AS n, COUNT(DISTINCT record_id) AS ids, MAX(server_seq) AS top FROM changes WHERE campaign_id = ?').get(campaignId) as { n: number; ids: number; top: number };
    const recs = (db.prepare('SELECT COUNT(*) AS n FROM records WHERE campaign_id = ? AND deleted = 0').get(campaignId) as { n: number }).n;
    db.close();
    let devicesExact = 0;
    for (const { s } of stores) if (s.pulled === TOTAL && s.seen.every((n) => n === 1)) devicesExact += 1;

    console.log(`pull: ${DEVICES} devices × ${TOTAL} = ${DEVICES * TOTAL} deliveries in ${pullS.toFixed(2)} s = ${((DEVICES * TOTAL) / pullS).toFixed(0)} changes/s; page latency (${PAGE}/page) ${fmt(latencies.pull)}; session ${fmt(latencies.session)}`);
    const ok = row.n === TOTAL && row.ids === TOTAL && row.top === TOTAL && recs === TOTAL && devicesExact === DEVICES;
    console.log(`count check: server ${row.n} changes, ${row.ids} distinct readings, last sequence ${row.top}, ${recs} live records; ` +
      `${devicesExact}/${DEVICES} devices hold all ${TOTAL} readings exactly once — ${ok ? 'PASS' : 'FAIL'}`);
    if (!ok) process.exitCode = 1;
  } finally {
    if (server) {
      const exited = new Promise((r) => server?.once('exit', r));
      server.kill('SIGINT');
      await exited;
    }
    rmSync(dir, { recursive: true, force: true });
  }
}

await main();
