import { roundToUncertainty } from '../../../shared/units/format-measurement.ts';

/** A number already written as its decimal text (trailing zeros kept: "287.30" says the digit is known to be 0). */
export interface CsvDecimal { decimal: string }

/** A cell of an export: numbers stay numbers, text is text, null is an empty cell. */
export type CsvValue = string | number | CsvDecimal | null | undefined;

const DECIMAL = /^-?\d+(\.\d+)?$/;

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
  if (typeof value === 'object') {
    if (!DECIMAL.test(value.decimal)) throw new RangeError(`not a plain decimal number: "${value.decimal}"`);
    return value.decimal;
  }
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

/** How many significant digits a number without an uncertainty keeps in a rounded export (common practice: more than
 * any logged condition or instrument reading carries, few enough to read). */
export const PLAIN_SIGNIFICANT = 6;

/**
 * A value and its uncertainty as written in a rounded CSV: the uncertainty to two significant digits and the value to
 * the same decimal place (GUM, JCGM 100:2008 §7.2.6: "at most two significant digits"; the value "rounded to be
 * consistent with" it). 287.3456 ± 1.5678 → 287.3 and 1.6; 412.3712938 ± 0.4213 → 412.37 and 0.42. Without a usable
 * uncertainty the value keeps PLAIN_SIGNIFICANT digits and the uncertainty cell stays empty.
 */
export function roundedPair(value: number | null | undefined, uncertainty: number | null | undefined): [CsvValue, CsvValue] {
  if (value == null || !Number.isFinite(value)) return [null, uncertainty == null || !Number.isFinite(uncertainty) ? null : plainNumber(uncertainty)];
  if (uncertainty == null || !Number.isFinite(uncertainty) || uncertainty <= 0) return [plainNumber(value), uncertainty === 0 ? 0 : null];
  const r = roundToUncertainty(value, uncertainty);
  // roundToUncertainty writes the typographic minus (U+2212) for people; a CSV number needs the ASCII one.
  const ascii = (t: string) => t.replace('\u2212', '-');
  return [{ decimal: ascii(r.value) }, { decimal: ascii(r.uncertainty!) }];
}

/** A number with no uncertainty, kept to PLAIN_SIGNIFICANT significant digits (2026.5 → 2026.5, 0.000123456789 → 0.000123457). */
export const plainNumber = (x: number | null | undefined): number | null =>
  x == null || !Number.isFinite(x) ? null : Number(x.toPrecision(PLAIN_SIGNIFICANT));
