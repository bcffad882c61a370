import type { TimeBase } from '../contracts/capture.ts';
import { sampleTime } from './sample-time.ts';

/** A crossing of a level, linearly interpolated between the two finite samples around it. */
export interface LevelCrossing {
  /** Instant, s. */
  time: number;
  /** Index of the finite sample before the crossing. */
  before: number;
  /** Index of the finite sample after it. */
  after: number;
  /** Interpolation fraction α in [0, 1] between `before` and `after`. */
  fraction: number;
  /** Time between the two samples, s. */
  interval: number;
}

export interface FindLevelCrossingOptions {
  /** First sample index that may take part. @default 0 */
  from?: number;
  /** Last sample index that may take part (inclusive). @default values.length − 1 */
  to?: number;
  /** Search from `to` down to `from` (the crossing nearest `to`) instead of upward. @default false */
  backward?: boolean;
}

/**
 * The crossing of `level` nearest to the search start, linearly interpolated as IEEE Std 181-2011
 * prescribes for the reference-level instant. NaN samples are stepped over, so a crossing may span a gap;
 * returns null when the level is not crossed in the range.
 */
export function findLevelCrossing(
  values: ArrayLike<number>,
  time: TimeBase,
  level: number,
  options: FindLevelCrossingOptions = {},
): LevelCrossing | null {
  const { from = 0, to = values.length - 1, backward = false } = options;
  const step = backward ? -1 : 1;
  let i = backward ? to : from;
  const end = backward ? from : to;
  let previous = -1;
  for (; backward ? i >= end : i <= end; i += step) {
    const v = values[i];
    if (v - v !== 0) continue;
    if (previous >= 0) {
      const a = backward ? i : previous;
      const b = backward ? previous : i;
      const va = values[a] - level;
      const vb = values[b] - level;
      if ((va <= 0 && vb > 0) || (va >= 0 && vb < 0)) {
        const fraction = va === vb ? 0 : va / (va - vb);
        const ta = sampleTime(time, a);
        const tb = sampleTime(time, b);
        return { time: ta + fraction * (tb - ta), before: a, after: b, fraction, interval: tb - ta };
      }
    }
    previous = i;
  }
  return null;
}
