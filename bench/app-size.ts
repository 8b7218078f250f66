// Initial transfer of the field app (run: npx tsx bench/app-size.ts [--no-build] [--dist DIR] [--json];
// --dist measures another build folder as it is, without building).
// "Initial" is what index.html makes the browser fetch before any route is shown: the entry
// script, every chunk in its static import graph (index.html names them as modulepreload links)
// and the stylesheets of those chunks. The graph is read from vite's dist/.vite/manifest.json
// (build.manifest in vite.config.ts), never guessed from file names, and cross-checked against
// the script and link tags of dist/index.html. Everything else is reported separately: chunks
// behind a dynamic import() (routes, the report) and worker scripts (new Worker(...)).
// Each file is gzip-compressed on its own with node:zlib at level 9 (the most a static host's
// gzip does; brotli would be smaller still). KB = 1000 bytes. Budget: 250 KB of initial JS+CSS.
// The exit code is 0 whether or not the budget holds (this is a measurement; it prints PASS or
// FAIL); it is 1 when the build fails, the manifest is missing, or a JS/CSS file is missing from
// the service worker's precache list (the app would then break offline).
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, readdirSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { gzipSync } from 'node:zlib';

export const BUDGET_BYTES = 250_000;
export const GZIP_LEVEL = 9;

/** One entry of dist/.vite/manifest.json (the fields this script reads). */
export interface ManifestChunk {
  file: string;
  src?: string;
  name?: string;
  isEntry?: boolean;
  isDynamicEntry?: boolean;
  imports?: string[];
  dynamicImports?: string[];
  css?: string[];
  assets?: string[];
}
export type ViteManifest = Record<string, ManifestChunk>;

export type LoadKind = 'entry' | 'static' | 'css' | 'lazy' | 'lazy-css' | 'worker';

export interface LoadedFile { file: string; kind: LoadKind }

/** The files of the build sorted by when they load, from the manifest alone. */
export interface LoadPlan { initial: LoadedFile[]; lazy: LoadedFile[]; workers: LoadedFile[] }

const isScriptOrStyle = (f: string) => /\.(m?js|css)$/.test(f);

/**
 * Splits the build into the initial graph (entry + transitive static `imports` + their `css`), the
 * lazily loaded chunks (every other chunk and its CSS) and worker scripts (JS emitted as assets).
 * Throws when the manifest has no entry (vite always marks index.html's script `isEntry`).
 */
export function loadPlan(manifest: ViteManifest): LoadPlan {
  const entries = Object.entries(manifest).filter(([, c]) => c.isEntry === true);
  if (entries.length === 0) throw new Error('manifest: no chunk has isEntry (is this a vite build manifest?)');
  const initial = new Map<string, LoadKind>();
  const seen = new Set<string>();
  const walk = (key: string, kind: 'entry' | 'static') => {
    if (seen.has(key)) return;
    seen.add(key);
    const chunk = manifest[key];
    if (!chunk) throw new Error(`manifest: "${key}" is imported but has no entry of its own`);
    if (!initial.has(chunk.file)) initial.set(chunk.file, kind);
    for (const css of chunk.css ?? []) if (!initial.has(css)) initial.set(css, 'css');
    for (const dep of chunk.imports ?? []) walk(dep, 'static');
  };
  for (const [key] of entries) walk(key, 'entry');

  const lazy = new Map<string, LoadKind>();
  const workers = new Map<string, LoadKind>();
  for (const chunk of Object.values(manifest)) {
    if (!initial.has(chunk.file) && !lazy.has(chunk.file)) lazy.set(chunk.file, 'lazy');
    for (const css of chunk.css ?? []) if (!initial.has(css) && !lazy.has(css)) lazy.set(css, 'lazy-css');
    for (const asset of chunk.assets ?? []) if (/\.m?js$/.test(asset)) workers.set(asset, 'worker');
  }
  const list = (m: Map<string, LoadKind>) => [...m].map(([file, kind]) => ({ file, kind }));
  return { initial: list(initial), lazy: list(lazy), workers: list(workers) };
}

