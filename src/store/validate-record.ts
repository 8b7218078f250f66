// Every record that enters the store passes its one schema (design.md); a refusal lists each
// problem with its field, the value received and the reason, and nothing is written.
import type { z } from 'zod';
import { ValidationError, type Problem } from '../errors.ts';

export function validateRecord<S extends z.ZodType>(schema: S, input: unknown, what: string): z.infer<S> {
  const parsed = schema.safeParse(input, { reportInput: true });
  if (parsed.success) return parsed.data;
  const problems: Problem[] = parsed.error.issues.map((issue) => ({
    field: issue.path.length ? issue.path.map(String).join('.') : what,
    value: (issue as { input?: unknown }).input,
    reason: issue.message,
  }));
  throw new ValidationError(problems, what);
}
