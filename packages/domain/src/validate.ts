import type { z } from 'zod';
import { ValidationError } from './errors.js';

/**
 * Parses a request part with its zod schema.
 * @throws ValidationError (422) naming every failing field.
 */
export function parseWith<T extends z.ZodType>(schema: T, value: unknown, where: 'body' | 'query' | 'params'): z.infer<T> {
  const result = schema.safeParse(value ?? {});
  if (result.success) return result.data;
  const errors = result.error.issues.map((issue) => ({
    path: [where, ...issue.path.map(String)].join('.'),
    message: issue.message,
  }));
  const summary = errors.map((e) => `${e.path}: ${e.message}`).join('; ');
  throw new ValidationError(`The request ${where} is invalid — ${summary}`, errors);
}
