// `npm test`: everything CI checks, in order, then one plain "N passed, N failed" line.
// Steps: Debian packages for the browser and database tests, type check, lint (with the
// import-boundary rule), cycle check, production build (the browser tests run against it),
// then every vitest test with a throwaway PostgreSQL on loopback.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';

const results = [];
function step(name, cmd, args, env = process.env) {
  const t0 = Date.now();
  console.log(`\n── ${name}: ${cmd} ${args.join(' ')}`);
  const r = spawnSync(cmd, args, { stdio: 'inherit', env });
  const ok = r.status === 0;
  results.push({ name, ok, seconds: (Date.now() - t0) / 1000 });
  console.log(`── ${name}: ${ok ? 'passed' : 'FAILED'} (${((Date.now() - t0) / 1000).toFixed(1)} s)`);
  return ok;
}

step('system packages', 'bash', ['scripts/ensure-system.sh']);
step('typecheck', 'npx', ['tsc', '--noEmit', '-p', 'tsconfig.json']);
step('lint', 'npx', ['eslint', '--max-warnings', '0', '.']);
step('cycles', 'npx', ['madge', '--circular', '--extensions', 'ts,tsx', '--ts-config', 'tsconfig.json', 'src']);
step('build', 'node', ['scripts/build.js']);

// A throwaway PostgreSQL cluster for the database tests.
const env = { ...process.env };
let pgRoot = null;
const pg = spawnSync('bash', ['scripts/pg-start.sh'], { encoding: 'utf8' });
if (pg.status === 0) {
  for (const m of pg.stdout.matchAll(/(\w+)=(\S+)/g)) env[m[1]] = m[2];
  pgRoot = env.PGROOT;
  results.push({ name: 'postgresql start', ok: true, seconds: 0 });
} else {
  console.error(pg.stderr);
  results.push({ name: 'postgresql start', ok: false, seconds: 0 });
}

mkdirSync('.test-results', { recursive: true });
step('vitest', 'npx', ['vitest', 'run', '--reporter=default', '--reporter=json', '--outputFile.json=.test-results/vitest.json'], env);
if (pgRoot) spawnSync('bash', ['scripts/pg-stop.sh'], { stdio: 'inherit', env });

let passed = 0;
let failed = 0;
if (existsSync('.test-results/vitest.json')) {
  const j = JSON.parse(readFileSync('.test-results/vitest.json', 'utf8'));
  passed += j.numPassedTests ?? 0;
  failed += (j.numFailedTests ?? 0) + (j.numFailedTestSuites ?? 0);
}
for (const r of results) {
  if (r.name === 'vitest') continue;
  if (r.ok) passed += 1; else failed += 1;
}
console.log('\nsteps: ' + results.map((r) => `${r.name} ${r.ok ? 'ok' : 'FAILED'}`).join(', '));
const line = `${passed} passed, ${failed} failed`;
writeFileSync('.test-results/summary.txt', line + '\n');
console.log(line);
process.exit(failed === 0 && results.every((r) => r.ok) ? 0 : 1);
