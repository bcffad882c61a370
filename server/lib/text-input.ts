import type { NextFunction, Request, Response } from 'express';
import { badRequest } from './errors.ts';

/** A NUL character, or a UTF-16 surrogate without its partner (no Unicode character; PostgreSQL stores neither). */
// eslint-disable-next-line no-control-regex -- NUL is exactly what this looks for.
const UNSTORABLE = /\u0000|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/** The first place in `value` holding a string PostgreSQL cannot store, as a path ("notes", "gates[1].name"). */
export function findUnstorableText(value: unknown, path = '', depth = 0): string | null {
  if (typeof value === 'string') return UNSTORABLE.test(value) ? path || '(body)' : null;
  if (value === null || typeof value !== 'object' || depth > 20) return null;
  const entries = Array.isArray(value) ? value.map((v, i) => [`${path}[${i}]`, v] as const) : Object.entries(value).map(([k, v]) => [path ? `${path}.${k}` : k, v] as const);
  for (const [key, inner] of entries) {
    if (UNSTORABLE.test(key)) return key;
    const found = findUnstorableText(inner, key, depth + 1);
    if (found) return found;
  }
  return null;
}

/**
 * Refuses JSON bodies with text that cannot be stored (NUL, a lone surrogate) with a 400 naming the field, instead
 * of the database's error surfacing as a 500 (issue 12, item 12).
 */
export function rejectUnstorableText(req: Request, _res: Response, next: NextFunction): void {
  const field = findUnstorableText(req.body);
  if (!field) return next();
  next(badRequest(`The text of ${field} holds a NUL character or a broken Unicode character (a lone surrogate), which cannot be stored. Remove it and send again.`));
}