/** Script src, modulepreload href and stylesheet href of the built index.html, as dist-relative paths. */
export function htmlReferences(html: string): string[] {
  const refs: string[] = [];
  for (const tag of html.match(/<(script|link)\b[^>]*>/g) ?? []) {
    const attr = (name: string) => new RegExp(`\\s${name}="([^"]*)"`).exec(tag)?.[1];
    const rel = attr('rel');
    const url = tag.startsWith('<script') ? attr('src') : (rel === 'modulepreload' || rel === 'stylesheet' ? attr('href') : undefined);
    if (url && !/^[a-z]+:/i.test(url)) refs.push(url.replace(/^\//, ''));
  }
  return refs;
}

/** The `url` fields of the precache manifest that vite-plugin-pwa (generateSW) writes into sw.js. */
export function precacheUrls(swSource: string): Set<string> {
  const urls = new Set<string>();
  for (const m of swSource.matchAll(/\burl\s*:\s*"([^"]+)"/g)) urls.add(m[1].replace(/^\//, ''));
  return urls;
}

export interface SizedFile extends LoadedFile { rawBytes: number; gzipBytes: number }

export function sizeFiles(distDir: string, files: readonly LoadedFile[]): SizedFile[] {
  return files.map((f) => {
    const raw = readFileSync(join(distDir, f.file));
    return { ...f, rawBytes: raw.length, gzipBytes: gzipSync(raw, { level: GZIP_LEVEL }).length };
  });
}

const sum = (xs: readonly SizedFile[], key: 'rawBytes' | 'gzipBytes') => xs.reduce((a, x) => a + x[key], 0);
const kb = (bytes: number) => `${(bytes / 1000).toFixed(1)} KB`;

function table(title: string, rows: readonly SizedFile[]): string {
  const sorted = [...rows].sort((a, b) => b.gzipBytes - a.gzipBytes);
  const w = Math.max(4, ...sorted.map((r) => r.file.length));
  const line = (file: string, kind: string, raw: string, gz: string) => `  ${file.padEnd(w)}  ${kind.padEnd(8)}  ${raw.padStart(11)}  ${gz.padStart(10)}`;
  return [
    title,
    line('file', 'kind', 'raw', 'gzip -9'),
    ...sorted.map((r) => line(r.file, r.kind, kb(r.rawBytes), kb(r.gzipBytes))),
    line(`total (${rows.length} files)`, '', kb(sum(rows, 'rawBytes')), kb(sum(rows, 'gzipBytes'))),
  ].join('\n');
}

function build(root: string): void {
  const t0 = Date.now();
  // scripts/build.js is the production build and fails when Workbox would skip a file.
  const r = spawnSync(process.execPath, [join(root, 'scripts', 'build.js')], { cwd: root, encoding: 'utf8' });
  if (r.status !== 0) {
    process.stdout.write(r.stdout);
    process.stderr.write(r.stderr);
    throw new Error(`build failed with exit code ${r.status ?? 'none'}`);
  }
  console.log(`built dist/ in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
}

function main(argv: readonly string[]): number {
  const root = join(dirname(fileURLToPath(import.meta.url)), '..');
  const distArg = argv.indexOf('--dist');
  const dist = distArg >= 0 ? resolve(argv[distArg + 1] ?? '') : join(root, 'dist');
  if (distArg < 0 && !argv.includes('--no-build')) build(root);
  const manifestPath = join(dist, '.vite', 'manifest.json');
  if (!existsSync(manifestPath)) {
    console.error(`no ${manifestPath}: build first (without --no-build), with build.manifest on`);
    return 1;
  }
  const manifest = JSON.parse(readFileSync(manifestPath, 'utf8')) as ViteManifest;
  const plan = loadPlan(manifest);

  // index.html must not load anything the manifest graph does not know about, and vice versa.
  const html = htmlReferences(readFileSync(join(dist, 'index.html'), 'utf8')).filter(isScriptOrStyle);
  const initialFiles = new Set(plan.initial.map((f) => f.file));
  const notInGraph = html.filter((f) => !initialFiles.has(f));
  const notInHtml = [...initialFiles].filter((f) => !html.includes(f));
  for (const f of notInGraph) { console.warn(`warning: index.html loads ${f}, which the manifest graph lacks; counted as initial`); plan.initial.push({ file: f, kind: 'static' }); }
  for (const f of notInHtml) console.warn(`warning: ${f} is in the static graph but not linked from index.html (fetched by import, still initial)`);

  const initial = sizeFiles(dist, plan.initial);
  const lazy = sizeFiles(dist, plan.lazy);
  const workers = sizeFiles(dist, plan.workers);
  const total = sum(initial, 'gzipBytes');
  const pass = total < BUDGET_BYTES;

  // Offline: every script and stylesheet of the build must be in the service worker's precache.
  const swPath = join(dist, 'sw.js');
  const precached = existsSync(swPath) ? precacheUrls(readFileSync(swPath, 'utf8')) : new Set<string>();
  const assetFiles = readdirSync(join(dist, 'assets')).filter(isScriptOrStyle).map((f) => `assets/${f}`);
  const missing = [...new Set([...initial, ...lazy, ...workers].map((f) => f.file).concat(assetFiles))].filter((f) => !precached.has(f));

  if (argv.includes('--json')) {
    console.log(JSON.stringify({ gzipLevel: GZIP_LEVEL, budgetBytes: BUDGET_BYTES, initialGzipBytes: total, pass, initial, lazy, workers, notPrecached: missing }, null, 2));
  } else {
    console.log(`gzip: node:zlib level ${GZIP_LEVEL}, each file on its own; KB = 1000 bytes\n`);
    console.log(table('INITIAL (index.html: entry, static imports / modulepreload, stylesheets)', initial));
    console.log('\n' + table('LAZY (dynamic import(), fetched when first needed)', lazy));
    console.log('\n' + table('WORKERS (new Worker(), fetched when the worker starts)', workers));
    console.log(`\nprecache (dist/sw.js): ${missing.length === 0 ? `all ${assetFiles.length} JS/CSS files of dist/assets listed` : `MISSING ${missing.join(', ')}`}`);
    console.log(`initial JS+CSS: ${kb(total)} gzip (${(total / 1024).toFixed(1)} KiB) = ${(100 * total / BUDGET_BYTES).toFixed(1)} % of the ${kb(BUDGET_BYTES)} budget: ${pass ? 'PASS' : 'FAIL'}`);
  }
  return missing.length === 0 ? 0 : 1;
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  process.exitCode = main(process.argv.slice(2));
}
