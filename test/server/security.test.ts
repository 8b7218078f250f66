// Security of the HTTP API, through the real Fastify app on real databases: every refusal has the
// right status and code, and nothing from a refused request is stored. Status codes follow
// RFC 9110 (401 no/unknown credentials, 403 not allowed, 413 too large, 415 wrong media type,
// 426 upgrade required) and RFC 6585 (429 too many requests).
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCampaign, type CreatedCampaign } from '../../src/server/create-campaign.ts';
import { createServer } from '../../src/server/create-server.ts';
import { PostgresStorage } from '../../src/server/postgres-storage.ts';
import type { SyncStorage } from '../../src/server/storage.ts';
import { newToken } from '../../src/server/tokens.ts';
import { PushResponseSchema } from '../../src/sync/wire.ts';
import { bearer, latitudeRecord, putChange, stamp, tempSqlite } from './helpers/fixtures.ts';
import { announcePgSkip, freshPgSchema, PG_URL, type PgSchema } from './helpers/pg-target.ts';

const T0 = Date.UTC(2026, 3, 1, 19, 0, 0);
const BODY_LIMIT = 64 * 1024;

function suite(name: string, open: () => Promise<{ storage: SyncStorage; cleanup: () => Promise<void> }>): void {
  describe(`HTTP security: ${name}`, () => {
    let storage: SyncStorage;
    let cleanup: () => Promise<void>;
    let app: FastifyInstance;
    let A: CreatedCampaign;
    let B: CreatedCampaign;
    const tok: Record<string, string> = {};

    beforeAll(async () => {
      ({ storage, cleanup } = await open());
      A = await createCampaign(storage, 'Invented arc A', { campaignId: 'cmp-a', now: new Date(T0) });
      B = await createCampaign(storage, 'Invented arc B', { campaignId: 'cmp-b', now: new Date(T0) });
      for (const [key, role, device] of [['observer', 'observer', 'dev-obs'], ['viewer', 'viewer', null], ['revoked', 'observer', null], ['unbound', 'observer', null]] as const) {
        const t = newToken('cmp-a', role, key, device, new Date(T0));
        await storage.insertToken(t.row);
        tok[key] = t.token;
        if (key === 'revoked') await storage.revokeToken('cmp-a', t.row.id, new Date(T0).toISOString());
      }
      app = await createServer({ storage, now: () => T0, limits: { bodyBytes: BODY_LIMIT, perToken: { burst: 1000, perSecond: 1000 }, authFailures: { burst: 1000, perSecond: 1000 } } });
    });
    afterAll(async () => {
      await app.close();
      await cleanup();
    });

    const nothingStored = async () => {
      expect(await storage.countChanges('cmp-a')).toBe(0);
      expect(await storage.countChanges('cmp-b')).toBe(0);
      expect(await storage.listRecords('cmp-a')).toEqual([]);
      expect((await storage.findCampaign('cmp-a'))?.lastSeq).toBe(0);
    };
    const push = (token: string | null, body: unknown, campaign = 'cmp-a', extra: Record<string, string> = {}) =>
      app.inject({ method: 'POST', url: `/api/campaigns/${campaign}/push`, headers: { ...(token ? bearer(token) : {}), ...extra }, payload: body as object });
    const goodBody = (deviceId = 'dev-obs', recordId = 'r-1') => ({
      protocolVersion: 1, deviceId, changes: [putChange('cmp-a', deviceId, recordId, latitudeRecord(recordId), stamp(T0))],
    });

    it('health and readiness answer without a token; the OpenAPI document needs one', async () => {
      const h = await app.inject({ method: 'GET', url: '/api/health' });
      expect(h.statusCode).toBe(200);
      expect(h.json()).toMatchObject({ status: 'ok', protocolVersion: 1, minProtocolVersion: 1 });
      expect((await app.inject({ method: 'GET', url: '/api/health/ready' })).json()).toMatchObject({ ready: true, schemaVersion: 2 });
      expect((await app.inject({ method: 'GET', url: '/api/openapi.json' })).statusCode).toBe(401);
      const doc = await app.inject({ method: 'GET', url: '/api/openapi.json', headers: bearer(tok.viewer) });
      expect(doc.statusCode).toBe(200);
      expect(doc.json()).toMatchObject({ openapi: '3.1.0' });
    });

    it('no token, an unknown token or a revoked one: 401 on every campaign route', async () => {
      const routes = [['GET', 'session'], ['POST', 'push'], ['GET', 'pull'], ['GET', 'conflicts'], ['GET', 'tokens'], ['POST', 'tokens']] as const;
      for (const [method, route] of routes) {
        for (const headers of [{}, bearer('arcf_notarealtoken'), bearer(tok.revoked), { authorization: 'Basic YTpi' }]) {
          const r = await app.inject({ method, url: `/api/campaigns/cmp-a/${route}`, headers, payload: method === 'POST' ? goodBody() : undefined });
          expect(r.statusCode, `${method} ${route} ${JSON.stringify(headers)}`).toBe(401);
        }
      }
      await nothingStored();
    });

    it('a token of another campaign, or of a campaign that does not exist: 403 wrong-campaign', async () => {
      const r = await push(B.leadToken, goodBody());
      expect(r.statusCode).toBe(403);
      expect(r.json()).toMatchObject({ error: 'wrong-campaign' });
      const ghost = await app.inject({ method: 'GET', url: '/api/campaigns/cmp-nowhere/pull', headers: bearer(A.leadToken) });
      expect(ghost.statusCode).toBe(403);
      // A change naming another campaign inside a push to this one.
      const body = goodBody();
      body.changes[0] = { ...body.changes[0], campaignId: 'cmp-b' };
      expect((await push(tok.observer, body)).json()).toMatchObject({ error: 'wrong-campaign' });
      await nothingStored();
    });

    it('wrong role: a viewer cannot push, an observer cannot issue tokens, exclude or resolve', async () => {
      const v = await push(tok.viewer, goodBody());
      expect(v.statusCode).toBe(403);
      expect(v.json()).toMatchObject({ error: 'wrong-role' });
      const issue = await app.inject({ method: 'POST', url: '/api/campaigns/cmp-a/tokens', headers: bearer(tok.observer), payload: { role: 'lead', label: 'me' } });
      expect(issue.statusCode).toBe(403);
      const exclusion = { ...putChange('cmp-a', 'dev-obs', 'ex-1', { id: 'ex-1', readingId: 'r-1', excludedBy: 'me', reason: 'no', at: '2026-04-01T19:00:00Z' }, stamp(T0)), recordKind: 'exclusion' };
      const resolving = { ...putChange('cmp-a', 'dev-obs', 'r-2', latitudeRecord('r-2'), stamp(T0)), resolves: ['chg-x'] };
      const r = await push(tok.observer, { protocolVersion: 1, deviceId: 'dev-obs', changes: [exclusion, resolving] });
      expect(r.statusCode).toBe(200);
      expect(PushResponseSchema.parse(r.json()).results.map((x) => (x.status === 'rejected' ? x.field : x.status))).toEqual(['changes[0].recordKind', 'changes[1].resolves']);
      await nothingStored();
    });

    it('forged device ids are refused: body, change and header must be the token\'s device', async () => {
      expect((await push(tok.observer, goodBody('dev-someone-else'))).json()).toMatchObject({ error: 'device-mismatch' });
      const mixed = goodBody();
      mixed.changes.push(putChange('cmp-a', 'dev-someone-else', 'r-9', latitudeRecord('r-9'), stamp(T0)));
      const m = await push(tok.observer, mixed);
      expect(m.statusCode).toBe(403);
      expect(m.json()).toMatchObject({ error: 'device-mismatch', field: 'body.changes[1].deviceId' });
      const h = await app.inject({ method: 'GET', url: '/api/campaigns/cmp-a/pull', headers: { ...bearer(tok.observer), 'x-arcfield-device': 'dev-other' } });
      expect(h.statusCode).toBe(403);
      // An unbound token may not take a device another live token holds.
      const taken = await push(tok.unbound, goodBody('dev-obs'));
      expect(taken.statusCode).toBe(403);
      expect(taken.json()).toMatchObject({ error: 'device-taken' });
      await nothingStored();
    });

    it('oversized, too many changes, malformed, empty and non-JSON bodies', async () => {
      const big = goodBody();
      (big.changes[0].record as Record<string, unknown>).method = 'x'.repeat(BODY_LIMIT);
      const r413 = await push(tok.observer, big);
      expect(r413.statusCode).toBe(413);
      expect(r413.json()).toMatchObject({ error: 'body-too-large' });
      const many = { protocolVersion: 1, deviceId: 'dev-obs', changes: Array.from({ length: 201 }, (_, i) => ({ changeId: `c${i}` })) };
      const r400 = await push(tok.observer, many);
      expect(r400.statusCode).toBe(400);
      expect(r400.json()).toMatchObject({ error: 'invalid-request', field: 'body.changes' });
      const malformed = await app.inject({ method: 'POST', url: '/api/campaigns/cmp-a/push', headers: { ...bearer(tok.observer), 'content-type': 'application/json' }, payload: '{"protocolVersion":1,' });
      expect(malformed.statusCode).toBe(400);
      expect(malformed.json()).toMatchObject({ error: 'malformed-body' });
      const empty = await app.inject({ method: 'POST', url: '/api/campaigns/cmp-a/push', headers: { ...bearer(tok.observer), 'content-type': 'application/json' }, payload: '' });
      expect(empty.statusCode).toBe(400);
      const text = await app.inject({ method: 'POST', url: '/api/campaigns/cmp-a/push', headers: { ...bearer(tok.observer), 'content-type': 'text/plain' }, payload: 'hello' });
      expect(text.statusCode).toBe(415);
      const extra = await push(tok.observer, { ...goodBody(), sneaky: true });
      expect(extra.statusCode).toBe(400);
      const old = await push(tok.observer, { ...goodBody(), protocolVersion: 0 });
      expect(old.statusCode).toBe(400); // protocol versions start at 1: 0 is malformed, not old
      await nothingStored();
    });

    it('non-finite and non-numeric numbers are refused per change with the field named', async () => {
      const rec = JSON.stringify(latitudeRecord('r-n'));
      const change = (record: string) => `{"changeId":"chg-n","campaignId":"cmp-a","recordKind":"latitudeReading","recordId":"r-n","op":"put",` +
        `"record":${record},"hlc":"${stamp(T0)}","deviceId":"dev-obs","baseHlc":null,"protocolVersion":1}`;
      for (const [bad, why] of [['1e999', 'overflows to Infinity'], ['-1e999', 'overflows to -Infinity'], ['"41.2"', 'a string'], ['"NaN"', 'the string NaN'], ['null', 'null']] as const) {
        const payload = `{"protocolVersion":1,"deviceId":"dev-obs","changes":[${change(rec.replace('"latitudeDeg":41.2', `"latitudeDeg":${bad}`))}]}`;
        const r = await app.inject({ method: 'POST', url: '/api/campaigns/cmp-a/push', headers: { ...bearer(tok.observer), 'content-type': 'application/json' }, payload });
        expect(r.statusCode, why).toBe(200);
        const [res] = PushResponseSchema.parse(r.json()).results;
        expect(res, why).toMatchObject({ status: 'rejected', changeId: 'chg-n', field: 'changes[0].record.latitudeDeg' });
      }
      const q = await app.inject({ method: 'GET', url: '/api/campaigns/cmp-a/pull?after=1e999', headers: bearer(tok.observer) });
      expect(q.statusCode).toBe(400);
      expect(q.json()).toMatchObject({ field: 'query.after' });
      await nothingStored();
    });

    it('SQL-looking strings: refused where ids are expected, stored verbatim where text is allowed', async () => {
      const evilId = "r1'); DROP TABLE changes;--";
      const r = await push(tok.observer, goodBody('dev-obs', evilId));
      expect(PushResponseSchema.parse(r.json()).results[0]).toMatchObject({ status: 'rejected', field: 'changes[0].recordId' });
      const evilPath = await app.inject({ method: 'GET', url: `/api/campaigns/${encodeURIComponent("cmp-a' OR '1'='1")}/pull`, headers: bearer(tok.observer) });
      expect(evilPath.statusCode).toBe(403);
      await nothingStored();
      // Free text keeps what the crew typed, quotes and all; parameterised SQL stores it as data.
      const note = "Robert'); DROP TABLE records; -- \"K01\" \\ %_";
      const station = { ...putChange('cmp-a', 'dev-obs', 'st-1', { id: 'st-1', code: 'K01', notes: note }, stamp(T0)), recordKind: 'station' };
      const ok = await push(tok.observer, { protocolVersion: 1, deviceId: 'dev-obs', changes: [station] });
      expect(PushResponseSchema.parse(ok.json()).results[0]).toMatchObject({ status: 'acked' });
      const pulled = await app.inject({ method: 'GET', url: '/api/campaigns/cmp-a/pull', headers: bearer(tok.viewer) });
      expect(pulled.json<{ changes: { record: { notes: string } }[] }>().changes[0].record.notes).toBe(note);
      expect(await storage.countChanges('cmp-a')).toBe(1);
      expect((await storage.listRecords('cmp-a')).length).toBe(1);
    });
  });
}

