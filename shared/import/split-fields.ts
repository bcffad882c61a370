import { parse } from 'csv-parse/browser/esm/sync';

/** A field delimiter: one character, or "whitespace" for runs of spaces and tabs (fixed-width text exports). */
export type Delimiter = ',' | ';' | '\t' | 'whitespace';

/**
 * Splits one line into fields. Lines with a double quote go through csv-parse (RFC 4180 quoting, the browser
 * build so this stays pure); plain lines are split directly, which is what nearly every data row is.
 */
export function splitFields(line: string, delimiter: Delimiter): string[] {
  if (delimiter === 'whitespace') {
    const trimmed = line.trim();
    return trimmed === '' ? [] : trimmed.split(/[ \t]+/);
  }
  if (!line.includes('"')) return line.split(delimiter);
  try {
    const rows = parse(line, { delimiter, relax_quotes: true, relax_column_count: true, skip_empty_lines: false }) as string[][];
    return rows[0] ?? [];
  } catch {
    // An unbalanced quote: keep the raw text so the caller can name the line instead of failing here.
    return line.split(delimiter);
  }
}
