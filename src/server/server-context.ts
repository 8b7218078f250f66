// What every route handler is given: storage, the server clock, authentication and settings.
import type { FastifyRequest } from 'fastify';
import type { SyncStorage, TokenRow } from './storage.ts';
import type { RecordSchemas } from './validate-change.ts';

export interface ServerContext {
  storage: SyncStorage;
  now: () => number;
  minClientVersion: string;
  recordSchemas?: RecordSchemas;
  /** Authenticate the request (401 / 429 on failure). */
  auth: (req: FastifyRequest) => Promise<TokenRow>;
  testHooks?: { duringPush?: (index: number) => void };
}
