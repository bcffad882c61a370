import { ApiError } from './api-client.ts';

/** Field name → the first message about it; messages about the whole form under "" (shown in the form's banner). */
export type FieldErrors = Record<string, string>;

/**
 * Validation problems by field, so each message sits beside its field rather than in a banner only. Takes the
 * issues of a zod parse in the browser, or the `fields` the server sends with a 400 (server/lib/validate.ts).
 */
export function fieldErrorsOf(issues: readonly { path: readonly PropertyKey[] | string; message: string }[]): FieldErrors {
  const out: FieldErrors = {};
  for (const issue of issues) {
    const key = typeof issue.path === 'string' ? issue.path.split('.')[0] : String(issue.path[0] ?? '');
    if (!(key in out)) out[key] = issue.message;
  }
  return out;
}

/** A failed request's field messages (a 400 with `fields`), else nothing. */
export function fieldErrorsOfRequest(error: unknown): FieldErrors {
  if (!(error instanceof ApiError)) return {};
  const fields = (error.details as { fields?: { path: string; message: string }[] } | undefined)?.fields;
  return Array.isArray(fields) ? fieldErrorsOf(fields) : {};
}
