#!/usr/bin/env node
// `npm run bench [-- options]`: makes sure the reference tools are installed (Debian packages
// r-cran-quantreg, r-cran-mass, r-cran-jsonlite, python3-numpy, python3-scipy,
// python3-statsmodels; installed with apt-get when missing and we may), then runs the benchmark
// (bench/run-bench.ts; options are listed there). A peer that still cannot run is reported as
// "missing" in the results, never dropped. Exit status is the harness's own (0 unless it broke):
// failed performance targets are reported, not turned into a failing exit.
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const args = process.argv.slice(2);
const noInstall = args.includes('--no-install');
const benchArgs = args.filter((a) => a !== '--no-install');

const R_PACKAGES = { quantreg: 'r-cran-quantreg', MASS: 'r-cran-mass', jsonlite: 'r-cran-jsonlite' };
const PY_MODULES = { numpy: 'python3-numpy', scipy: 'python3-scipy', statsmodels: 'python3-statsmodels' };
const RSCRIPT = '/usr/bin/Rscript';
const PYTHON = '/usr/bin/python3';

function missingDebianPackages() {
  const need = [];
  if (!existsSync(RSCRIPT)) {
    need.push(...Object.values(R_PACKAGES));
  } else {
    for (const [pkg, deb] of Object.entries(R_PACKAGES)) {
      const r = spawnSync(RSCRIPT, ['-e', `if (!requireNamespace("${pkg}", quietly = TRUE)) quit(status = 1)`], { stdio: 'ignore' });
      if (r.status !== 0) need.push(deb);
    }
  }
  if (!existsSync(PYTHON)) {
    need.push('python3', ...Object.values(PY_MODULES));
  } else {
    for (const [mod, deb] of Object.entries(PY_MODULES)) {
      const r = spawnSync(PYTHON, ['-c', `import ${mod}`], { stdio: 'ignore' });
      if (r.status !== 0) need.push(deb);
    }
  }
  return need;
}

function install(pkgs) {
  const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
  const hasSudo = !isRoot && spawnSync('sudo', ['-n', 'true'], { stdio: 'ignore' }).status === 0;
  if (!existsSync('/usr/bin/apt-get') || (!isRoot && !hasSudo)) {
    console.error(`bench: cannot install ${pkgs.join(' ')} (needs apt-get and root); those peers will be reported as missing`);
    return;
  }
  const sudo = isRoot ? [] : ['sudo', '-n'];
  const run = (cmd) => {
    const [c, ...rest] = [...sudo, ...cmd];
    return spawnSync(c, rest, { stdio: ['ignore', 'ignore', 'inherit'], env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } }).status === 0;
  };
  console.error(`bench: installing ${pkgs.join(' ')} with apt-get`);
  const ok = run(['apt-get', 'update', '-qq']) && run(['apt-get', 'install', '-y', '-qq', ...pkgs]);
  if (!ok) console.error('bench: apt-get did not finish; whatever is still absent will be reported as missing');
}

if (!noInstall) {
  const need = missingDebianPackages();
  if (need.length > 0) install(need);
  else console.error('bench: reference tools present (R quantreg, MASS; python3 numpy, scipy, statsmodels)');
}

// Every side (our Node process, R, Python) inherits one glibc malloc setting: large blocks on
// transparent huge pages and freed memory kept for reuse rather than handed back to the kernel.
// Why: on the bench machine (a small VM) a fresh 8 MB buffer took 6–25 ms to fault in 4 KiB
// pages against under 1 ms to rewrite, so a fit's time depended on when the allocator last gave
// memory back. The same setting for all sides keeps the ratios fair; a GLIBC_TUNABLES already in
// the environment is left as it is (set it to an empty string to measure the defaults). The value
// is recorded in bench/results/latest.json (machine.glibcTunables).
const BENCH_GLIBC_TUNABLES = 'glibc.malloc.hugetlb=1:glibc.malloc.trim_threshold=268435456:glibc.malloc.mmap_threshold=33554432';
const env = { ...process.env, GLIBC_TUNABLES: process.env.GLIBC_TUNABLES ?? BENCH_GLIBC_TUNABLES };
const r = spawnSync(process.execPath, ['--import', 'tsx', join(root, 'bench', 'run-bench.ts'), ...benchArgs], { cwd: root, stdio: 'inherit', env });
process.exit(r.status ?? 1);
