// Production build of the web app. Fails when Workbox would silently skip a file from the
// precache ("won't be precached"), because the offline app would then break in the field.
import { spawnSync } from 'node:child_process';

const r = spawnSync('npx', ['vite', 'build'], { encoding: 'utf8' });
process.stdout.write(r.stdout);
process.stderr.write(r.stderr);
if (r.status !== 0) process.exit(r.status ?? 1);
if (/won't be precached/.test(r.stdout + r.stderr)) {
  console.error('build: an asset is too large to precache (see above); split it or raise the budget deliberately.');
  process.exit(1);
}
