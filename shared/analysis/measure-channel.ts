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
  /**
   * Polarity, or "auto": the state the record starts and ends in is the clear one; when those differ or cannot be
   * told, the state the trace spends less time in is the blocked one. @default "auto"
   */
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

/** How many samples at each end of a record say which state it starts and ends in. */
const END_SAMPLES = { fraction: 0.01, min: 5, max: 1000 };

/**
 * The state (1 high, −1 low, 0 not clear) of the median of the first or the last few samples: near a level means
 * within a quarter of the step of it. The median ignores a spike; a record that starts on an edge gives 0.
 */
function endState(values: ArrayLike<number>, fromEnd: boolean, low: number, high: number): 1 | -1 | 0 {
  const n = values.length;
  const k = Math.min(n, Math.max(END_SAMPLES.min, Math.min(END_SAMPLES.max, Math.round(n * END_SAMPLES.fraction))));
  const part: number[] = [];
  for (let i = 0; i < k; i++) {
    const v = values[fromEnd ? n - 1 - i : i];
    if (Number.isFinite(v)) part.push(v);
  }
  if (part.length === 0 || !(high > low)) return 0;
  part.sort((a, b) => a - b);
  const median = part[part.length >> 1];
  const quarter = (high - low) / 4;
  return median >= high - quarter ? 1 : median <= low + quarter ? -1 : 0;
}

/**
 * State levels (IEEE Std 181-2011 histogram method; the mode refined by the mean of the samples in the state's
 * noise band), noise within each state and polarity of one channel.
 * Polarity "auto" (common practice, no published source): the scope is armed before the projectile arrives and
 * records it leaving, so a record that starts and ends in the same state starts and ends with the beam clear; this
 * holds for a slow projectile whose pulse fills most of the record. Otherwise (a record cut inside a pulse, a
 * noise-only trace) the more populated state is the clear one, as a record is usually set up around a short pulse.
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
  const resolved: Polarity = polarity !== 'auto' ? polarity : autoPolarity(values, low, high, noise.highCount, noise.lowCount);
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

function autoPolarity(values: ArrayLike<number>, low: number, high: number, highCount: number, lowCount: number): Polarity {
  const first = endState(values, false, low, high);
  if (first !== 0 && first === endState(values, true, low, high)) return first === 1 ? 'falling' : 'rising';
  return highCount >= lowCount ? 'falling' : 'rising';
}
