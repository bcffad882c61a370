/** Half-open range of sample indices `[first, end)`; empty when `first === end`. */
export interface SampleRange {
  first: number;
  end: number;
}

/**
 * The samples of a uniform time base (t[i] = t0 + i·dt) that lie in the closed window [from, to]. The index is
 * estimated by division and then settled by comparing the exact sample times `t0 + i·dt` (the same expression
 * as shared/analysis/sample-time.ts), so a sample exactly on an edge is never lost to rounding.
 */
export function uniformSampleRange(length: number, t0: number, dt: number, from: number, to: number): SampleRange {
  if (!Number.isInteger(length) || length < 0) throw new RangeError('length must be an integer ≥ 0');
  if (!Number.isFinite(t0)) throw new RangeError('t0 must be a finite number of seconds');
  if (!(dt > 0) || !Number.isFinite(dt)) throw new RangeError('dt must be a finite number of seconds > 0');
  if (!Number.isFinite(from) || !Number.isFinite(to)) throw new RangeError('from and to must be finite numbers of seconds');
  if (from > to) throw new RangeError('from must not be later than to');

  let first = Math.min(length, Math.max(0, Math.ceil((from - t0) / dt)));
  // t0 + i·dt is non-decreasing in i (rounding is monotone), so a step or two settles each edge.
  while (first > 0 && t0 + (first - 1) * dt >= from) first--;
  while (first < length && t0 + first * dt < from) first++;
  let last = Math.min(length - 1, Math.max(-1, Math.floor((to - t0) / dt)));
  while (last < length - 1 && t0 + (last + 1) * dt <= to) last++;
  while (last >= 0 && t0 + last * dt > to) last--;
  return { first, end: Math.max(first, last + 1) };
}
