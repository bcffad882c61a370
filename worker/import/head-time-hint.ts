import type { CapturePlan } from '../../shared/import/detect-capture-plan.ts';
import { readSampleField } from '../../shared/import/read-sample-field.ts';
import { splitFields } from '../../shared/import/split-fields.ts';

/**
 * Time of the first data row and the interval to the next, read from the head's text, in seconds: the reference
 * grid for TimeGridHull. Null when the head has no time column or fewer than two readable rows.
 */
export function headTimeHint(plan: CapturePlan, lines: string[]): { t0: number; dtHint: number } | null {
  if (plan.timeColumn === null) return null;
  const times: number[] = [];
  for (let i = plan.dataStartLine - 1; i < lines.length && times.length < 2; i++) {
    if (lines[i].trim() === '') continue;
    const t = readSampleField(splitFields(lines[i], plan.delimiter)[plan.timeColumn] ?? '', plan.fieldOptions);
    if (t === undefined || Number.isNaN(t)) return null;
    times.push(t * plan.timeFactor);
  }
  if (times.length < 2 || !(times[1] > times[0])) return null;
  return { t0: times[0], dtHint: times[1] - times[0] };
}
