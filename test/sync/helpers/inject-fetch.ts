// A `fetch` that talks to a Fastify app in-process (app.inject): the real routes, parsers, limits
// and database, without sockets. `app` is looked up per request, so a test can restart the server.
import type { FastifyInstance } from 'fastify';

export type AppRef = () => FastifyInstance;

function headersOf(init: RequestInit | undefined): Record<string, string> {
  const out: Record<string, string> = {};
  new Headers(init?.headers).forEach((v, k) => {
    out[k] = v;
  });
  return out;
}

export function injectFetch(app: AppRef): typeof fetch {
  return async (input: string | URL | Request, init?: RequestInit): Promise<Response> => {
    const url = new URL(typeof input === 'string' || input instanceof URL ? String(input) : input.url, 'http://arcfield.test');
    if (init?.signal?.aborted) throw new DOMException('aborted', 'AbortError');
    const res = await app().inject({
      method: (init?.method ?? 'GET') as 'GET' | 'POST' | 'DELETE',
      url: url.pathname + url.search,
      headers: headersOf(init),
      payload: typeof init?.body === 'string' ? init.body : undefined,
    });
    const headers = new Headers();
    for (const [k, v] of Object.entries(res.headers)) if (v !== undefined) headers.set(k, Array.isArray(v) ? v.join(', ') : String(v));
    return new Response(res.statusCode === 204 ? null : res.body, { status: res.statusCode, headers });
  };
}
