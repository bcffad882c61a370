import type { ImportedCapture, TimeBase } from '../../shared/contracts/capture.ts';
import { assembleCapture } from '../../shared/import/assemble-capture.ts';
import type { CapturePlan } from '../../shared/import/detect-capture-plan.ts';
import { fitTimeBase } from '../../shared/import/fit-time-base.ts';
import { ImportError } from '../../shared/import/import-error.ts';
import { readSampleField } from '../../shared/import/read-sample-field.ts';
import type { ScanOutput } from '../../shared/import/scan-numeric-rows.ts';
import { splitFields } from '../../shared/import/split-fields.ts';
import { splitLines } from '../../shared/import/split-lines.ts';

export interface FinishCaptureInput {
  plan: CapturePlan;
  out: ScanOutput;
  rows: number;
  /** Text after the last data row when the scan stopped at a footer; null when the data ran to the end. */
  footerText: string | null;
  source: Record<string, unknown>;
  /** The time base when it was worked out while scanning (TimeGridHull) instead of from `out.times`. */
  time?: TimeBase;
}

/**
 * Ends a fast-path read: reads a footer into the metadata, decides the time base (uniform with its jitter, or the
 * file's own times), trims the arrays to the rows read and hands everything to assembleCapture, so the disk
 * reader returns exactly what parseScopeCsv would.
 */
export function finishCapture(input: FinishCaptureInput): ImportedCapture {
  const { plan, out, rows, footerText, source } = input;
  const warnings: string[] = [];
  let footerLines = plan.footerLines;
  const metadata = { ...plan.metadata };
  // A plan made from the whole file has read the footer already; one made from the head has not.
  if (footerText !== null && plan.dataEndLine === null) {
    for (const line of splitLines(footerText)) {
      const fields = splitFields(line, plan.delimiter).map((f) => f.trim()).filter((f) => f !== '');
      if (fields.length === 0) continue;
      footerLines++;
      const key = fields.length >= 2 ? fields[0] : 'footer';
      const value = fields.length >= 2 ? fields.slice(1).join(', ') : fields[0];
      metadata[key] = metadata[key] === undefined ? value : `${metadata[key]}; ${value}`;
    }
    if (footerLines > 0) warnings.push(`${footerLines} footer line${footerLines > 1 ? 's' : ''} after the data ${footerLines > 1 ? 'were' : 'was'} read as metadata`);
  }
  if (rows < 2) throw new ImportError('the file holds only one row of samples; at least two are needed for a time base', plan.dataStartLine);
  let time: TimeBase;
  if (input.time !== undefined) {
    time = input.time;
  } else if (out.times !== null) {
    const fitted = fitTimeBase(out.times, rows, { tolerance: plan.uniformTolerance });
    time = fitted.time;
    if (fitted.warning !== null) warnings.push(fitted.warning);
  } else {
    time = { kind: 'uniform', t0: plan.t0 as number, dt: plan.dt as number, jitter: 0 };
  }
  const values = out.values.map((v) => (v.length === rows ? v : v.subarray(0, rows)));
  return assembleCapture({ ...plan, metadata, footerLines }, { length: rows, values, invalidCounts: out.invalidCounts, time, warnings }, source);
}

/** True when no line of `text` is a data row of the plan: then the text after the data is a footer. */
export function isFooterText(plan: CapturePlan, text: string): boolean {
  for (const line of splitLines(text)) {
    if (line.trim() === '') continue;
    const fields = splitFields(line, plan.delimiter);
    // An empty field is a gap inside the data, but a line with no number in any channel is not a data row.
    const allNumbers = plan.channels.every((c) => readSampleField(fields[c.column] ?? '', plan.fieldOptions) !== undefined)
      && plan.channels.some((c) => (fields[c.column] ?? '').trim() !== '');
    if (allNumbers) return false;
  }
  return true;
}
