// bench/app-size.ts's reading of the build: which files are the initial transfer. Checked on a
// hand-written manifest in vite's documented shape (vite.dev/guide/backend-integration: `file`,
// `isEntry`, `isDynamicEntry`, `imports`, `dynamicImports`, `css`, `assets`), and — when a
// production build is present (npm test builds first; no build here) — on dist/ itself: no screen
// but the campaign list in the initial graph, index.html loads exactly that graph, everything is precached.
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { htmlReferences, loadPlan, precacheUrls, type ViteManifest } from '../../bench/app-size.ts';

const dist = new URL('../../dist/', import.meta.url);
const built = existsSync(new URL('.vite/manifest.json', dist));
const LAZY_SCREENS = ['campaign-page', 'station-page', 'latitude-entry-page', 'arc-entry-page', 'fit-page', 'readings-page', 'settings-page', 'sync-page'];

/** Entry → shared chunk (with CSS) → core; a lazy screen with its own CSS and a chunk it shares with the entry; a worker. */
const MANIFEST: ViteManifest = {
  'index.html': {
    file: 'assets/index-a1.js', src: 'index.html', isEntry: true,
    imports: ['_shared-b2.js'], dynamicImports: ['src/ui/pages/fit-page.tsx'],
    css: ['assets/index-c3.css'], assets: ['assets/solve-worker-d4.js', 'assets/icon-e5.png'],
  },
  '_shared-b2.js': { file: 'assets/shared-b2.js', imports: ['_core-f6.js'], css: ['assets/shared-g7.css'] },
  '_core-f6.js': { file: 'assets/core-f6.js', imports: ['_shared-b2.js'] }, // a cycle must not loop
  'src/ui/pages/fit-page.tsx': {
    file: 'assets/fit-page-h8.js', src: 'src/ui/pages/fit-page.tsx', isDynamicEntry: true,
    imports: ['_core-f6.js', '_select-i9.js'], css: ['assets/fit-page-j0.css'],
  },
  '_select-i9.js': { file: 'assets/select-i9.js' },
};

describe('initial transfer from the vite manifest', () => {
  it('takes the entry, its static imports and their CSS; the rest is lazy or a worker', () => {
    const plan = loadPlan(MANIFEST);
    expect(plan.initial).toEqual([
      { file: 'assets/index-a1.js', kind: 'entry' },
      { file: 'assets/index-c3.css', kind: 'css' },
      { file: 'assets/shared-b2.js', kind: 'static' },
      { file: 'assets/shared-g7.css', kind: 'css' },
      { file: 'assets/core-f6.js', kind: 'static' },
    ]);
    expect(plan.lazy).toEqual([
      { file: 'assets/fit-page-h8.js', kind: 'lazy' },
      { file: 'assets/fit-page-j0.css', kind: 'lazy-css' },
      { file: 'assets/select-i9.js', kind: 'lazy' },
    ]);
    expect(plan.workers).toEqual([{ file: 'assets/solve-worker-d4.js', kind: 'worker' }]);
  });

  it('refuses a manifest without an entry and a dangling import', () => {
    expect(() => loadPlan({ a: { file: 'a.js' } })).toThrow(/isEntry/);
    expect(() => loadPlan({ 'index.html': { file: 'a.js', isEntry: true, imports: ['_gone.js'] } })).toThrow(/_gone\.js/);
  });

  it('reads script, modulepreload and stylesheet tags of index.html, not icons or the manifest link', () => {
    const html = '<link rel="icon" href="/icons/favicon-32.png" /><script type="module" crossorigin src="/assets/index-a1.js"></script>'
      + '<link rel="modulepreload" crossorigin href="/assets/shared-b2.js"><link rel="stylesheet" crossorigin href="/assets/index-c3.css">'
      + '<link rel="manifest" href="/manifest.webmanifest"><script src="https://example.invalid/x.js"></script>';
    expect(htmlReferences(html)).toEqual(['assets/index-a1.js', 'assets/shared-b2.js', 'assets/index-c3.css']);
  });

  it('reads the precache list of a generateSW service worker', () => {
    const sw = 'e.precacheAndRoute([{url:"assets/index-a1.js",revision:null},{url:"index.html",revision:"0f"}],{})';
    expect([...precacheUrls(sw)]).toEqual(['assets/index-a1.js', 'index.html']);
  });
});

describe.skipIf(!built)('initial transfer of the production build in dist/', () => {
  const manifest = built ? (JSON.parse(readFileSync(new URL('.vite/manifest.json', dist), 'utf8')) as ViteManifest) : {};
  const plan = loadPlan(manifest);
  const initial = new Set(plan.initial.map((f) => f.file));

  it('keeps every screen but the campaign list out of the initial graph', () => {
    const chunks = Object.values(manifest);
    // A screen's chunk carries its src when it is only a dynamic entry, else just its name (fit-page
    // is also imported by settings-page, so it becomes a shared chunk named after it).
    for (const screen of LAZY_SCREENS) {
      const own = chunks.filter((c) => c.src === `src/ui/pages/${screen}.tsx` || c.name === screen);
      expect(own.length, screen).toBeGreaterThan(0);
      for (const c of own) expect(initial.has(c.file), `${screen} (${c.file}) is in the initial graph`).toBe(false);
    }
    const initialSources = chunks.filter((c) => initial.has(c.file)).map((c) => c.src ?? c.name ?? '');
    expect(initialSources.filter((s) => LAZY_SCREENS.some((screen) => s.includes(screen)))).toEqual([]);
  });

  it('matches what index.html loads', () => {
    const html = htmlReferences(readFileSync(new URL('index.html', dist), 'utf8')).filter((f) => /\.(js|css)$/.test(f));
    expect(new Set(html)).toEqual(initial);
  });

  it('precaches every script and stylesheet, so lazy screens open offline', () => {
    const precached = precacheUrls(readFileSync(new URL('sw.js', dist), 'utf8'));
    const files = readdirSync(new URL('assets/', dist)).filter((f) => /\.(js|css)$/.test(f)).map((f) => `assets/${f}`);
    expect(files.filter((f) => !precached.has(f))).toEqual([]);
  });
});
