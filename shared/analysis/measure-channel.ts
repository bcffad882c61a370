import type { Polarity } from './types.ts';
import { stateLevels } from './state-levels.ts';
import { stateNoise } from './state-noise.ts';

export interface MeasureChannelOptions {
  /** Histogram bins for the state levels. @default 100 */
  bins?: number;
  /** IEEE 181 level estimator. @default "mode" */
  method?: 'mode' | 'mean';
  /** Largest fraction of isolated outlier samples trimmed at each end of the range. @default 0.01 */
  trimFraction?: number;
  /** Polarity, or "auto" to take the state the trace spends less time in as the blocked one. @default "auto" */
  polarity?: Polarity | 'auto';
}

export interface ChannelMeasurement {
  low: number;
  high: number;
  amplitude: number;
  lowSd: number;
  highSd: number;
  /** Noise for timing jitter: standard deviation in the clear state (or in the other when it has too few samples), V. */
  noise: number;
  /** Amplitude over the larger of `noise` and the successive-difference noise (Infinity for a noise-free record). */
  snr: number;
  polarity: Polarity;
  /** Level of the beam-clear state and of the beam-blocked state, V. */
  clearLevel: number;
  blockedLevel: number;
}

/**
 * State levels (IEEE Std 181-2011 histogram method; the mode refined by the mean of the samples in the state's
 * noise band), noise within each state and polarity of one channel.
 * A beam is clear for most of a record, so with polarity "auto" the more populated state is the clear one
 * (common practice: the record is set up around a short pulse).
 */
export function measureChannel(values: ArrayLike<number>, options: MeasureChannelOptions = {}): ChannelMeasurement {
  const { bins = 100, method = 'mode', trimFraction = 0.01, polarity = 'auto' } = options;
  const levels = stateLevels(values, { bins, method, trimFraction });
  const noise = stateNoise(values, levels.low, levels.high);
  // The mode is only known to a bin; the mean of the state's own samples pins it down (a level off by half a
  // bin, 0.5 % of the step, would move every crossing by 0.5 % of the edge's duration). A state that never
  // settles (a slow sensor's dip) has no flat part to average: there the mean wanders off and the mode stays.
  const binWidth = (levels.histogramMax - levels.histogramMin) / bins;
  const refine = (mode: number, mean: number): number => (method === 'mode' && Math.abs(mean - mode) <= binWidth ? mean : mode);
  const low = refine(levels.low, noise.lowLevel);
  const high = refine(levels.high, noise.highLevel);
  const amplitude = high - low;
  const lowSd = noise.lowSd;
  const highSd = noise.highSd;
  const resolved: Polarity = polarity !== 'auto' ? polarity : noise.highCount >= noise.lowCount ? 'falling' : 'rising';
  // The instrument's noise is read in the clear state: it is flat and holds most samples, whereas the blocked
  // state of a slow sensor is still settling and its spread is signal, not noise.
  const clearSd = resolved === 'falling' ? highSd : lowSd;
  const otherSd = resolved === 'falling' ? lowSd : highSd;
  const sd = Number.isFinite(clearSd) ? clearSd : Number.isFinite(otherSd) ? otherSd : 0;
  // Hum or a noise-only trace can look like two states with little spread in each (a sine's histogram is
  // bimodal); successive differences still see the white noise, so the step is judged against the larger.
  const clearDiffSd = resolved === 'falling' ? noise.highDiffSd : noise.lowDiffSd;
  const judged = Number.isFinite(clearDiffSd) ? Math.max(sd, clearDiffSd) : sd;
  const snr = judged > 0 ? amplitude / judged : amplitude > 0 ? Number.POSITIVE_INFINITY : 0;
  return {
    low,
    high,
    amplitude,
    lowSd,
    highSd,
    noise: sd,
    snr,
    polarity: resolved,
    clearLevel: resolved === 'falling' ? high : low,
    blockedLevel: resolved === 'falling' ? low : high,
  };
}
