import type { ChannelData, ImportedCapture, TimeBase } from '../contracts/capture.ts';
import type { CapturePlan } from './detect-capture-plan.ts';
import { ImportError } from './import-error.ts';

export interface CaptureBody {
  length: number;
  /** One array per planned channel, already in SI; may be longer than `length` (the rest is ignored). */
  values: Float64Array[];
  invalidCounts: number[];
  time: TimeBase;
  /** Extra facts about how the body was read, merged into `layout`. */
  layout?: Record<string, unknown>;
  warnings?: string[];
}

/**
 * Puts a plan and the samples read by either path (pure text or disk fast path) into the ImportedCapture
 * contract, with the warnings a user needs: invalid samples per channel, a record length that disagrees.
 */
export function assembleCapture(plan: CapturePlan, body: CaptureBody, source: Record<string, unknown>): ImportedCapture {
  const { length } = body;
  const warnings = [...plan.warnings, ...(body.warnings ?? [])];
  if (plan.recordLength !== null && plan.recordLength !== length) {
    warnings.push(`the metadata gives a record length of ${plan.recordLength}, but the file holds ${length} samples`);
  }
  const channels: ChannelData[] = plan.channels.map((c, k) => {
    const all = body.values[k];
    const values = plan.precision === 'float32'
      ? Float32Array.from(all.subarray(0, length))
      : all.length === length ? all : all.slice(0, length);
    const invalidCount = body.invalidCounts[k];
    if (invalidCount > 0) {
      warnings.push(`${invalidCount} invalid sample${invalidCount > 1 ? 's' : ''} (NaN, overrange or clip marks) in ${c.name}; kept as NaN`);
    }
    return { name: c.name, unit: c.unit, sourceUnit: c.sourceUnit, values, invalidCount };
  });
  if (length < 2) {
    throw new ImportError('the file holds only one row of samples; at least two are needed for a time base', plan.dataStartLine);
  }
  return {
    channels,
    time: body.time,
    length,
    metadata: plan.metadata,
    layout: {
      ...source,
      delimiter: plan.delimiter === '\t' ? 'tab' : plan.delimiter,
      decimalComma: plan.decimalComma,
      preambleLines: plan.preambleLines,
      headerRows: plan.headerRows,
      dataStartLine: plan.dataStartLine,
      footerLines: plan.footerLines,
      columns: plan.columnRoles,
      timeMode: plan.timeMode,
      timeColumn: plan.timeColumn,
      timeSourceUnit: plan.timeSourceUnit,
      indexColumn: plan.indexColumn,
      timeSource: plan.timeSource,
      precision: plan.precision,
      ...body.layout,
    },
    warnings,
  };
}
