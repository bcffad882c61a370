import { MAX_SAMPLE_MAGNITUDE, timeOutOfRange } from './value-limits.ts';

/** Strict decimal number: optional sign, digits with an optional point, optional exponent. No hex, no "Infinity",
 * no trailing junk: parseFloat("12abc") is 12, which would turn a broken field into a silent wrong number. */
const NUMBER = /^[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?$/;

export interface ReadSampleFieldOptions {
  /** The file writes "1,5" for 1.5 (then `;` or tab delimits). @default false */
  decimalComma?: boolean;
  /** Lower-case trimmed texts that stand for an invalid sample. @default an empty set */
  textSentinels?: ReadonlySet<string>;
  /** Numbers that stand for an invalid sample (compared exactly). @default an empty set */
  numericSentinels?: ReadonlySet<number>;
}

/**
 * Reads one field of a data row. Returns the number; NaN when the field is a sentinel for an invalid sample
 * (never a number made up for it); undefined when the field is not a number at all (the caller reports the line).
 * The number is exactly `parseFloat` of the field, so every path of the importer agrees to the bit.
 */
export function readSampleField(field: string, options: ReadSampleFieldOptions = {}): number | undefined {
  const { decimalComma = false, textSentinels, numericSentinels } = options;
  let text = field.trim();
  if (decimalComma) text = text.replace(',', '.');
  if (NUMBER.test(text)) {
    const value = parseFloat(text);
    if (numericSentinels !== undefined && numericSentinels.has(value)) return NaN;
    // "1e999" parses to Infinity: out of range of a double, so as invalid as an overrange mark; so is anything at or
    // beyond SCPI's infinity mark (value-limits.ts), which no instrument reads and the arithmetic after cannot bear.
    return Math.abs(value) < MAX_SAMPLE_MAGNITUDE ? value : NaN;
  }
  if (textSentinels !== undefined && textSentinels.has(field.trim().toLowerCase())) return NaN;
  return undefined;
}

/**
 * What to say about a time field that read as no valid sample: a number too large to be a time (beyond the bounds of
 * value-limits.ts, or of a double) is named as such; anything else is not a number.
 */
export function invalidTimeMessage(field: string, timeFactor: number): string {
  const text = field.trim().replace(',', '.');
  const shown = text.length > 40 ? `${text.slice(0, 40)}…` : text;
  if (NUMBER.test(text)) {
    return timeOutOfRange(parseFloat(text) * timeFactor) ?? `the time is '${shown}', not a number; every row needs a valid time`;
  }
  return `the time is '${shown}', not a number; every row needs a valid time`;
}
