/** A cell of an export: numbers stay numbers, text is text, null is an empty cell. */
export type CsvValue = string | number | null | undefined;

/** Characters a spreadsheet reads as the start of a formula (OWASP "CSV Injection"), tab and carriage return included. */
const FORMULA_START = /^[=+\-@\t\r]/;

/**
 * One CSV cell. Text that begins like a formula gets a leading single quote, so a spreadsheet shows it instead of
 * running it (OWASP, "CSV Injection"). Numbers are written as numbers and never prefixed: a negative time such as
 * −0.000123 s stays numeric, and a number cannot carry a formula. Cells holding a quote, comma or line break are
 * quoted with inner quotes doubled (RFC 4180, section 2).
 */
export function csvCell(value: CsvValue): string {
  if (value == null) return '';
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) return '';
    return String(value);
  }
  const text = FORMULA_START.test(value) ? `'${value}` : value;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * A whole CSV document: header and rows, CRLF line ends (RFC 4180), with a UTF-8 byte-order mark so spreadsheet
 * programs read units such as °C and µm correctly (common practice).
 */
export function toCsv(header: string[], rows: CsvValue[][]): string {
  const lines = [header.map(csvCell).join(','), ...rows.map((r) => r.map(csvCell).join(','))];
  return `\uFEFF${lines.join('\r\n')}\r\n`;
}

/** A file-name-safe ASCII slug of a name ("Vacuum sweep, autumn 2026" → "vacuum-sweep-autumn-2026"). */
export function fileSlug(name: string): string {
  const slug = name.normalize('NFKD').replace(/[^\x20-\x7e]/g, '').toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '');
  return slug.slice(0, 80) || 'export';
}

/** Rounds to 12 significant digits: unit conversions (K → °C, Pa → kPa) leave no binary noise like 20.000000000000023. */
export const tidy = (x: number | null | undefined): number | null =>
  x == null || !Number.isFinite(x) ? null : Number(x.toPrecision(12));
