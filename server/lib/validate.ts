import type * as z from 'zod';
import { badRequest } from './errors.ts';

/** Parses input with a zod schema; failures become a 400 listing each field and what is wrong with it. */
export function parseInput<S extends z.ZodType>(schema: S, input: unknown): z.infer<S> {
  const result = schema.safeParse(input);
  if (result.success) return result.data;
  const fields = result.error.issues.map((issue) => ({ path: issue.path.join('.'), message: issue.message }));
  const summary = fields.map((f) => (f.path ? `${f.path}: ${f.message}` : f.message)).join('; ');
  throw badRequest(`Please correct the request: ${summary}`, { fields });
}
