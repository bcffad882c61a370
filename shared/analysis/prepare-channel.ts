import type { AnalysisOptions } from '../contracts/analysis.ts';
import type { TimeBase } from '../contracts/capture.ts';
import { findPulses, type FoundPulses } from './find-pulses.ts';
import { measureChannel, type ChannelMeasurement } from './measure-channel.ts';

/**
 * One channel's levels, noise and polarity, and its pulses at the threshold: the part of the analysis that needs
 * only that channel's samples (each pass over a deep record's channel is most of the analysis), for another thread
 * to do. The pulses are then found before the reference step is known; analyzeShot uses them only if the channel is
 * not missed (preparing in its own thread, it looks for them only then).
 */
export interface PreparedChannel {
  measured: ChannelMeasurement | null;
  /** Why the channel could not be measured (it becomes the channel's warning), or null. */
  error: string | null;
  /** The pulses (pulsesAt), null when not looked for (`withPulses` false) or when the channel has none to look for. */
  found: FoundPulses | null;
}

/** Prepares one channel's trace (smoothed already when smoothing is asked for) with parsed options. */
export function prepareChannel(trace: ArrayLike<number>, time: TimeBase, opts: AnalysisOptions, withPulses = true): PreparedChannel {
  let m: ChannelMeasurement;
  try {
    m = measureChannel(trace, { bins: opts.levels.bins, method: opts.levels.method, trimFraction: opts.levels.trimFraction, polarity: opts.polarity });
  } catch (error) {
    return { measured: null, error: (error as Error).message, found: null };
  }
  return { measured: m, error: null, found: withPulses ? pulsesAt(trace, time, m, opts) : null };
}

/** A measured channel's pulses at its threshold; null for a flat channel (one level: no transitions, missed
 * whatever its threshold) or hysteresis arms that do not enclose the threshold. */
export function pulsesAt(trace: ArrayLike<number>, time: TimeBase, m: ChannelMeasurement, opts: AnalysisOptions): FoundPulses | null {
  const { level, lowArm, highArm } = thresholdOf(m, opts);
  return m.high > m.low && lowArm < level && level < highArm
    ? findPulses(trace, { time, crossLevel: level, lowArm, highArm, low: m.low, high: m.high, polarity: m.polarity, noise: m.noise })
    : null;
}

/**
 * Whether a capture's channels are worth preparing in two threads before analyzeShot (the analyze CLI, the API's
 * upload reader): two or more of them, no smoothing (analyzeShot would prepare the smoothed traces, not these) and an
 * even time base (uneven times would have to be copied to the other thread). Whether the samples are in shared memory
 * is the caller's to check.
 */
export function preparesApart(channels: number, time: TimeBase, opts: AnalysisOptions): boolean {
  return channels >= 2 && opts.smoothing === null && time.kind === 'uniform';
}

/** Channels whose samples are views of shared memory, for another thread to prepare (see ScanThread). */
export interface PrepareChannelsRequest {
  channels: { buffer: SharedArrayBuffer; byteOffset: number; length: number }[];
  time: TimeBase;
  opts: AnalysisOptions;
}

export type PrepareChannelsReply = { prepared: PreparedChannel[]; failure: null } | { prepared: null; failure: string };

export function prepareChannels(request: PrepareChannelsRequest): PreparedChannel[] {
  return request.channels.map((c) => prepareChannel(new Float64Array(c.buffer, c.byteOffset, c.length), request.time, request.opts));
}

/** The threshold level and its hysteresis arms for a measured channel. */
export function thresholdOf(m: ChannelMeasurement, opts: AnalysisOptions): { level: number; lowArm: number; highArm: number } {
  const step = m.blockedLevel - m.clearLevel;
  const t = opts.threshold;
  const level = t.unit === 'percent' ? m.clearLevel + (t.level / 100) * step : t.level;
  const armA = t.unit === 'percent' ? m.clearLevel + ((t.level - t.hysteresis) / 100) * step : t.level - t.hysteresis;
  const armB = t.unit === 'percent' ? m.clearLevel + ((t.level + t.hysteresis) / 100) * step : t.level + t.hysteresis;
  return { level, lowArm: Math.min(armA, armB), highArm: Math.max(armA, armB) };
}
