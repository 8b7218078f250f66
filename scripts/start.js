// `npm start`: one process for the crew's base station — builds the web app when dist/ is missing
// or older than its sources, then runs the sync server (which also serves dist/) and prints the
// URL. Arguments after `npm start --` go to `arcfield serve` (e.g. `npm start -- --port 9000`).
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';

const SOURCES = ['src', 'public', 'index.html', 'vite.config.ts', 'package.json', 'tsconfig.json'];

/** Newest modification time under the given paths (files and folders, recursively). */
function newestMtime(paths) {
  let newest = 0;
  const visit = (p) => {
    if (!existsSync(p)) return;
    const st = statSync(p);
    if (st.isDirectory()) {
      for (const name of readdirSync(p)) visit(join(p, name));
    } else {
      newest = Math.max(newest, st.mtimeMs);
    }
  };
  for (const p of paths) visit(p);
  return newest;
}

function buildIsStale() {
  if (!existsSync('dist/index.html')) return 'dist/ is missing';
  const built = statSync('dist/index.html').mtimeMs;
  return newestMtime(SOURCES) > built ? 'sources changed since the last build' : null;
}

const stale = buildIsStale();
if (stale) {
  console.log(`start: building the web app (${stale})`);
  const b = spawnSync(process.execPath, ['scripts/build.js'], { stdio: 'inherit' });
  if (b.status !== 0) {
    console.error('start: the build failed (see above); not starting the server');
    process.exit(b.status ?? 1);
  }
} else {
  console.log('start: dist/ is up to date');
}

const args = process.argv.slice(2);
const child = spawn(process.execPath, ['bin/arcfield.js', 'serve', '--static', 'dist', ...args], { stdio: 'inherit' });
for (const signal of ['SIGINT', 'SIGTERM']) process.on(signal, () => child.kill(signal));
child.on('exit', (code, signal) => process.exit(code ?? (signal ? 1 : 0)));
