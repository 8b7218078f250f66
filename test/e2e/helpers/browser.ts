// Browser-test plumbing: the production build (built when dist/ is missing), `vite preview` on a
// free loopback port (spawned detached, killed by process group), and headless Debian Chromium
// through playwright-core with a throwaway profile (toolchain.md §3).
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

export const ROOT = new URL('../../../', import.meta.url).pathname;
export const ARTIFACTS = join(ROOT, 'test/artifacts');
export const CHROMIUM = '/usr/bin/chromium';
const CHROMIUM_ARGS = ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-quic', '--no-first-run'];
/** A phone-sized viewport (CSS px) with touch. */
export const PHONE = { width: 390, height: 844 };
const SERVER_READY_MS = 20_000;

export function ensureBuild(): void {
  if (existsSync(join(ROOT, 'dist/index.html')) && existsSync(join(ROOT, 'dist/sw.js'))) return;
  const r = spawnSync('node', ['scripts/build.js'], { cwd: ROOT, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`production build failed:\n${r.stdout}\n${r.stderr}`);
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const addr = s.address();
      const port = typeof addr === 'object' && addr ? addr.port : 0;
      s.close(() => resolve(port));
    });
  });
}

export interface PreviewServer {
  url: string;
  stop: () => void;
}

export async function startPreview(): Promise<PreviewServer> {
  const port = await freePort();
  const child: ChildProcess = spawn('npx', ['vite', 'preview', '--host', '127.0.0.1', '--port', String(port), '--strictPort'], {
    cwd: ROOT, detached: true, stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  child.stdout?.on('data', (b: Buffer) => { log += b.toString(); });
  child.stderr?.on('data', (b: Buffer) => { log += b.toString(); });
  const url = `http://127.0.0.1:${port}`;
  const stop = () => {
    if (child.pid && child.exitCode === null) {
      try { process.kill(-child.pid, 'SIGTERM'); } catch (err) {
        if ((err as NodeJS.ErrnoException).code !== 'ESRCH') throw err;
      }
    }
  };
  const t0 = Date.now();
  for (;;) {
    try {
      const res = await fetch(url);
      if (res.ok) return { url, stop };
    } catch {
      // not listening yet
    }
    if (child.exitCode !== null || Date.now() - t0 > SERVER_READY_MS) {
      stop();
      throw new Error(`vite preview did not start on ${url}:\n${log}`);
    }
    await new Promise((r) => setTimeout(r, 150));
  }
}

export interface Browser {
  context: BrowserContext;
  page: Page;
  close: () => Promise<void>;
}

export async function launchPhone(geo: { latitude: number; longitude: number; accuracy: number }): Promise<Browser> {
  const profile = mkdtempSync(join(tmpdir(), 'arcfield-pw-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM, headless: true, args: CHROMIUM_ARGS,
    viewport: PHONE, deviceScaleFactor: 2, isMobile: true, hasTouch: true,
    permissions: ['geolocation'], geolocation: geo, serviceWorkers: 'allow', locale: 'en-GB', timezoneId: 'UTC',
    // The app turns page animations off under reduced motion (field-traps ): faster, steadier tests.
    reducedMotion: 'reduce',
  });
  const page = context.pages()[0] ?? await context.newPage();
  mkdirSync(ARTIFACTS, { recursive: true });
  return {
    context, page,
    close: async () => {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}
