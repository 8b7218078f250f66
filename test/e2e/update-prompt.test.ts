// A new version never reloads the page by itself (field-traps ): the production build
// is served by a small static server; after the first visit the served service worker changes (as
// a new deploy does), the app's update check finds it, and the page shows "new version ready"
// while the form being typed stays put. Only "Reload now" activates the new version, and the draft
// typed before is still in the form afterwards.
import { cpSync, existsSync, mkdtempSync, readFileSync, rmSync, statSync, appendFileSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import { tmpdir } from 'node:os';
import { extname, join, normalize } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ensureBuild, launchPhone, ROOT, type Browser } from './helpers/browser.ts';

const TYPES: Record<string, string> = {
  '.html': 'text/html', '.js': 'text/javascript', '.css': 'text/css', '.json': 'application/json',
  '.webmanifest': 'application/manifest+json', '.png': 'image/png', '.svg': 'image/svg+xml',
};

let dir: string;
let server: Server;
let url: string;
let browser: Browser;

/** Static files with the hosting rules of field-traps R-2.4 (no-cache on the shell and the worker). */
function serve(root: string): Promise<{ server: Server; url: string }> {
  const s = createServer((req, res) => {
    const path = normalize(decodeURIComponent((req.url ?? '/').split('?')[0])).replace(/^(\.\.[/\\])+/, '');
    let file = join(root, path);
    if (!existsSync(file) || statSync(file).isDirectory()) file = join(root, 'index.html');
    const shell = /(index\.html|sw\.js|manifest\.webmanifest)$/.test(file);
    res.writeHead(200, { 'content-type': TYPES[extname(file)] ?? 'application/octet-stream', 'cache-control': shell ? 'no-cache' : 'max-age=31536000, immutable' });
    res.end(readFileSync(file));
  });
  return new Promise((resolve) => s.listen(0, '127.0.0.1', () => {
    const a = s.address();
    resolve({ server: s, url: `http://127.0.0.1:${typeof a === 'object' && a ? a.port : 0}` });
  }));
}

beforeAll(async () => {
  ensureBuild();
  dir = mkdtempSync(join(tmpdir(), 'arcfield-deploy-'));
  cpSync(join(ROOT, 'dist'), dir, { recursive: true });
  ({ server, url } = await serve(dir));
  browser = await launchPhone({ latitude: 8, longitude: 21.5, accuracy: 5 });
}, 180_000);

afterAll(async () => {
  await browser?.close();
  await new Promise((r) => server?.close(r));
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe('new version prompt', () => {
  it('waits for the person before reloading, and the draft survives the reload', async () => {
    const { page } = browser;
    const top = () => page.locator('.ion-page:not(.ion-page-hidden)').last();
    await page.goto(url);
    await page.waitForFunction(async () => (await navigator.serviceWorker.ready) && navigator.serviceWorker.controller !== null, undefined, { timeout: 20_000 });

    // Build A is running; a person starts an entry.
    await top().locator('[data-testid="campaign-name"] input').fill('Draft kept across the update');
    await page.evaluate(() => { (window as unknown as { buildMarker: string }).buildMarker = 'A'; });

    // Build B is deployed (a changed service worker), and the app checks for it.
    appendFileSync(join(dir, 'sw.js'), '\n// build B\n');
    await page.evaluate(async () => { await (await navigator.serviceWorker.getRegistration())?.update(); });
    await page.locator('[data-testid="update-prompt"]').waitFor({ timeout: 20_000 });
    await page.waitForTimeout(1500);
    expect(await page.evaluate(() => (window as unknown as { buildMarker?: string }).buildMarker), 'no silent reload').toBe('A');
    expect(await page.evaluate(async () => (await navigator.serviceWorker.getRegistration())?.waiting !== null)).toBe(true);

    // The person chooses to reload: the waiting version takes over and the page reloads once.
    await Promise.all([page.waitForEvent('load', { timeout: 20_000 }), page.locator('[data-testid="update-reload"]').click()]);
    await top().locator('[data-testid="campaign-name"] input').waitFor();
    expect(await page.evaluate(() => (window as unknown as { buildMarker?: string }).buildMarker)).toBeUndefined();
    expect(await page.evaluate(async () => (await navigator.serviceWorker.getRegistration())?.waiting ?? null)).toBeNull();
    await expect.poll(() => top().locator('[data-testid="campaign-name"] input').inputValue(), { timeout: 5000 }).toBe('Draft kept across the update');
  }, 90_000);
});
