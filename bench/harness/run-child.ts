// Runs one child process (a peer or our per-estimator runner) with a hard time limit, capturing
// its output. On the limit the child's own process group is killed (it was started detached, so
// the group is exactly the child and what it spawned), never anything else.
import { spawn } from 'node:child_process';

export interface ChildOutcome {
  code: number | null;
  signal: NodeJS.Signals | null;
  stdout: string;
  stderr: string;
  timedOut: boolean;
  wallSeconds: number;
}

export function runChild(command: string, args: readonly string[], options: { timeoutSeconds: number; cwd?: string; env?: NodeJS.ProcessEnv }): Promise<ChildOutcome> {
  return new Promise((resolve) => {
    const started = process.hrtime.bigint();
    const child = spawn(command, args, { cwd: options.cwd, env: options.env ?? process.env, stdio: ['ignore', 'pipe', 'pipe'], detached: true });
    let stdout = '';
    let stderr = '';
    let timedOut = false;
    child.stdout.setEncoding('utf8').on('data', (d: string) => { stdout += d; });
    child.stderr.setEncoding('utf8').on('data', (d: string) => { stderr = (stderr + d).slice(-20_000); });
    const timer = setTimeout(() => {
      timedOut = true;
      if (child.pid !== undefined) {
        try {
          process.kill(-child.pid, 'SIGKILL');
        } catch {
          child.kill('SIGKILL');
        }
      }
    }, options.timeoutSeconds * 1000);
    const finish = (code: number | null, signal: NodeJS.Signals | null): void => {
      clearTimeout(timer);
      resolve({ code, signal, stdout, stderr, timedOut, wallSeconds: Number(process.hrtime.bigint() - started) / 1e9 });
    };
    child.on('error', (e) => { stderr += `\nspawn failed: ${e.message}`; finish(null, null); });
    child.on('close', finish);
  });
}

/** The last line of stdout that parses as a JSON object, or null. */
export function lastJsonLine(stdout: string): unknown {
  const lines = stdout.trim().split('\n').reverse();
  for (const line of lines) {
    const t = line.trim();
    if (!t.startsWith('{')) continue;
    try {
      return JSON.parse(t) as unknown;
    } catch {
      continue;
    }
  }
  return null;
}

/** The last few meaningful lines of stderr, for a failure note. */
export function stderrTail(stderr: string, lines = 3): string {
  return stderr.trim().split('\n').filter((l) => l.trim() !== '').slice(-lines).join(' | ');
}
