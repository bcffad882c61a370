import type { TimeBase } from '../contracts/capture.ts';
import { findLevelCrossing } from './find-level-crossing.ts';

export interface FindTransitionsOptions {
  /** Level whose crossing gives the transition instant (the mesial level by default), in the values' unit. */
  crossLevel: number;
  /** The trace is in the lower state at or below this level. */
  lowArm: number;
  /** The trace is in the upper state at or above this level. */
  highArm: number;
  /** Lower state level s₁, for the 10 % / 90 % reference levels. */
  low: number;
  /** Upper state level s₂. */
  high: number;
}

export interface Transition {
  direction: 'rising' | 'falling';
  /** Instant the trace crosses `crossLevel`, s. */
  time: number;
  /** Finite samples around that crossing and the interpolation fraction α between them. */
  before: number;
  after: number;
  fraction: number;
  /** Local sample interval at the crossing, s. */
  interval: number;
  /** Time between the 10 % and 90 % reference-level instants (rise or fall time), s; NaN if one is missing. */
  duration: number;
  /** Slope at the crossing, V/s: 80 % of the amplitude over `duration`, or the two samples' slope. */
  slope: number;
}

/**
 * Transitions of a two-state waveform by the rule of IEEE Std 181-2011: a transition counts only when
 * the trace leaves one state's band and enters the other's (the bands are the hysteresis, so noise around the
 * crossing level cannot make new transitions); its instant is the crossing of `crossLevel` nearest the entry
 * into the new state, linearly interpolated. One pass over the samples; crossings are searched only around
 * each transition.
 */
export function findTransitions(values: ArrayLike<number>, time: TimeBase, options: FindTransitionsOptions): Transition[] {
  const { crossLevel, lowArm, highArm, low, high } = options;
  if (!(lowArm < crossLevel && crossLevel < highArm)) {
    throw new RangeError('the crossing level must lie strictly inside the hysteresis band');
  }
  if (!(high > low)) throw new RangeError('the upper state level must be above the lower one');
  const amplitude = high - low;
  const level10 = low + 0.1 * amplitude;
  const level90 = low + 0.9 * amplitude;
  const n = values.length;
  const transitions: Transition[] = [];
  let state = 0; // −1 lower state, +1 upper state, 0 not yet known
  let lastInState = -1;
  let previousTransition = 0;
  for (let i = 0; i < n; i++) {
    let entered: number;
    if (state !== 0) {
      // Inside a state: the run up to the first sample in the other state's band goes through a small loop (one
      // comparison a sample, a function of its own so the optimiser takes it early in a deep record's one pass),
      // then the last sample still in the state is looked up backwards (usually the one before the edge).
      const stop = state === 1 ? firstAtOrBelow(values, i, n, lowArm) : firstAtOrAbove(values, i, n, highArm);
      for (let j = stop - 1; j >= i; j--) {
        const w = values[j];
        if (state === 1 ? w >= highArm : w <= lowArm) {
          lastInState = j;
          break;
        }
      }
      if (stop === n) break;
      i = stop;
      entered = -state;
    } else {
      const v = values[i];
      // NaN and samples between the arms fall to `continue`.
      if (v > lowArm) {
        if (v < highArm) continue;
        entered = 1;
      } else if (v <= lowArm) entered = -1;
      else continue;
      state = entered;
      lastInState = i;
      continue;
    }
    // Left the old state's band after `lastInState` and entered the new one at `i`.
    const rising = entered === 1;
    const mesial = findLevelCrossing(values, time, crossLevel, { from: lastInState, to: i, backward: true });
    state = entered;
    const start = lastInState;
    lastInState = i;
    if (mesial === null) continue; // cannot happen with finite samples on both sides; kept for safety
    const origin = rising ? level10 : level90;
    const destination = rising ? level90 : level10;
    const before = findLevelCrossing(values, time, origin, { from: previousTransition, to: mesial.after, backward: true });
    // Bound the forward search so a trace that never settles costs a bounded look-ahead, not the whole record.
    const limit = Math.min(n - 1, mesial.before + 10 * (i - start) + 1000);
    const after = findLevelCrossing(values, time, destination, { from: mesial.before, to: limit });
    const duration = before !== null && after !== null ? after.time - before.time : Number.NaN;
    const localSlope = mesial.interval > 0 ? (values[mesial.after] - values[mesial.before]) / mesial.interval : Number.NaN;
    const slope = duration > 0 ? ((rising ? 1 : -1) * 0.8 * amplitude) / duration : localSlope;
    transitions.push({
      direction: rising ? 'rising' : 'falling',
      time: mesial.time,
      before: mesial.before,
      after: mesial.after,
      fraction: mesial.fraction,
      interval: mesial.interval,
      duration,
      slope,
    });
    previousTransition = mesial.after;
  }
  return transitions;
}

/** First index in [from, n) whose sample is at or below `level` (NaN never is), or n. */
function firstAtOrBelow(values: ArrayLike<number>, from: number, n: number, level: number): number {
  let i = from;
  while (i < n && !(values[i] <= level)) i++;
  return i;
}

/** First index in [from, n) whose sample is at or above `level` (NaN never is), or n. */
function firstAtOrAbove(values: ArrayLike<number>, from: number, n: number, level: number): number {
  let i = from;
  while (i < n && !(values[i] >= level)) i++;
  return i;
}
