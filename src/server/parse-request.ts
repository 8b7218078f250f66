// Strict validation of a request part (path, query, body) with the field named on failure (400).
import type { z } from 'zod';
import { HttpError } from './http-error.ts';

export function parseRequest<T>(schema: z.ZodType<T>, value: unknown, where: string): T {
  const r = schema.safeParse(value);
  if (r.success) return r.data;
  const issue = r.error.issues[0];
  const field = [where, ...issue.path.map(String)].join('.');
  throw new HttpError(400, 'invalid-request', `${field}: ${issue.message}`, field);
}
