// One HTTP request of the sync client: a timeout through AbortController on every request, the
// response validated with the wire schema, and every failure turned into a typed SyncHttpError
// the loop can act on (retry, back off, or ask a person).
import type { z } from 'zod';
import type { SyncErrorKind } from './sync-state.ts';
import { ErrorBodySchema } from './wire.ts';

export class SyncHttpError extends Error {
  override name = 'SyncHttpError';
  constructor(readonly kind: SyncErrorKind, message: string, readonly status?: number, readonly code?: string, readonly retryAfterMs?: number) {
    super(message);
  }
}

export interface HttpDeps {
  fetch: typeof fetch;
  timeoutMs: number;
  setTimer: (fn: () => void, ms: number) => unknown;
  clearTimer: (handle: unknown) => void;
}

export interface SyncRequest {
  method: 'GET' | 'POST';
  url: string;
  token: string;
  deviceId: string;
  body?: unknown;
}

function kindOfStatus(status: number, code: string | undefined): SyncErrorKind {
  if (status === 401) return 'auth';
  if (status === 426) return 'app-out-of-date';
  if (status === 403) return 'forbidden';
  if (status === 429) return 'rate-limited';
  if (status >= 500) return 'server';
  return code === 'protocol-unknown' ? 'app-out-of-date' : 'request';
}

export async function syncRequest<T>(deps: HttpDeps, req: SyncRequest, schema: z.ZodType<T>): Promise<T> {
  const controller = new AbortController();
  let timedOut = false;
  const timer = deps.setTimer(() => {
    timedOut = true;
    controller.abort();
  }, deps.timeoutMs);
  let res: Response;
  let text: string;
  try {
    const headers: Record<string, string> = { authorization: `Bearer ${req.token}`, 'x-arcfield-device': req.deviceId, accept: 'application/json' };
    if (req.body !== undefined) headers['content-type'] = 'application/json';
    res = await deps.fetch(req.url, {
      method: req.method, headers, signal: controller.signal, cache: 'no-store',
      body: req.body === undefined ? undefined : JSON.stringify(req.body),
    });
    text = await res.text();
  } catch (err) {
    if (timedOut) throw new SyncHttpError('timeout', `no answer within ${deps.timeoutMs} ms`);
    throw new SyncHttpError('network', `network error: ${err instanceof Error ? err.message : String(err)}`);
  } finally {
    deps.clearTimer(timer);
  }
  let json: unknown;
  try {
    json = text.length > 0 ? JSON.parse(text) as unknown : undefined;
  } catch {
    json = undefined;
  }
  if (!res.ok) {
    const body = ErrorBodySchema.safeParse(json);
    const code = body.success ? body.data.error : undefined;
    const message = body.success ? body.data.message : `HTTP ${res.status}`;
    const retryAfter = Number(res.headers.get('retry-after'));
    throw new SyncHttpError(kindOfStatus(res.status, code), `${req.method} ${new URL(req.url, 'http://x').pathname}: ${res.status} ${message}`, res.status, code,
      Number.isFinite(retryAfter) && retryAfter > 0 ? retryAfter * 1000 : undefined);
  }
  const parsed = schema.safeParse(json);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new SyncHttpError('bad-response', `the server's answer does not match the protocol at ${issue.path.join('.') || '(root)'}: ${issue.message}`, res.status);
  }
  return parsed.data;
}
