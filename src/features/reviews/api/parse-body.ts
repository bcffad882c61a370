import type * as z from 'zod';

/** Checks a request body with the shared schema before sending it; a problem becomes one readable sentence. */
export function parseBody<S extends z.ZodType>(schema: S, body: unknown): z.infer<S> {
  const result = schema.safeParse(body);
  if (!result.success) {
    const issue = result.error.issues[0];
    throw new Error(issue ? `${issue.message.charAt(0).toUpperCase()}${issue.message.slice(1)}.` : 'The form is not complete.');
  }
  return result.data;
}
