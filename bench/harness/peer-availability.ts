// Which peer runtimes and packages this machine has, asked once per run. scripts/bench.js installs
// the Debian packages first where it can; whatever is still absent here makes its peers "missing"
// in the results (with the package to install), never silently dropped.
import { existsSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import type { PeerRuntime, PeerSpec } from './peer-registry.ts';
import { lastJsonLine, runChild } from './run-child.ts';

export interface RuntimeInfo {
  command: string | null;
  version: string | null;
  /** Package → version, or null when it cannot be loaded. */
  packages: Record<string, string | null>;
}

export type Availability = Record<PeerRuntime, RuntimeInfo>;

/** Debian package per R package / Python module (what scripts/bench.js installs). */
export const DEBIAN_PACKAGE: Record<string, string> = {
  quantreg: 'r-cran-quantreg',
  MASS: 'r-cran-mass',
  jsonlite: 'r-cran-jsonlite',
  numpy: 'python3-numpy',
  scipy: 'python3-scipy',
  statsmodels: 'python3-statsmodels',
};

const R_PACKAGES = ['quantreg', 'MASS', 'jsonlite'];
const PY_MODULES = ['numpy', 'scipy', 'statsmodels'];

function findCommand(candidates: readonly string[]): string | null {
  for (const c of candidates) if (existsSync(c)) return c;
  return null;
}

async function probeR(): Promise<RuntimeInfo> {
  const command = findCommand(['/usr/bin/Rscript', '/usr/local/bin/Rscript']);
  if (!command) return { command: null, version: null, packages: {} };
  const code = `v <- sapply(c(${R_PACKAGES.map((p) => `"${p}"`).join(',')}), function(p) tryCatch(as.character(packageVersion(p)), error = function(e) ""));` +
    `cat(sprintf('{"R":"%s.%s",%s}\\n', R.version$major, R.version$minor, paste(sprintf('"%s":"%s"', names(v), v), collapse = ",")))`;
  const out = await runChild(command, ['-e', code], { timeoutSeconds: 60 });
  const parsed = lastJsonLine(out.stdout) as Record<string, string> | null;
  const packages: Record<string, string | null> = {};
  for (const p of R_PACKAGES) packages[p] = parsed?.[p] ? parsed[p] : null;
  return { command, version: parsed?.R ?? null, packages };
}

async function probePython(): Promise<RuntimeInfo> {
  // The Debian interpreter: its numpy/scipy/statsmodels come from the packages we install.
  const command = findCommand(['/usr/bin/python3']);
  if (!command) return { command: null, version: null, packages: {} };
  const code = 'import importlib, json, platform\nout = {"python": platform.python_version()}\n' +
    `for m in ${JSON.stringify(PY_MODULES)}:\n    try:\n        out[m] = importlib.import_module(m).__version__\n    except Exception:\n        out[m] = None\nprint(json.dumps(out))`;
  const out = await runChild(command, ['-c', code], { timeoutSeconds: 60 });
  const parsed = lastJsonLine(out.stdout) as Record<string, string | null> | null;
  const packages: Record<string, string | null> = {};
  for (const m of PY_MODULES) packages[m] = parsed?.[m] ?? null;
  return { command, version: parsed?.python ?? null, packages };
}

function probeNode(): RuntimeInfo {
  const require = createRequire(import.meta.url);
  let yalps: string | null = null;
  try {
    // yalps' "exports" hide package.json, so read it beside the resolved entry (dist/index.cjs).
    const entry = require.resolve('yalps');
    yalps = (JSON.parse(readFileSync(join(dirname(entry), '..', 'package.json'), 'utf8')) as { version: string }).version;
  } catch {
    yalps = null;
  }
  return { command: process.execPath, version: process.versions.node, packages: { yalps } };
}

export async function probeAvailability(): Promise<Availability> {
  const [R, python] = await Promise.all([probeR(), probePython()]);
  return { R, python, node: probeNode() };
}

/** null when the peer can run, else why not ("missing (...)"). */
export function whyMissing(peer: PeerSpec, availability: Availability): string | null {
  const rt = availability[peer.runtime];
  if (!rt.command) return `missing (${peer.runtime === 'R' ? 'Rscript not found: apt-get install r-base-core' : 'python3 not found: apt-get install python3'})`;
  const absent = peer.requires.filter((p) => !rt.packages[p]);
  if (absent.length === 0) return null;
  return `missing (${absent.join(', ')}: ${absent.map((p) => DEBIAN_PACKAGE[p] ? `apt-get install ${DEBIAN_PACKAGE[p]}` : `npm install ${p}`).join('; ')})`;
}
