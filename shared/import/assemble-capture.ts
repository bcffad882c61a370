import type { ChannelData, ImportedCapture, TimeBase, TimeBaseOrigin } from '../contracts/capture.ts';
import type { CapturePlan } from './detect-capture-plan.ts';
import { ImportError } from './import-error.ts';
import { sampleIntervalOutOfRange, timeOutOfRange } from './value-limits.ts';

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
 * Columns the plan read only for the time base (a repeated time column, printed times too coarse to use) are
 * checked here and left out of the channels.
 */
export function assembleCapture(plan: CapturePlan, body: CaptureBody, source: Record<string, unknown>): ImportedCapture {
  const { length } = body;
  const warnings = [...plan.warnings, ...(body.warnings ?? [])];
  if (length < 2) {
    throw new ImportError('the file holds only one row of samples; at least two are needed for a time base', plan.dataStartLine);
  }
  if (plan.recordLength !== null && plan.recordLength !== length) {
    warnings.push(`the metadata gives a record length of ${plan.recordLength}, but the file holds ${length} samples`);
  }
  let time = body.time;
  let timeOrigin: TimeBaseOrigin = plan.timeOrigin;
  for (const check of plan.timeChecks) {
    const printed = body.values[check.channel];
    if (check.rebuild) {
      time = rebuildTimeBase(printed, length, time, check.column);
    } else {
      checkSameTimes(printed, length, time, plan, check.column);
    }
  }
  checkTimeBaseInRange(time, length, plan);
  if (time.kind === 'explicit' && timeOrigin.how === 'time-column') timeOrigin = { ...timeOrigin, source: `${timeOrigin.source} (unevenly spaced: the file's own times are kept)` };
  const dataChannels = plan.channels.slice(0, plan.channels.length - plan.timeChecks.length);
  const channels: ChannelData[] = dataChannels.map((c, k) => {
    const all = body.values[k];
    const values = plan.precision === 'float32'
      ? Float32Array.from(all.subarray(0, length))
      : all.length === length ? all : all.slice(0, length);
    const invalidCount = body.invalidCounts[k];
    if (invalidCount > 0) {
      warnings.push(`${invalidCount} invalid or empty sample${invalidCount > 1 ? 's' : ''} (empty cells, NaN, overrange or clip marks, values at or beyond ±9.9e37) in ${c.name}; kept as NaN gaps`);
    }
    return { name: c.name, unit: c.unit, sourceUnit: c.sourceUnit, values, invalidCount };
  });
  return {
    channels,
    time,
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
      // Stored with the capture's layout, so the shot page and the analysis can say how the time base was found.
      timeOrigin,
      valueKind: plan.valueKind,
      ...body.layout,
    },
    warnings,
    timeOrigin,
    valueKind: plan.valueKind,
  };
}

/**
 * The time base as read (from a time column, a rebuilt grid or the metadata) stays within value-limits.ts: every
 * instant within ±1e12 s and a step of at least 1 fs, so speeds and their uncertainties neither overflow nor
 * underflow. Rows are checked as they are read; this catches a grid whose end runs out of range, and a step too fine.
 */
function checkTimeBaseInRange(time: TimeBase, length: number, plan: CapturePlan): void {
  const first = timeAt(time, 0);
  const last = timeAt(time, length - 1);
  const step = time.kind === 'uniform' ? time.dt : (last - first) / (length - 1);
  const firstOut = timeOutOfRange(first);
  const lastOut = timeOutOfRange(last);
  const reason = firstOut !== null ? `at sample 1, ${firstOut}`
    : lastOut !== null ? `at sample ${length.toLocaleString('en')}, ${lastOut}`
    : sampleIntervalOutOfRange(step);
  if (reason !== null) throw new ImportError(reason, plan.dataStartLine);
}

const timeAt = (time: TimeBase, i: number) => (time.kind === 'uniform' ? time.t0 + i * time.dt : time.t[i]);

/**
 * A second time column (channel blocks side by side, each with its own time) must give the same instants as the
 * first; otherwise the blocks are not one record and the file is refused rather than read on one time base.
 */
function checkSameTimes(printed: Float64Array, length: number, time: TimeBase, plan: CapturePlan, column: number): void {
  const step = time.kind === 'uniform' ? time.dt : (time.t[length - 1] - time.t[0]) / (length - 1);
  const tolerance = (time.kind === 'uniform' ? time.jitter : 0) + plan.uniformTolerance * step;
  for (let i = 0; i < length; i++) {
    if (!(Math.abs(printed[i] - timeAt(time, i)) <= tolerance)) {
      throw new ImportError(`column ${column + 1} is a second time column, but at sample ${(i + 1).toLocaleString('en')} it says ${printed[i]} s where the first time column says ${timeAt(time, i)} s; the channel blocks are not on one time base: export them as separate files`);
    }
  }
}

/**
 * Rebuilds a uniform grid from the stated interval when the printed times are too coarse for their offset: the
 * start is the least-squares offset of the printed times from i·dt (their rounding averages out), and every
 * printed time must lie within its own print resolution of the grid, or the stated interval is not the file's.
 */
function rebuildTimeBase(printed: Float64Array, length: number, time: TimeBase, column: number): TimeBase {
  if (time.kind !== 'uniform') throw new Error('a rebuilt time base starts from the stated interval');
  const { dt } = time;
  let sum = 0;
  // The coarsest print step: the largest jump between consecutive printed times (their resolution varies with
  // the magnitude printed, finest near zero).
  let coarsest = 0;
  for (let i = 0; i < length; i++) {
    if (Number.isNaN(printed[i])) throw new ImportError(`the time at sample ${(i + 1).toLocaleString('en')} is not a number; every row needs a valid time`);
    sum += printed[i] - i * dt;
    if (i > 0) {
      const d = printed[i] - printed[i - 1];
      if (d < 0) throw new ImportError(`the printed time at sample ${(i + 1).toLocaleString('en')} is earlier than the one before it (times must not go back)`);
      if (d > coarsest) coarsest = d;
    }
  }
  const t0 = sum / length;
  let worst = 0;
  let at = 0;
  for (let i = 0; i < length; i++) {
    const d = Math.abs(printed[i] - (t0 + i * dt));
    if (d > worst) { worst = d; at = i; }
  }
  // Printed times are rounded to their resolution: each lies within one print step (plus one interval for where
  // the rounding boundary falls) of the true grid. A wrong interval drifts away linearly and is caught.
  const allowed = coarsest + dt;
  if (worst > allowed) {
    throw new ImportError(`the printed times of column ${column + 1} do not follow the stated sample interval ${dt} s: at sample ${(at + 1).toLocaleString('en')} the file says ${printed[at]} s, the interval gives ${t0 + at * dt} s; check the interval (the "Fix how it is read" form, or --dt)`);
  }
  return { kind: 'uniform', t0, dt, jitter: worst };
}
