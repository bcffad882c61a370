import type { TimeBase } from '../contracts/capture.ts';
import { findTransitions, type Transition } from './find-transitions.ts';
import type { Polarity, PulseResult, TransitionResult } from './types.ts';

export interface FindPulsesOptions {
  time: TimeBase;
  /** Crossing level and hysteresis band, V. */
  crossLevel: number;
  lowArm: number;
  highArm: number;
  /** IEEE 181 state levels, V (for the 10–90 % durations). */
  low: number;
  high: number;
  polarity: Polarity;
  /** Noise standard deviation at the crossing, V. */
  noise: number;
}

export interface FoundPulses {
  transitions: TransitionResult[];
  pulses: PulseResult[];
  /** The record starts inside a pulse (its entry was not recorded). */
  openAtStart: boolean;
  /** The record ends inside a pulse (its exit was not recorded). */
  openAtEnd: boolean;
}

function describe(t: Transition, noise: number): TransitionResult {
  const h = t.interval;
  const duration = Number.isFinite(t.duration) && t.duration > 0 ? t.duration : null;
  const alpha = t.fraction;
  return {
    direction: t.direction,
    time: t.time,
    duration,
    slope: t.slope,
    // Timing jitter from additive noise, σ_t = σ_v/|dV/dt| (Knoll, Radiation Detection and Measurement, ch. 17),
    // with both interpolated samples noisy: ×√((1−α)² + α²).
    jitter: Math.abs(t.slope) > 0 ? (noise / Math.abs(t.slope)) * Math.sqrt((1 - alpha) ** 2 + alpha ** 2) : h / Math.sqrt(12),
    // Linear interpolation error bound h²/8·|f''|/|f'| (the error term of linear interpolation, e.g. Burden & Faires, Numerical Analysis) for a
    // first-order edge, f''/f' = 1/τ with τ = duration/ln 9: h/2·(0.55·h/duration). An edge faster than the
    // samples is only known to within the sample interval: h/2.
    interpolationHalfWidth: duration === null ? h / 2 : (h / 2) * Math.min(1, (0.55 * h) / duration),
  };
}

/**
 * Pulses of one gate channel: transitions by the IEEE 181 hysteresis rule, paired into "beam blocked" →
 * "beam clear" with the polarity; pulse duration is the time between the two mesial instants (IEEE Std
 * 181-2011). A pulse open at either end of the record is not returned (its width is unknown).
 */
export function findPulses(values: ArrayLike<number>, options: FindPulsesOptions): FoundPulses {
  const { time, crossLevel, lowArm, highArm, low, high, polarity, noise } = options;
  const raw = findTransitions(values, time, { crossLevel, lowArm, highArm, low, high });
  const transitions = raw.map((t) => describe(t, noise));
  const entryDirection = polarity === 'falling' ? 'falling' : 'rising';
  const pulses: PulseResult[] = [];
  let openAtStart = false;
  let openAtEnd = false;
  let i = 0;
  if (transitions.length > 0 && transitions[0].direction !== entryDirection) {
    openAtStart = true;
    i = 1;
  }
  for (; i < transitions.length; i += 2) {
    const entry = transitions[i];
    const exit = transitions[i + 1];
    if (exit === undefined) {
      openAtEnd = true;
      break;
    }
    pulses.push({ start: entry.time, end: exit.time, width: exit.time - entry.time, entry, exit });
  }
  return { transitions, pulses, openAtStart, openAtEnd };
}
