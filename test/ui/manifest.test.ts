// The installable-app manifest (field-traps ): required members, icons that exist at the
// declared size (read from each PNG's IHDR chunk, PNG spec §11.2.2), a maskable variant, and —
// when the production build is present (npm test builds first) — the emitted manifest and
// service worker: precached shell, navigation fallback with the API path excluded.
import { existsSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { appManifest, buildId, workboxOptions } from '../../src/ui/pwa/pwa-config.ts';

const root = new URL('../../', import.meta.url);
const REQUIRED = ['id', 'name', 'short_name', 'description', 'start_url', 'scope', 'display', 'theme_color', 'background_color', 'icons'] as const;

function pngSize(path: URL): { width: number; height: number } {
  const b = readFileSync(path);
  expect(b.subarray(0, 8).toString('hex'), `${path.pathname} PNG signature`).toBe('89504e470d0a1a0a');
  expect(b.subarray(12, 16).toString('ascii')).toBe('IHDR');
  return { width: b.readUInt32BE(16), height: b.readUInt32BE(20) };
}

function checkManifest(m: Record<string, unknown>): void {
  for (const k of REQUIRED) expect(m[k], `manifest.${k}`).toBeTruthy();
  expect(m.display).toBe('standalone');
  expect(String(m.start_url).startsWith(String(m.scope))).toBe(true);
  expect(String(m.short_name).length).toBeLessThanOrEqual(12); // common practice: fits under a home-screen icon
  for (const c of [m.theme_color, m.background_color]) expect(String(c)).toMatch(/^#[0-9a-f]{6}$/i);
  const icons = m.icons as { src: string; sizes: string; type: string; purpose?: string }[];
  for (const need of ['192x192', '512x512']) expect(icons.some((i) => i.sizes === need && (i.purpose ?? 'any').includes('any')), need).toBe(true);
  expect(icons.some((i) => i.purpose?.includes('maskable'))).toBe(true);
  for (const icon of icons) {
    expect(icon.type).toBe('image/png');
    const [w, h] = icon.sizes.split('x').map(Number);
    expect(pngSize(new URL(`public${icon.src}`, root)), icon.src).toEqual({ width: w, height: h });
  }
}

describe('web app manifest', () => {
  it('declares every member an installable field app needs, with real icons', () => {
    checkManifest(appManifest);
  });

  it('keeps the sync API out of the navigation fallback and waits for the person before activating', () => {
    expect(workboxOptions.navigateFallback).toBe('index.html');
    expect(workboxOptions.navigateFallbackDenylist.some((r) => r.test('/api/sync/pull'))).toBe(true);
    expect(workboxOptions.navigateFallbackDenylist.some((r) => r.test('/campaigns/x/fit'))).toBe(false);
    expect(workboxOptions.skipWaiting).toBe(false);
  });

  it('gives every build an id (overridable for release builds)', () => {
    expect(buildId({ ARCFIELD_BUILD_ID: 'release-7' })).toBe('release-7');
    expect(buildId({})).toMatch(/^\d+\.\d+\.\d+\+[0-9a-z]+\.\d{12}$/);
  });

  const dist = new URL('dist/', root);
  it.skipIf(!existsSync(new URL('manifest.webmanifest', dist)))('the built manifest and service worker match (dist/)', () => {
    const built = JSON.parse(readFileSync(new URL('manifest.webmanifest', dist), 'utf8')) as Record<string, unknown>;
    checkManifest(built);
    const sw = readFileSync(new URL('sw.js', dist), 'utf8');
    expect(sw).toMatch(/index\.html/);
    expect(sw).toMatch(/\^\\\/api\\\//);
    const html = readFileSync(new URL('index.html', dist), 'utf8');
    expect(html).toMatch(/<link rel="manifest" href="\/manifest\.webmanifest">/);
  });
});
