// The small, named error family shared by every layer (see DEVELOPERS.md "Errors").
// Programmer and shape errors throw one of these; data-dependent numerical outcomes
// (rank deficiency, no convergence, too few arcs) are a `status` on a result instead.

/** One problem with one input value: where it is, what it was, and why it is refused. */
export interface Problem {
  /** Where the value lives: a field path such as `latitudeReadings[3].sigmaArcsec`, or `row 12, column distance_m`. */
  field: string;
  /** The offending value, as received (stringified for display by `describeValue`). */
  value: unknown;
  /** Why it is refused, in plain words. */
  reason: string;
  /** Optional source: a file name, a device id, a request. */
  source?: string;
}

export class ArcfieldError extends Error {
  override name = 'ArcfieldError';
}

/** A single bad input value (a typed angle, a unit, an ellipsoid constant). */
export class InputError extends ArcfieldError {
  override name = 'InputError';
  readonly field: string;
  readonly value: unknown;
  readonly reason: string;
  constructor(field: string, value: unknown, reason: string) {
    super(`${field}: ${describeValue(value)} — ${reason}`);
    this.field = field;
    this.value = value;
    this.reason = reason;
  }
}

/** A whole document or batch refused, with every problem listed. Nothing from it is stored. */
export class ValidationError extends ArcfieldError {
  override name = 'ValidationError';
  readonly problems: readonly Problem[];
  constructor(problems: readonly Problem[], what = 'input') {
    super(`${what} refused: ${problems.length} problem${problems.length === 1 ? '' : 's'}\n` +
      problems.map(formatProblem).join('\n'));
    this.problems = problems;
  }
}

export function describeValue(value: unknown): string {
  if (typeof value === 'string') return JSON.stringify(value.length > 80 ? value.slice(0, 77) + '...' : value);
  if (typeof value === 'number') return Object.is(value, -0) ? '-0' : String(value);
  if (value === undefined) return '(missing)';
  if (typeof value === 'bigint' || typeof value === 'boolean' || value === null) return String(value);
  try {
    const s = JSON.stringify(value);
    return s === undefined ? typeof value : s.length > 80 ? s.slice(0, 77) + '...' : s;
  } catch {
    return typeof value;
  }
}

export function formatProblem(p: Problem): string {
  return `  ${p.source ? p.source + ': ' : ''}${p.field}: ${describeValue(p.value)} — ${p.reason}`;
}
