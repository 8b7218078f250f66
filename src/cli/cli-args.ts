// Argument parsing shared by the command modules: node:util parseArgs (strict), with every problem
// (unknown option, missing value, value outside its list) collected as {field, value, reason} and
// reported together, like a bad campaign file.
import { parseArgs, type ParseArgsConfig } from 'node:util';
import type { Problem } from '../errors.ts';
import { ValidationError } from '../errors.ts';

type Options = NonNullable<ParseArgsConfig['options']>;

export interface ParsedArgs {
  values: Record<string, string | boolean | undefined>;
  positionals: string[];
}

export function parseCommandArgs(command: string, args: readonly string[], options: Options): ParsedArgs {
  try {
    const parsed = parseArgs({ args: [...args], options, allowPositionals: true, strict: true });
    return { values: parsed.values as ParsedArgs['values'], positionals: parsed.positionals };
  } catch (err) {
    if (err instanceof TypeError && typeof (err as { code?: unknown }).code === 'string') {
      const optionMatch = /'([^']+)'/.exec(err.message);
      throw new ValidationError([{ field: optionMatch ? optionMatch[1] : '(arguments)', value: args.join(' '), reason: err.message.split('\n')[0] }], `arcfield ${command}`);
    }
    throw err;
  }
}

/** Check that an option's value is one of `allowed`; push a problem and return undefined otherwise. */
export function pickChoice<T extends string>(
  problems: Problem[], option: string, value: string | boolean | undefined, allowed: readonly T[],
): T | undefined {
  if (value === undefined) return undefined;
  if (typeof value === 'string' && (allowed as readonly string[]).includes(value)) return value as T;
  problems.push({ field: `--${option}`, value, reason: `must be one of ${allowed.join(', ')}` });
  return undefined;
}

/** Print every problem of a refused input on stderr (one line each) and return exit code 2. */
export function reportProblems(err: ValidationError): number {
  process.stderr.write(err.message + '\n');
  return 2;
}
