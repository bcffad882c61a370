import type { TimeBase } from '../contracts/capture.ts';
import { sampleTime } from './sample-time.ts';

export interface FindDipCandidateOptions {
  time: TimeBase;
  /** Beam-clear level, V. */
  clearLevel: number;
  /** Signed clear-to-blocked step the gates normally show, V (negative when blocking pulls low). */
  referenceStep: number;
}

export interface DipCandidateFound {
  /** Depth of the deepest sustained excursion toward the blocked level, as a fraction of the step. */
  depthFraction: number;
  time: number;
  index: number;
}

/**
 * The deepest excursion of a channel toward its blocked level, for a gate that produced no transition: the
 * analyst sees "reached 38 % of the step at 0.731 ms" and can lower the threshold. An excursion counts only as
 * far as three consecutive finite samples all reach it, so a single-sample spike is not taken for a dip.
 */
export function findDipCandidate(values: ArrayLike<number>, options: FindDipCandidateOptions): DipCandidateFound | null {
  const { time, clearLevel, referenceStep } = options;
  if (!(referenceStep !== 0 && Number.isFinite(referenceStep))) throw new RangeError('referenceStep must be a non-zero number');
  const sign = referenceStep > 0 ? 1 : -1;
  const n = values.length;
  let best = 0;
  let bestIndex = -1;
  for (let i = 1; i < n - 1; i++) {
    const a = sign * (values[i - 1] - clearLevel);
    const b = sign * (values[i] - clearLevel);
    const c = sign * (values[i + 1] - clearLevel);
    // Math.min propagates NaN, and NaN > best is false: gaps are skipped without a branch.
    const sustained = Math.min(a, b, c);
    if (sustained > best) {
      best = sustained;
      bestIndex = i;
    }
  }
  if (bestIndex < 0) return null;
  return { depthFraction: best / Math.abs(referenceStep), time: sampleTime(time, bestIndex), index: bestIndex };
}
