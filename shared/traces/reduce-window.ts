import type { ColumnsWindowPlan } from './plan-window.ts';

export interface ReducedWindow {
  /** Smallest sample of each column; NaN where the column holds only NaN samples (a gap). */
  min: Float64Array;
  /** Largest sample of each column; NaN for a gap. */
  max: Float64Array;
}

/**
 * Merges the entries a plan asked for into its columns: min of the mins and max of the maxes of each run of
 * `bucketsPerColumn` entries, NaN entries ignored. `entries` holds entries [plan.first, plan.end) of the plan's
 * level: one value per sample on level 0, interleaved (min, max) pairs above it.
 */
export function reduceWindow(entries: Float32Array | Float64Array, plan: ColumnsWindowPlan): ReducedWindow {
  const stride = plan.level === 0 ? 1 : 2;
  const count = plan.end - plan.first;
  if (entries.length !== count * stride) {
    throw new RangeError(`entries must hold ${count * stride} values for entries ${plan.first}..${plan.end - 1} of level ${plan.level}, got ${entries.length}`);
  }
  const { columns, bucketsPerColumn: m } = plan;
  const min = new Float64Array(columns);
  const max = new Float64Array(columns);
  for (let j = 0; j < columns; j++) {
    const start = j * m;
    const end = Math.min(count, start + m);
    let lo = Infinity;
    let hi = -Infinity;
    let seen = false;
    for (let e = start; e < end; e++) {
      const mn = entries[e * stride];
      if (mn !== mn) continue;
      seen = true;
      const mx = entries[e * stride + stride - 1];
      if (mn < lo) lo = mn;
      if (mx > hi) hi = mx;
    }
    min[j] = seen ? lo : NaN;
    max[j] = seen ? hi : NaN;
  }
  return { min, max };
}
