export interface ExplicitWindowColumns {
  /** Start of column 0 (the window start), s. */
  t0: number;
  /** Column width, s. */
  dt: number;
  /** Smallest sample per column; NaN where a column has no finite sample. */
  min: Float64Array;
  /** Largest sample per column; NaN where a column has no finite sample. */
  max: Float64Array;
}

/**
 * Min/max per time column for samples on an explicit (uneven) time base: the window [from, to] is cut into
 * `points` columns of equal duration and every sample goes to the column its time falls in. Unlike the pyramid
 * path this visits every sample in the window (O(samples)); explicit time bases are kept only for files whose
 * time column is too uneven to be a grid, which in practice are short records.
 */
export function reduceExplicitWindow(
  times: ArrayLike<number>,
  values: ArrayLike<number>,
  from: number,
  to: number,
  points: number,
): ExplicitWindowColumns {
  if (times.length !== values.length) throw new RangeError('times and values must have the same length');
  if (!Number.isInteger(points) || points < 1) throw new RangeError('points must be an integer ≥ 1');
  if (!Number.isFinite(from) || !Number.isFinite(to) || from > to) {
    throw new RangeError('from and to must be finite numbers of seconds with from ≤ to');
  }
  const dt = (to - from) / points;
  const min = new Float64Array(points).fill(NaN);
  const max = new Float64Array(points).fill(NaN);
  for (let i = 0; i < times.length; i++) {
    const t = times[i];
    const v = values[i];
    if (v !== v || t < from || t > to) continue;
    const j = dt > 0 ? Math.min(points - 1, Math.floor((t - from) / dt)) : 0;
    if (!(min[j] <= v)) min[j] = v;
    if (!(max[j] >= v)) max[j] = v;
  }
  return { t0: from, dt, min, max };
}
