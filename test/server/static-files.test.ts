// The built web app served by the sync server: cache headers as field-traps asks (no-cache on
// index.html, sw.js and the manifest; immutable on hashed assets), deep links get index.html,
// nothing outside the root is reachable, and /api paths never fall back to the app.
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createServer } from '../../src/server/create-server.ts';
import { SqliteStorage } from '../../src/server/sqlite-storage.ts';

describe('static web app', () => {
  const root = mkdtempSync(join(tmpdir(), 'arcfield-dist-'));
  const dist = join(root, 'dist');
  let app: FastifyInstance;
  let storage: SqliteStorage;
  beforeAll(async () => {
    mkdirSync(join(dist, 'assets'), { recursive: true });
    writeFileSync(join(dist, 'index.html'), '<!doctype html><title>arcfield</title>');
    writeFileSync(join(dist, 'sw.js'), 'self.addEventListener("install", () => {});');
    writeFileSync(join(dist, 'manifest.webmanifest'), '{"name":"arcfield"}');
    writeFileSync(join(dist, 'assets', 'index-3f9a1c2e.js'), 'console.log(1)');
    writeFileSync(join(root, 'secret.txt'), 'outside the root');
    storage = new SqliteStorage(':memory:');
    await storage.migrate();
    app = await createServer({ storage, staticDir: dist });
  });
  afterAll(async () => {
    await app.close();
    await storage.close();
    rmSync(root, { recursive: true, force: true });
  });
  const get = (url: string) => app.inject({ method: 'GET', url });

  it('no-cache on the entry points, immutable on hashed assets', async () => {
    for (const url of ['/', '/index.html', '/sw.js', '/manifest.webmanifest']) {
      const r = await get(url);
      expect(r.statusCode, url).toBe(200);
      expect(r.headers['cache-control'], url).toBe('no-cache');
    }
    const asset = await get('/assets/index-3f9a1c2e.js');
    expect(asset.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    expect(asset.headers['content-type']).toBe('text/javascript; charset=utf-8');
    expect((await get('/manifest.webmanifest')).headers['content-type']).toBe('application/manifest+json; charset=utf-8');
    expect((await get('/')).headers['x-content-type-options']).toBe('nosniff');
  });

  it('a deep link gets index.html; a missing file with an extension is 404; /api never falls back', async () => {
    const deep = await get('/campaigns/K/readings');
    expect(deep.statusCode).toBe(200);
    expect(deep.body).toContain('<title>arcfield</title>');
    expect((await get('/assets/missing-0000.js')).statusCode).toBe(404);
    const api = await get('/api/not-a-route');
    expect(api.statusCode).toBe(404);
    expect(api.json()).toMatchObject({ error: 'no-such-route' });
  });

  it('nothing outside the root is reachable', async () => {
    for (const url of ['/../secret.txt', '/%2e%2e/secret.txt', '/assets/..%2f..%2fsecret.txt', '/..%5csecret.txt', '/%00index.html']) {
      const r = await get(url);
      expect(r.body, url).not.toContain('outside the root');
    }
  });
});
