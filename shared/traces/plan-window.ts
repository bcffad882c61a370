import { uniformSampleRange } from './uniform-sample-range.ts';

export interface PlanWindowOptions {
  /** Samples in the trace (required). */
  length: number;
  /** Time of sample 0, s (required). */
  t0: number;
  /** Sample interval, s (required). */
  dt: number;
  /** Window start, s (required). */
  from: number;
  /** Window end, s, inclusive (required). */
  to: number;
  /** Most (min, max) columns wanted, usually the plot's width in pixels (required, integer ≥ 2). */
  points: number;
  /** Block factor the pyramid was built with. @default 16 */
  factor?: number;
  /** Pyramid levels available above the raw samples (level k has blocks of factor^k samples). @default 0 */
  levels?: number;
  /**
   * A level is fine enough when the window covers at most this many of its blocks per wanted column. With the
   * default equal to the factor, the chosen level covers the window with more than `points` blocks whenever a
   * finer level would have more than `factor·points`, so the answer has at least about points/2 columns, while
   * never more than factor·points blocks are read. @default factor
   */
  maxBucketsPerColumn?: number;
}

/** Full zoom: the window holds at most `points` samples; read samples [first, end) and return them as they are. */
export interface RawWindowPlan {
  kind: 'raw';
  first: number;
  end: number;
}

/**
 * Read entries [first, end) of `level` (level 0: samples, one value each; level k ≥ 1: (min, max) pairs) and merge
 * each run of `bucketsPerColumn` entries into one column. Columns sit on a grid anchored at sample 0, so panning
 * does not make the picture shimmer: column j covers samples [firstSample + j·samplesPerColumn, … + samplesPerColumn)
 * (the last one clipped at the end of the trace) and starts at t0 + j·dt. The first and last columns may reach
 * past the window's edges by less than one column.
 */
export interface ColumnsWindowPlan {
  kind: 'columns';
  level: number;
  blockSize: number;
  first: number;
  end: number;
  bucketsPerColumn: number;
  columns: number;
  firstSample: number;
  samplesPerColumn: number;
  /** Start of column 0, s. */
  t0: number;
  /** Column width, s. */
  dt: number;
}

export type WindowPlan = RawWindowPlan | ColumnsWindowPlan;

/**
 * Plans a window read on a uniform trace with a min/max pyramid (see buildMinMaxPyramid): which level, which
 * entries, how they merge into at most `points` columns. The entries read are bounded by
 * max(maxBucketsPerColumn·points, top level size) plus two columns, whatever the length of the record.
 */
export function planWindow(options: PlanWindowOptions): WindowPlan {
  const { length, t0, dt, from, to, points, factor = 16, levels = 0 } = options;
  const maxBucketsPerColumn = options.maxBucketsPerColumn ?? factor;
  if (!Number.isInteger(points) || points < 2) throw new RangeError('points must be an integer ≥ 2');
  if (!Number.isInteger(factor) || factor < 2) throw new RangeError('factor must be an integer ≥ 2');
  if (!Number.isInteger(levels) || levels < 0) throw new RangeError('levels must be an integer ≥ 0');
  if (!(maxBucketsPerColumn >= 1)) throw new RangeError('maxBucketsPerColumn must be ≥ 1');
  const { first, end } = uniformSampleRange(length, t0, dt, from, to);
  if (end - first <= points) return { kind: 'raw', first, end };

  const last = end - 1;
  let level = levels;
  let blockSize = factor ** levels;
  for (let k = 0, b = 1; k <= levels; k++, b *= factor) {
    if (Math.floor(last / b) - Math.floor(first / b) + 1 <= maxBucketsPerColumn * points) {
      level = k;
      blockSize = b;
      break;
    }
  }
  const firstBucket = Math.floor(first / blockSize);
  const lastBucket = Math.floor(last / blockSize);
  const levelLength = Math.ceil(length / blockSize);
  // Grid-anchored columns can straddle one more column than ceil(count/m); widen until the count fits.
  let m = Math.max(1, Math.ceil((lastBucket - firstBucket + 1) / points));
  while (Math.floor(lastBucket / m) - Math.floor(firstBucket / m) + 1 > points) m++;
  const firstColumn = Math.floor(firstBucket / m);
  const columns = Math.floor(lastBucket / m) - firstColumn + 1;
  const samplesPerColumn = m * blockSize;
  const firstSample = firstColumn * samplesPerColumn;
  return {
    kind: 'columns',
    level,
    blockSize,
    first: firstColumn * m,
    end: Math.min(levelLength, (firstColumn + columns) * m),
    bucketsPerColumn: m,
    columns,
    firstSample,
    samplesPerColumn,
    t0: t0 + firstSample * dt,
    dt: samplesPerColumn * dt,
  };
}
