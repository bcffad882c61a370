import type { TimeBase } from '../contracts/capture.ts';

/** Instant of sample `index` (which may be fractional on a uniform base), s. */
export function sampleTime(time: TimeBase, index: number): number {
  if (time.kind === 'uniform') return time.t0 + index * time.dt;
  const i = Math.floor(index);
  const f = index - i;
  return f === 0 ? time.t[i] : time.t[i] + f * (time.t[i + 1] - time.t[i]);
}
