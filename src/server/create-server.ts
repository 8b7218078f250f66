// The sync server: Fastify 5 with the sync and token routes, health and readiness, the OpenAPI
// document, rate limits, a body-size limit, CORS for the native app shells, JSON errors without
// stacks, and (optionally) the built web app from the same origin.
import { readFileSync } from 'node:fs';
import Fastify, { type FastifyInstance } from 'fastify';
import { MIN_PROTOCOL_VERSION, PROTOCOL_VERSION } from '../sync/protocol.ts';
import type { Health } from '../sync/wire.ts';
import { authenticate } from './auth.ts';
import { errorHandler, HttpError } from './http-error.ts';
import type { ServerContext } from './server-context.ts';
import { staticHandler } from './static-files.ts';
import type { SyncStorage } from './storage.ts';
import { registerSyncRoutes } from './sync-routes.ts';
import { TokenBuckets, type BucketLimits } from './token-bucket.ts';
import { registerTokenRoutes } from './token-routes.ts';
import type { RecordSchemas } from './validate-change.ts';

export interface ServerLimits {
  /** Largest request body in bytes (a full push batch of ordinary readings is far below it). */
  bodyBytes: number;
  perToken: BucketLimits;
  /** Failed authentications per client address. */
  authFailures: BucketLimits;
}

/** Defaults sized for a crew: a device syncs a few requests a minute; a burst covers a long outbox. */
export const DEFAULT_LIMITS: ServerLimits = {
  bodyBytes: 2 * 1024 * 1024,
  perToken: { burst: 120, perSecond: 20 },
  authFailures: { burst: 20, perSecond: 0.5 },
};

/** Origins of the Capacitor shells (iOS: capacitor://localhost, Android: https://localhost). */
export const DEFAULT_CORS_ORIGINS = ['capacitor://localhost', 'https://localhost', 'http://localhost'];

export interface ServerOptions {
  storage: SyncStorage;
  now?: () => number;
  /** Built web app to serve (e.g. "dist"); null for an API-only server. */
  staticDir?: string | null;
  limits?: Partial<ServerLimits>;
  minClientVersion?: string;
  corsOrigins?: readonly string[];
  logger?: boolean;
  /**
   * Record schemas the push accepts (default RECORD_SCHEMAS). `arcfield serve` adds the campaign
   * record's schema from the device store, which the server layer may not import itself.
   */
  recordSchemas?: RecordSchemas;
  testHooks?: ServerContext['testHooks'];
}

const OPENAPI_TEXT = readFileSync(new URL('./openapi.json', import.meta.url), 'utf8');

export async function createServer(opts: ServerOptions): Promise<FastifyInstance> {
  const limits: ServerLimits = { ...DEFAULT_LIMITS, ...opts.limits };
  const now = opts.now ?? Date.now;
  const app = Fastify({
    logger: opts.logger ? { level: 'info', redact: ['req.headers.authorization'] } : false,
    bodyLimit: limits.bodyBytes,
    trustProxy: false,
    return503OnClosing: true,
  });
  const perToken = new TokenBuckets(limits.perToken, now);
  const failures = new TokenBuckets(limits.authFailures, now);
  const ctx: ServerContext = {
    storage: opts.storage,
    now,
    minClientVersion: opts.minClientVersion ?? '0.0.0',
    recordSchemas: opts.recordSchemas,
    auth: (req) => authenticate(req, opts.storage, { perToken, failures }),
    testHooks: opts.testHooks,
  };
  const cors = new Set(opts.corsOrigins ?? DEFAULT_CORS_ORIGINS);

  app.setErrorHandler(errorHandler);
  // JSON only: without Fastify's text/plain parser a text body gets 415 instead of a confusing 400.
  app.removeContentTypeParser('text/plain');
  app.addHook('onRequest', async (req, reply) => {
    void reply.header('x-content-type-options', 'nosniff');
    const origin = req.headers.origin;
    if (origin && cors.has(origin) && req.url.startsWith('/api/')) {
      void reply.header('access-control-allow-origin', origin).header('vary', 'origin');
      if (req.method === 'OPTIONS') {
        await reply.code(204)
          .header('access-control-allow-methods', 'GET, POST, DELETE')
          .header('access-control-allow-headers', 'authorization, content-type, x-arcfield-device')
          .header('access-control-max-age', '600').send();
      }
    }
  });

  app.get('/api/health', async (): Promise<Health> => ({
    status: 'ok', protocolVersion: PROTOCOL_VERSION, minProtocolVersion: MIN_PROTOCOL_VERSION,
    minClientVersion: ctx.minClientVersion, serverTime: new Date(now()).toISOString(),
  }));
  app.get('/api/health/ready', async (_req, reply) => {
    try {
      await opts.storage.ping();
      return { ready: true, database: opts.storage.kind, schemaVersion: await opts.storage.schemaVersion() };
    } catch {
      return reply.code(503).send({ error: 'not-ready', message: 'the database does not answer' });
    }
  });
  app.get('/api/openapi.json', async (req, reply) => {
    await ctx.auth(req);
    return reply.type('application/json; charset=utf-8').send(OPENAPI_TEXT);
  });
  registerSyncRoutes(app, ctx);
  registerTokenRoutes(app, ctx);

  const serveStatic = opts.staticDir ? staticHandler(opts.staticDir) : null;
  app.setNotFoundHandler(async (req, reply) => {
    if (req.url.startsWith('/api/') || req.url === '/api') {
      // Same answer for an unknown route whether or not a token was sent.
      throw new HttpError(404, 'no-such-route', `no route ${req.method} ${req.url.split('?')[0]}`);
    }
    if (serveStatic && (req.method === 'GET' || req.method === 'HEAD')) return serveStatic(req, reply);
    throw new HttpError(404, 'not-found', 'not found');
  });
  return app;
}
