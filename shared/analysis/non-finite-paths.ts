// The engine states an unknown number as null (finiteOrNull) and never as NaN or ±Infinity. A non-finite number in a
// result therefore means the samples themselves were out of bounds: captures stored before the importer checked
// values (±9.9e37) and times (±1e12 s) can still hold them. PostgreSQL's jsonb cannot hold NaN or Infinity, and
// JSON.stringify would silently turn them into null, so such a result is refused instead of stored (issue 12 review).

/** Where `value` holds numbers that are not finite, as paths like `channels[0].levels.high = Infinity`; at most `limit`. */
export function nonFinitePaths(value: unknown, limit = 5): string[] {
  const found: string[] = [];
  const walk = (v: unknown, path: string): void => {
    if (found.length >= limit) return;
    if (typeof v === 'number') {
      if (!Number.isFinite(v)) found.push(`${path || '(the result)'} = ${v}`);
    } else if (Array.isArray(v) || ArrayBuffer.isView(v)) {
      const items = v as ArrayLike<unknown>;
      for (let i = 0; i < items.length && found.length < limit; i++) walk(items[i], `${path}[${i}]`);
    } else if (v !== null && typeof v === 'object') {
      for (const [key, item] of Object.entries(v)) walk(item, path ? `${path}.${key}` : key);
    }
  };
  walk(value, '');
  return found;
}

/** The message a version refused for non-finite numbers carries (shown on the shot page and in the API). */
export function nonFiniteResultMessage(paths: string[]): string {
  return (
    `The analysis gave numbers that are not finite (${paths.join('; ')}), so no result was stored for this version. ` +
    "The capture's samples or times are beyond what a scope records (values past ±9.9e37, times past ±1e12 s); it was " +
    'probably stored before the importer checked them. Upload the file again, so it is checked, or correct it.'
  );
}
