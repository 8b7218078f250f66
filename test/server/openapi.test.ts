// The committed OpenAPI document (src/server/openapi.json) against the running server: every
// documented operation exists, every route is documented, and real responses of a short session
// (health, session, push with an ack, a reject and a conflict, pull, tokens, errors) validate
// against the document's own JSON Schemas (converted with zod's fromJSONSchema, refs inlined).
import { readFileSync } from 'node:fs';
import type { FastifyInstance } from 'fastify';
import { z } from 'zod';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCampaign, type CreatedCampaign } from '../../src/server/create-campaign.ts';
import { createServer } from '../../src/server/create-server.ts';
import type { SqliteStorage } from '../../src/server/sqlite-storage.ts';
import { bearer, latitudeRecord, putChange, stamp, tempSqlite } from './helpers/fixtures.ts';

interface Doc {
  openapi: string;
  paths: Record<string, Record<string, { responses: Record<string, { content?: Record<string, { schema: unknown }> }> }>>;
  components: { schemas: Record<string, unknown> };
}
const doc = JSON.parse(readFileSync(new URL('../../src/server/openapi.json', import.meta.url), 'utf8')) as Doc;

function inline(node: unknown): unknown {
  if (Array.isArray(node)) return node.map(inline);
  if (node && typeof node === 'object') {
    const o = node as Record<string, unknown>;
    if (typeof o.$ref === 'string') return inline(doc.components.schemas[o.$ref.replace('#/components/schemas/', '')]);
    return Object.fromEntries(Object.entries(o).filter(([k]) => k !== 'discriminator').map(([k, v]) => [k, inline(v)]));
  }
  return node;
}

function responseSchema(path: string, method: string, status: number): z.ZodType {
  const op = doc.paths[path]?.[method.toLowerCase()];
  if (!op) throw new Error(`${method} ${path} is not in the OpenAPI document`);
  const schema = op.responses[String(status)]?.content?.['application/json']?.schema;
  if (!schema) throw new Error(`${method} ${path} ${status} has no JSON schema in the document`);
  return z.fromJSONSchema(inline(schema) as Parameters<typeof z.fromJSONSchema>[0]);
}

describe('OpenAPI document', () => {
  const db = tempSqlite();
  let storage: SqliteStorage;
  let app: FastifyInstance;
  let c: CreatedCampaign;
  const T0 = Date.UTC(2026, 4, 5, 20, 0, 0);
  beforeAll(async () => {
    storage = db.open();
    await storage.migrate();
    c = await createCampaign(storage, 'Invented arc O', { campaignId: 'cmp-o', now: new Date(T0) });
    app = await createServer({ storage, now: () => T0 });
    await app.ready();
  });
  afterAll(async () => {
    await app.close();
    await storage.close();
    db.cleanup();
  });

  it('is OpenAPI 3.1 and documents exactly the routes the server has', () => {
    expect(doc.openapi).toBe('3.1.0');
    const documented = Object.entries(doc.paths).flatMap(([p, ops]) => Object.keys(ops).map((m) => ({ method: m.toUpperCase(), url: p.replace(/\{(\w+)\}/g, ':$1') })));
    for (const r of documented) expect(app.hasRoute(r as { method: 'GET'; url: string }), `${r.method} ${r.url}`).toBe(true);
    // printRoutes lists each route's methods in parentheses; HEAD is Fastify's automatic twin of GET.
    const served = [...app.printRoutes({ commonPrefix: false }).matchAll(/\(([A-Z, ]+)\)/g)]
      .flatMap((m) => m[1].split(', ')).filter((m) => m !== 'HEAD').length;
    expect(served).toBe(documented.length);
  });

  it('real responses match the documented schemas', async () => {
    const check = async (method: 'GET' | 'POST' | 'DELETE', path: string, url: string, status: number, opts: { headers?: Record<string, string>; payload?: object } = {}) => {
      const r = await app.inject({ method, url, ...opts });
      expect(r.statusCode, `${method} ${url}: ${r.body}`).toBe(status);
      const parsed = responseSchema(path, method, status).safeParse(r.json());
      expect(parsed.success, `${method} ${url} ${status}: ${parsed.success ? '' : JSON.stringify(parsed.error.issues[0])}`).toBe(true);
      return r.json<unknown>();
    };
    const auth = { headers: bearer(c.leadToken) };
    await check('GET', '/api/health', '/api/health', 200);
    await check('GET', '/api/health/ready', '/api/health/ready', 200);
    await check('GET', '/api/campaigns/{campaignId}/session', '/api/campaigns/cmp-o/session', 200, auth);
    await check('GET', '/api/campaigns/{campaignId}/session', '/api/campaigns/cmp-o/session', 401);
    const base = putChange('cmp-o', 'dev-l', 'r1', latitudeRecord('r1', 41.1), stamp(T0));
    const win = putChange('cmp-o', 'dev-l', 'r1', latitudeRecord('r1', 41.2), stamp(T0 + 9), base.hlc);
    const lose = putChange('cmp-o', 'dev-l', 'r1', latitudeRecord('r1', 41.3), stamp(T0 + 5), base.hlc);
    const bad = putChange('cmp-o', 'dev-l', 'r2', { id: 'r2' }, stamp(T0 + 11));
    await check('POST', '/api/campaigns/{campaignId}/push', '/api/campaigns/cmp-o/push', 200, { ...auth, payload: { protocolVersion: 1, deviceId: 'dev-l', changes: [base, win, lose, bad] } });
    await check('POST', '/api/campaigns/{campaignId}/push', '/api/campaigns/cmp-o/push', 400, { ...auth, payload: { protocolVersion: 1, deviceId: 'dev-l', changes: [] } });
    const page = await check('GET', '/api/campaigns/{campaignId}/pull', '/api/campaigns/cmp-o/pull?after=0&limit=2', 200, auth) as { hasMore: boolean };
    expect(page.hasMore).toBe(true);
    await check('GET', '/api/campaigns/{campaignId}/pull', '/api/campaigns/cmp-o/pull?after=0', 200, auth);
    await check('GET', '/api/campaigns/{campaignId}/conflicts', '/api/campaigns/cmp-o/conflicts', 200, auth);
    const issued = await check('POST', '/api/campaigns/{campaignId}/tokens', '/api/campaigns/cmp-o/tokens', 201, { ...auth, payload: { role: 'observer', label: 'crew K' } }) as { tokenId: string };
    await check('GET', '/api/campaigns/{campaignId}/tokens', '/api/campaigns/cmp-o/tokens', 200, auth);
    await check('DELETE', '/api/campaigns/{campaignId}/tokens/{tokenId}', `/api/campaigns/cmp-o/tokens/${issued.tokenId}`, 200, auth);
    await check('DELETE', '/api/campaigns/{campaignId}/tokens/{tokenId}', `/api/campaigns/cmp-o/tokens/${issued.tokenId}`, 404, auth);
  });
});
