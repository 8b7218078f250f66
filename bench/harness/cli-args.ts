// `--key value` argument parsing for the bench's child scripts (the same convention the R and
// Python peers use), with the field and value named when something is wrong.
import { InputError } from '../../src/errors.ts';

export function parseKeyValueArgs(argv: readonly string[], required: readonly string[]): Map<string, string> {
  const out = new Map<string, string>();
  for (let i = 0; i < argv.length; i += 2) {
    const key = argv[i];
    if (!key.startsWith('--')) throw new InputError('argument', key, 'expected --name value pairs');
    out.set(key.slice(2), argv[i + 1] ?? '');
  }
  for (const name of required) if (!out.has(name)) throw new InputError(`--${name}`, undefined, 'is required');
  return out;
}

export function numberArg(args: Map<string, string>, name: string, fallback?: number): number {
  const raw = args.get(name);
  if (raw === undefined) {
    if (fallback === undefined) throw new InputError(`--${name}`, raw, 'is required');
    return fallback;
  }
  const v = Number(raw);
  if (raw.trim() === '' || !Number.isFinite(v)) throw new InputError(`--${name}`, raw, 'must be a finite number');
  return v;
}
