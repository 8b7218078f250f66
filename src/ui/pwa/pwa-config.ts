// Build-time PWA settings (read by vite.config.ts; no browser code here). Decisions, with the
// field traps they answer (see the team notes (shared/field-traps.md) and DEVELOPERS.md):
//  - precache the whole shell, so the app opens with no signal; the build fails when
//    Workbox would skip a file for size (scripts/build.js, R-2.6), so the 2 MiB default is kept;
//  - navigation fallback to index.html for deep links, but never for the sync API;
//  - no skipWaiting: a new version waits for the person's "Reload". clientsClaim only
//    matters on the very first install (there is no older worker then), so the first visit is
//    controlled without a reload and works offline straight away.
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import type { ManifestOptions } from 'vite-plugin-pwa';

export const THEME_COLOR = '#17494d';
export const BACKGROUND_COLOR = '#f3efe4';

export const appManifest: Partial<ManifestOptions> = {
  id: '/',
  name: 'arcfield — latitude and arc field book',
  short_name: 'arcfield',
  description: 'Log station latitudes and meridian arc distances offline, see the running figure of the Earth and the suspect readings while still on site.',
  start_url: '/',
  scope: '/',
  display: 'standalone',
  orientation: 'portrait',
  theme_color: THEME_COLOR,
  background_color: BACKGROUND_COLOR,
  lang: 'en',
  categories: ['utilities', 'education'],
  icons: [
    { src: '/icons/icon-192.png', sizes: '192x192', type: 'image/png', purpose: 'any' },
    { src: '/icons/icon-512.png', sizes: '512x512', type: 'image/png', purpose: 'any' },
    { src: '/icons/icon-maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
  ],
};

export const workboxOptions = {
  globPatterns: ['**/*.{js,css,html,svg,png,ico,webmanifest,json}'],
  navigateFallback: 'index.html',
  navigateFallbackDenylist: [/^\/api\//],
  cleanupOutdatedCaches: true,
  clientsClaim: true,
  skipWaiting: false,
};

/** The running build's id, shown in Settings: ARCFIELD_BUILD_ID, else version+commit.time. */
export function buildId(env: NodeJS.ProcessEnv = process.env): string {
  if (env.ARCFIELD_BUILD_ID) return env.ARCFIELD_BUILD_ID;
  const version = (JSON.parse(readFileSync(new URL('../../../package.json', import.meta.url), 'utf8')) as { version: string }).version;
  let commit = 'nogit';
  try {
    commit = execFileSync('git', ['rev-parse', '--short', 'HEAD'], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'ignore'] }).trim();
  } catch {
    // Building from an exported tree without git history: the id says so instead of failing.
  }
  const stamp = new Date().toISOString().slice(0, 16).replace(/[-:T]/g, '');
  return `${version}+${commit}.${stamp}`;
}
