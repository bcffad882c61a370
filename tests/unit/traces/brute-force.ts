// Brute-force references for the trace tests: every sample looked at, no pyramid, no index arithmetic beyond
// the definition t[i] = t0 + i·dt.

/** min/max of values[start..end) ignoring NaN; [NaN, NaN] when nothing finite is there. */
export function bruteMinMax(values: ArrayLike<number>, start: number, end: number): [number, number] {
  let lo = NaN;
  let hi = NaN;
  for (let i = Math.max(0, start); i < Math.min(values.length, end); i++) {
    const v = values[i];
    if (Number.isNaN(v)) continue;
    if (Number.isNaN(lo) || v < lo) lo = v;
    if (Number.isNaN(hi) || v > hi) hi = v;
  }
  return [lo, hi];
}

/** Indices i with from ≤ t0 + i·dt ≤ to, by looking at every sample. */
export function bruteUniformIndices(length: number, t0: number, dt: number, from: number, to: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < length; i++) {
    const t = t0 + i * dt;
    if (t >= from && t <= to) out.push(i);
  }
  return out;
}
