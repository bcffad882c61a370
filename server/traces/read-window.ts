import { planWindow } from '../../shared/traces/plan-window.ts';
import { reduceExplicitWindow } from '../../shared/traces/reduce-explicit-window.ts';
import { reduceWindow } from '../../shared/traces/reduce-window.ts';
import type { BlobStore } from '../storage/blob-store.ts';
import { float32FromBytes, float64FromBytes, type ChannelFiles } from './channel-files.ts';

/** Min/max columns: column j starts at t0 + j·dt and lasts dt; null marks a column with no valid sample (a gap). */
export interface ColumnsWindow {
  raw: false;
  t0: number;
  dt: number;
  min: (number | null)[];
  max: (number | null)[];
}

/** Full zoom: every sample with from ≤ t ≤ to; null marks an invalid (NaN) sample. */
export interface RawWindow {
  raw: true;
  t: number[];
  v: (number | null)[];
}

export type TraceWindow = ColumnsWindow | RawWindow;

const nullIfNaN = (x: number) => (x === x ? x : null);

/** First and last sample time of the record, s; null for an empty record. */
export function recordExtent(files: ChannelFiles): { first: number; last: number } | null {
  if (files.length === 0) return null;
  if (files.time.kind === 'uniform') return { first: files.time.t0, last: files.time.t0 + (files.length - 1) * files.time.dt };
  return { first: files.time.first!, last: files.time.last! };
}

/**
 * The window [from, to] (s) of one channel as at most `points` (min, max) columns from the pyramid level that
 * fits, or as raw samples when the window holds at most `points` of them. Only the byte ranges the plan names are
 * read (at most factor·points pyramid pairs), so the time does not grow with the record length. Explicit time
 * bases find the window by binary search in the stored time column; above `points` samples they are reduced
 * per time column by visiting the samples in the window.
 */
export async function readWindow(
  store: BlobStore,
  files: ChannelFiles,
  channelIndex: number,
  from: number,
  to: number,
  points: number,
): Promise<TraceWindow> {
  const channel = files.channels[channelIndex];
  if (!channel) throw new RangeError(`channel ${channelIndex} does not exist (the capture has ${files.channels.length})`);
  if (files.time.kind === 'uniform') {
    const { t0, dt } = files.time;
    const plan = planWindow({ length: files.length, t0, dt, from, to, points, factor: channel.factor, levels: channel.levels.length });
    if (plan.kind === 'raw') {
      const n = plan.end - plan.first;
      const values = n ? float32FromBytes(await store.readRange(channel.samplesKey, plan.first * 4, n * 4)) : new Float32Array(0);
      const t = new Array<number>(n);
      const v = new Array<number | null>(n);
      for (let i = 0; i < n; i++) {
        t[i] = t0 + (plan.first + i) * dt;
        v[i] = nullIfNaN(values[i]);
      }
      return { raw: true, t, v };
    }
    const entries = plan.level === 0
      ? float32FromBytes(await store.readRange(channel.samplesKey, plan.first * 4, (plan.end - plan.first) * 4))
      : float32FromBytes(await store.readRange(channel.levels[plan.level - 1].key, plan.first * 8, (plan.end - plan.first) * 8));
    const { min, max } = reduceWindow(entries, plan);
    return { raw: false, t0: plan.t0, dt: plan.dt, min: Array.from(min, nullIfNaN), max: Array.from(max, nullIfNaN) };
  }

  const timeKey = files.time.key;
  // Binary search in the stored time column: about log2(n) reads of 8 bytes each.
  const timeAt = async (i: number) => float64FromBytes(await store.readRange(timeKey, i * 8, 8))[0];
  const lowerBound = async (accept: (t: number) => boolean) => {
    let lo = 0;
    let hi = files.length;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (accept(await timeAt(mid))) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  if (!Number.isFinite(from) || !Number.isFinite(to)) throw new RangeError('from and to must be finite numbers of seconds');
  if (from > to) throw new RangeError('from must not be later than to');
  const first = await lowerBound((t) => t < from);
  const end = Math.max(first, await lowerBound((t) => t <= to));
  const n = end - first;
  if (n === 0) return { raw: true, t: [], v: [] };
  const [timeBytes, valueBytes] = await Promise.all([
    store.readRange(timeKey, first * 8, n * 8),
    store.readRange(channel.samplesKey, first * 4, n * 4),
  ]);
  const times = float64FromBytes(timeBytes);
  const values = float32FromBytes(valueBytes);
  if (n <= points) return { raw: true, t: Array.from(times), v: Array.from(values, nullIfNaN) };
  const { t0, dt, min, max } = reduceExplicitWindow(times, values, from, to, points);
  return { raw: false, t0, dt, min: Array.from(min, nullIfNaN), max: Array.from(max, nullIfNaN) };
}
