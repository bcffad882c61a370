import type { CaptureEncoding } from './decode-capture-bytes.ts';
import type { Delimiter } from './split-fields.ts';

/** Every choice the importer detects can be forced here; an option left out is detected from the file. */
export interface ParseScopeCsvOptions {
  /** Text encoding. @default detected (BOM, else valid UTF-8, else Latin-1) */
  encoding?: CaptureEncoding;
  /** Field delimiter. @default detected among tab, ";", "," and whitespace */
  delimiter?: Delimiter;
  /** Numbers are written with a decimal comma ("1,5"). @default detected (only with a delimiter other than ",") */
  decimalComma?: boolean;
  /** 1-based line of the first data row. @default detected (first run of rows of numbers) */
  dataStartLine?: number;
  /** Header rows right above the data: 0, 1 (names) or 2 (names, then units). @default detected */
  headerRows?: 0 | 1 | 2;
  /** 0-based column of the time, or null for none. @default detected from the header name/unit or the values */
  timeColumn?: number | null;
  /** 0-based column of a sample index, or null for none. @default detected from the header name or the values */
  indexColumn?: number | null;
  /** Unit of the time column or of `t0`/`dt` in the metadata when the file gives none ("s", "ms", "us", "ns"). @default "s" */
  timeUnit?: string;
  /** Time of the first sample in seconds, for files without a time column. @default from the metadata */
  t0?: number;
  /** Sample interval in seconds, for files without a time column. @default from the metadata */
  dt?: number;
  /** Channel names in column order. @default from the header, the metadata, else "CH1", "CH2", … */
  channelNames?: string[];
  /** Channel units as written ("mV"), in column order. @default from the header, the metadata, else none */
  channelUnits?: string[];
  /** Texts (any case) that mark an invalid sample. @default DEFAULT_TEXT_SENTINELS */
  textSentinels?: readonly string[];
  /** Numbers that mark an invalid sample. @default DEFAULT_NUMERIC_SENTINELS (SCPI NaN and ±infinity) */
  numericSentinels?: readonly number[];
  /** Sample array type. @default "float64" */
  precision?: 'float64' | 'float32';
  /** Largest deviation from an even grid, as a fraction of dt, that still counts as evenly spaced. @default 0.01 */
  uniformTolerance?: number;
  /** The time column is printed too coarsely (rows repeat times): rebuild the grid from the stated interval.
   * @default detected (repeated times in the first rows, or a re-read after a repeated time further down) */
  coarseTime?: boolean;
}
