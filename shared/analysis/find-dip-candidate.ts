import type { TimeBase } from '../contracts/capture.ts';
import { sampleTime } from './sample-time.ts';

export interface FindDipCandidateOptions {
  time: TimeBase;
  /** Beam-clear (idle) level, V. */
  clearLevel: number;
  /** Signed clear-to-blocked step the gates normally show, V (negative when blocking pulls low). */
  referenceStep: number;
  /** Samples in the centred running mean that the dip is found on (odd; shrinks at the record's ends).
   * @default 9 */
  window?: number;
  /** A dip counts only when its smoothed depth exceeds this many times the trace's noise. @default 3 */
  minSigmas?: number;
}

export interface DipCandidateFound {
  /** Depth of the dip's core toward the blocked level, as a fraction of the step. */
  depthFraction: number;
  /** Depth of the dip's core below (or above) the idle level, V (positive). */
  depth: number;
  /** Middle of the dip's core (half-depth to half-depth), s. */
  time: number;
  index: number;
  /** Where the dip leaves the idle level's noise, s. */
  start: number;
  /** Where it has returned within the noise, s. */
  end: number;
  startIndex: number;
  endIndex: number;
  /** Robust standard deviation of the trace about the idle level, V. */
  noise: number;
}

/**
 * The sub-threshold dip of a channel that produced no transition, so the analyst sees "a dip from 0.712 ms to
 * 0.845 ms, 1.75 V deep (38 % of the step)" and can lower the threshold.
 *
 * Defined on a centred running mean of the trace (noise down by √window) against the idle level:
 * - noise σ: 1.4826 × the median absolute deviation of the raw trace from the idle level (a robust standard
 *   deviation), taken again without the samples beyond 3 σ so a long dip does not inflate it;
 * - the dip: the contiguous run around the deepest smoothed excursion, provided that excursion exceeds
 *   `minSigmas`·σ; it starts and ends where the smoothed trace comes back within 1 σ of the idle level;
 * - its depth: the median raw excursion over the dip's core (where the smoothed excursion is at least half its
 *   peak), so one deep noise sample or spike inside the dip does not set the depth; its time is the core's middle.
 * Returns null when no excursion rises above the noise.
 */
export function findDipCandidate(values: ArrayLike<number>, options: FindDipCandidateOptions): DipCandidateFound | null {
  const { time, clearLevel, referenceStep, window = 9, minSigmas = 3 } = options;
  if (!(referenceStep !== 0 && Number.isFinite(referenceStep))) throw new RangeError('referenceStep must be a non-zero number');
  if (!(Number.isInteger(window) && window >= 1 && window % 2 === 1)) throw new RangeError('window must be an odd whole number of samples');
  if (!(minSigmas > 0)) throw new RangeError('minSigmas must be positive');
  const sign = referenceStep > 0 ? 1 : -1;
  const n = values.length;
  if (n === 0) return null;

  // Excursion toward the blocked level (NaN where the sample is missing).
  const ex = new Float64Array(n);
  const absAll = new Float64Array(n);
  let finite = 0;
  for (let i = 0; i < n; i++) {
    ex[i] = sign * (values[i] - clearLevel);
    if (Number.isFinite(ex[i])) absAll[finite++] = Math.abs(ex[i]);
  }
  if (finite === 0) return null;
  // A noise-free record still needs a floor, or every rounding error would be a dip.
  const floor = 1e-9 * Math.abs(referenceStep);
  const sorted = absAll.subarray(0, finite).sort();
  const firstSigma = Math.max(1.4826 * median(sorted), floor);
  // Second pass without the dip's samples (beyond 3 σ of the first pass), which inflate the first estimate when the
  // dip is a fifth of the record; cutting a gaussian at 3 σ moves its MAD by well under 1 %.
  let kept = finite;
  while (kept > 1 && sorted[kept - 1] > 3 * firstSigma) kept--;
  const sigma = Math.max(1.4826 * median(sorted.subarray(0, kept)), floor);

  // Centred running mean over finite samples (prefix sums).
  const sum = new Float64Array(n + 1);
  const count = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) {
    const ok = Number.isFinite(ex[i]);
    sum[i + 1] = sum[i] + (ok ? ex[i] : 0);
    count[i + 1] = count[i] + (ok ? 1 : 0);
  }
  const half = (window - 1) / 2;
  const smooth = new Float64Array(n);
  let peak = -Infinity;
  let peakIndex = -1;
  for (let i = 0; i < n; i++) {
    const a = Math.max(0, i - half);
    const b = Math.min(n, i + half + 1);
    const k = count[b] - count[a];
    smooth[i] = k > 0 ? (sum[b] - sum[a]) / k : Number.NaN;
    if (smooth[i] > peak) {
      peak = smooth[i];
      peakIndex = i;
    }
  }
  if (peakIndex < 0 || !(peak > minSigmas * sigma)) return null;

  // Extent: back within 1 σ of the idle level on either side (gaps do not end the dip).
  let startIndex = peakIndex;
  while (startIndex > 0 && !(smooth[startIndex - 1] <= sigma)) startIndex--;
  let endIndex = peakIndex;
  while (endIndex < n - 1 && !(smooth[endIndex + 1] <= sigma)) endIndex++;

  // Depth: median raw excursion over the core (smoothed excursion ≥ half the peak).
  const core = new Float64Array(endIndex - startIndex + 1);
  let inCore = 0;
  let coreFirst = peakIndex;
  let coreLast = peakIndex;
  for (let i = startIndex; i <= endIndex; i++) {
    if (smooth[i] >= 0.5 * peak && Number.isFinite(ex[i])) {
      core[inCore++] = ex[i];
      coreFirst = Math.min(coreFirst, i);
      coreLast = Math.max(coreLast, i);
    }
  }
  const centre = Math.round((coreFirst + coreLast) / 2);
  const depth = median(core.subarray(0, inCore).sort());

  return {
    depthFraction: depth / Math.abs(referenceStep),
    depth,
    time: sampleTime(time, centre),
    index: centre,
    start: sampleTime(time, startIndex),
    end: sampleTime(time, endIndex),
    startIndex,
    endIndex,
    noise: sigma,
  };
}

/** Median of a sorted, non-empty array. */
function median(sorted: Float64Array): number {
  const m = sorted.length;
  return m % 2 === 1 ? sorted[(m - 1) / 2] : 0.5 * (sorted[m / 2 - 1] + sorted[m / 2]);
}
