import type { SampleRange } from './uniform-sample-range.ts';

/**
 * The samples of an explicit (strictly increasing) time column that lie in the closed window [from, to], by two
 * binary searches: O(log n), so a window costs the same on a short and a deep record.
 */
export function explicitSampleRange(times: ArrayLike<number>, from: number, to: number): SampleRange {
  if (!Number.isFinite(from) || !Number.isFinite(to)) throw new RangeError('from and to must be finite numbers of seconds');
  if (from > to) throw new RangeError('from must not be later than to');
  const n = times.length;
  // First index with t ≥ from.
  let lo = 0;
  let hi = n;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (times[mid] < from) lo = mid + 1;
    else hi = mid;
  }
  const first = lo;
  // First index with t > to.
  hi = n;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (times[mid] <= to) lo = mid + 1;
    else hi = mid;
  }
  return { first, end: lo };
}
