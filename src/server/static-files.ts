// Serves the built web app (dist/) from the sync server, so `npm start` is one process. Hashed
// build assets (dist/assets/*) are immutable for a year; everything else — index.html, sw.js, the
// manifest — is `no-cache`, so an updated service worker is seen on the next visit (field-traps
// Paths are resolved inside the root and anything that escapes it is refused; unknown
// paths without an extension get index.html (the app's router handles deep links).
import { createReadStream, statSync } from 'node:fs';
import { extname, join, normalize, resolve, sep } from 'node:path';
import type { FastifyReply, FastifyRequest } from 'fastify';

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.webmanifest': 'application/manifest+json; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
  '.webp': 'image/webp',
  '.woff2': 'font/woff2',
  '.txt': 'text/plain; charset=utf-8',
  '.map': 'application/json; charset=utf-8',
};

const IMMUTABLE = 'public, max-age=31536000, immutable';

function fileAt(root: string, urlPath: string): string | null {
  let decoded: string;
  try {
    decoded = decodeURIComponent(urlPath);
  } catch {
    return null;
  }
  if (decoded.includes('\0')) return null;
  const full = normalize(join(root, decoded));
  if (full !== root && !full.startsWith(root + sep)) return null;
  try {
    return statSync(full).isFile() ? full : null;
  } catch {
    return null;
  }
}

export function staticHandler(dir: string) {
  const root = resolve(dir);
  return async function serve(req: FastifyRequest, reply: FastifyReply): Promise<void> {
    const urlPath = req.url.split('?')[0];
    let file = fileAt(root, urlPath === '/' ? '/index.html' : urlPath);
    if (!file && extname(urlPath) === '') file = fileAt(root, '/index.html');
    if (!file) {
      await reply.code(404).type('text/plain; charset=utf-8').send('not found');
      return;
    }
    const rel = file.slice(root.length + 1).split(sep).join('/');
    void reply.header('cache-control', rel.startsWith('assets/') ? IMMUTABLE : 'no-cache');
    void reply.type(TYPES[extname(file).toLowerCase()] ?? 'application/octet-stream');
    await reply.send(req.method === 'HEAD' ? '' : createReadStream(file));
  };
}
