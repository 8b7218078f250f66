// App build versions are semver-like "MAJOR.MINOR.PATCH" (pre-release suffixes ignored): compare
// numerically, part by part — "0.10.0" is newer than "0.9.3", which string order gets wrong.
import { InputError } from '../errors.ts';

function parts(v: string, field: string): number[] {
  const m = /^(\d+)\.(\d+)\.(\d+)(?:[-+].*)?$/.exec(v.trim());
  if (!m) throw new InputError(field, v, 'a version of the form MAJOR.MINOR.PATCH');
  return [Number(m[1]), Number(m[2]), Number(m[3])];
}

/** True when `version` is older than `minimum`. */
export function isOlderVersion(version: string, minimum: string): boolean {
  const a = parts(version, 'clientVersion');
  const b = parts(minimum, 'minClientVersion');
  for (let i = 0; i < 3; i++) if (a[i] !== b[i]) return a[i] < b[i];
  return false;
}
