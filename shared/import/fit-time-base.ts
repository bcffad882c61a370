import type { TimeBase } from '../contracts/capture.ts';

export interface FitTimeBaseOptions {
  /** Largest deviation from the even grid, as a fraction of dt, that still counts as evenly spaced. @default 0.01 */
  tolerance?: number;
}

export interface FittedTimeBase {
  time: TimeBase;
  /** Set when the samples were not evenly spaced, for the capture's warnings. */
  warning: string | null;
}

/**
 * Decides whether strictly increasing times are evenly spaced. The grid runs through the first and last sample
 * (t0 = t[0], dt = (t[n−1] − t[0])/(n − 1)) and the jitter is the largest |t[i] − (t0 + i·dt)|; within
 * `tolerance`·dt the base is uniform (with that jitter reported), else the explicit times are kept.
 * The caller has checked n ≥ 2 and that the times increase.
 */
export function fitTimeBase(times: Float64Array, length: number, options: FitTimeBaseOptions = {}): FittedTimeBase {
  const { tolerance = 0.01 } = options;
  if (!(times instanceof Float64Array)) throw new TypeError('times must be a Float64Array');
  if (!Number.isInteger(length) || length < 2 || length > times.length) throw new RangeError('length must be an integer from 2 to times.length');
  const t0 = times[0];
  const dt = (times[length - 1] - t0) / (length - 1);
  let jitter = 0;
  for (let i = 0; i < length; i++) {
    const d = Math.abs(times[i] - (t0 + i * dt));
    if (d > jitter) jitter = d;
  }
  if (jitter <= tolerance * dt) return { time: { kind: 'uniform', t0, dt, jitter }, warning: null };
  const percent = ((100 * jitter) / dt).toPrecision(3);
  return {
    time: { kind: 'explicit', t: times.length === length ? times : times.slice(0, length) },
    warning: `the samples are not evenly spaced (largest deviation from an even grid ${jitter.toPrecision(3)} s, ${percent} % of the mean interval); the file's own times are kept`,
  };
}
