import type { ChannelResult } from './types.ts';

export interface DipMark {
  /** Where the dip starts and ends, s. */
  start: number;
  end: number;
  /** Level of the dip's floor, V (idle level minus the depth, toward the blocked level). */
  level: number;
  /** "dip 0.700–0.835 ms · 1.75 V deep (38 % of the step)". */
  label: string;
}

/** Seconds as ms with three decimals, or as µs with one. */
function time(t: number, unit: 'µs' | 'ms'): string {
  return unit === 'µs' ? (t * 1e6).toFixed(1) : (t * 1e3).toFixed(3);
}

/** Volts, or millivolts under 1 V, to three significant digits. */
export function formatVolts(v: number): string {
  return Math.abs(v) < 1 ? `${Number((v * 1e3).toPrecision(3))} mV` : `${Number(v.toPrecision(3))} V`;
}

/**
 * What to draw for a missed gate's sub-threshold dip: its span, the level of its floor and a label with units.
 * Times in `timeUnit` (to match an axis), else in ms (µs for a dip within 0.1 ms of zero).
 * Null when the channel has no dip, or its result predates engine 1.4.0 (only an instant was stored then).
 */
export function describeDip(channel: Pick<ChannelResult, 'candidate' | 'polarity' | 'levels'>, timeUnit?: 'µs' | 'ms'): DipMark | null {
  const c = channel.candidate;
  if (!c || c.start === undefined || c.end === undefined || c.depth === undefined) return null;
  const idle = channel.polarity === 'falling' ? channel.levels.high : channel.levels.low;
  const level = channel.polarity === 'falling' ? idle - c.depth : idle + c.depth;
  const unit = timeUnit ?? (Math.max(Math.abs(c.start), Math.abs(c.end)) < 1e-4 ? 'µs' : 'ms');
  const span = `${time(c.start, unit)}–${time(c.end, unit)} ${unit}`;
  return { start: c.start, end: c.end, level, label: `dip ${span} · ${formatVolts(c.depth)} deep (${Math.round(100 * c.depthFraction)} % of the step)` };
}