suite('SQLite', async () => {
  const db = tempSqlite();
  const storage = db.open();
  await storage.migrate();
  return { storage, cleanup: async () => { await storage.close(); db.cleanup(); } };
});

if (PG_URL) {
  suite('PostgreSQL', async () => {
    const schema: PgSchema = await freshPgSchema('security');
    const storage = new PostgresStorage(schema.url);
    await storage.migrate();
    return { storage, cleanup: async () => { await storage.close(); await schema.drop(); } };
  });
} else {
  announcePgSkip('security suite');
}

describe('HTTP hygiene (SQLite)', () => {
  const db = tempSqlite();
  let storage: SyncStorage;
  beforeAll(async () => {
    storage = db.open();
    await storage.migrate();
  });
  afterAll(async () => {
    await storage.close();
    db.cleanup();
  });

  it('rate limits per token and per address after failed authentications (429 with Retry-After)', async () => {
    const c = await createCampaign(storage, 'Invented arc R', { campaignId: 'cmp-r', now: new Date(T0) });
    const app = await createServer({ storage, now: () => T0, limits: { perToken: { burst: 3, perSecond: 0.5 }, authFailures: { burst: 2, perSecond: 0.1 } } });
    try {
      const codes = [];
      for (let i = 0; i < 4; i++) codes.push((await app.inject({ method: 'GET', url: '/api/campaigns/cmp-r/session', headers: bearer(c.leadToken) })).statusCode);
      expect(codes).toEqual([200, 200, 200, 429]);
      const limited = await app.inject({ method: 'GET', url: '/api/campaigns/cmp-r/session', headers: bearer(c.leadToken) });
      expect(limited.headers['retry-after']).toBe('2'); // one request at 0.5/s: 2 s
      const bad = [];
      for (let i = 0; i < 3; i++) bad.push((await app.inject({ method: 'GET', url: '/api/campaigns/cmp-r/session', headers: bearer(`arcf_guess${i}`) })).statusCode);
      expect(bad).toEqual([401, 401, 429]);
    } finally {
      await app.close();
    }
  });

  it('an internal failure answers 500 with a request id and no stack trace', async () => {
    const c = await createCampaign(storage, 'Invented arc S', { campaignId: 'cmp-s', now: new Date(T0) });
    const failing = new Proxy(storage, {
      get: (target, key, receiver): unknown => (key === 'pull'
        ? () => Promise.reject(new Error('disk on fire at /var/lib/secret/path'))
        : Reflect.get(target, key, receiver)),
    });
    const app = await createServer({ storage: failing, now: () => T0 });
    try {
      const r = await app.inject({ method: 'GET', url: '/api/campaigns/cmp-s/pull', headers: bearer(c.leadToken) });
      expect(r.statusCode).toBe(500);
      expect(r.json()).toMatchObject({ error: 'internal' });
      expect(r.body).not.toMatch(/disk on fire|secret|\bat \S+:\d+/);
      const unknown = await app.inject({ method: 'GET', url: '/api/nothing-here' });
      expect(unknown.statusCode).toBe(404);
      expect(unknown.json()).toMatchObject({ error: 'no-such-route' });
    } finally {
      await app.close();
    }
  });
});
