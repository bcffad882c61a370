export interface StateNoiseOptions {
  /** Widest band considered around each state level, as a fraction of the amplitude. @default 0.4 */
  bandFraction?: number;
  /** Records longer than twice this are measured on a systematic subsample of about this many samples
   * (0 = every sample): a standard deviation from 10⁶ samples is already within 0.1 %. @default 1_000_000 */
  maxSamples?: number;
}

export interface StateNoise {
  /** Mean of the lower state's samples within its chosen band: the state level free of histogram binning, V. */
  lowLevel: number;
  highLevel: number;
  /** Standard deviation of those samples, in the values' unit (NaN when a state has under 2 samples). */
  lowSd: number;
  highSd: number;
  /** Samples within the widest band of each state (for telling the dominant state). */
  lowCount: number;
  highCount: number;
  /** White-noise estimate from successive differences within a state, √(mean(Δv²)/2), V (NaN when too few).
   * Slow wander (hum, a settling sensor) cancels in a difference, so this sees only sample-to-sample noise. */
  lowDiffSd: number;
  highDiffSd: number;
}

const SHELLS = 10;

/**
 * Noise of each state: the standard deviation of the samples around its state level (IEEE Std 181-2011 takes
 * the state's own samples). A fixed band either truncates the noise (too narrow) or takes in the transitions'
 * samples (too wide), so the band is chosen from the data: one pass sorts deviations into nested bands, each half
 * the width of the last, and the narrowest band at least 4 standard deviations wide is used (a gaussian
 * truncated at ±4σ keeps 99.99 % of its variance, e.g. Johnson, Kotz & Balakrishnan, Continuous Univariate
 * Distributions vol. 1, chapter on the normal distribution). The mean in that band also refines the histogram's level past its bin width.
 */
export function stateNoise(values: ArrayLike<number>, low: number, high: number, options: StateNoiseOptions = {}): StateNoise {
  const { bandFraction = 0.4, maxSamples = 1_000_000 } = options;
  if (!(bandFraction > 0 && bandFraction <= 0.5)) throw new RangeError('bandFraction must lie in (0, 0.5]');
  if (!(Number.isInteger(maxSamples) && maxSamples >= 0)) throw new RangeError('maxSamples must be an integer ≥ 0');
  const widest = bandFraction * Math.abs(high - low);
  // Shell j holds deviations d with widest/2^(j+1) < |d| ≤ widest/2^j; the last shell holds everything inside.
  const lowStats = new Float64Array(3 * SHELLS);
  const highStats = new Float64Array(3 * SHELLS);
  const n = values.length;
  const stride = maxSamples > 0 && n > 2 * maxSamples ? Math.floor(n / maxSamples) : 1;
  // Successive differences [count, Σ Δ²] per state, both samples inside the same state's band.
  const lowDiff = new Float64Array(2);
  const highDiff = new Float64Array(2);
  accumulateShells(values, stride, low, high, widest, lowStats, highStats, lowDiff, highDiff);
  const pick = (stats: Float64Array, level: number) => {
    let count = 0;
    let sum = 0;
    let sum2 = 0;
    let chosen: { level: number; sd: number } | null = null;
    const total = stats.reduce((acc, _, k) => (k % 3 === 0 ? acc + stats[k] : acc), 0);
    // Grow the band from the narrowest shell outward; stop at the first band ≥ 4 SD wide.
    for (let j = SHELLS - 1; j >= 0; j--) {
      count += stats[3 * j];
      sum += stats[3 * j + 1];
      sum2 += stats[3 * j + 2];
      if (count < 2) continue;
      const mean = sum / count;
      const sd = Math.sqrt(Math.max(0, (sum2 - sum * mean) / (count - 1)));
      const halfWidth = widest / 2 ** j;
      chosen = { level: level + mean, sd };
      if (halfWidth >= 4 * sd) break;
    }
    return { level: chosen?.level ?? level, sd: chosen?.sd ?? Number.NaN, count: total };
  };
  const lo = pick(lowStats, low);
  const hi = pick(highStats, high);
  const diffSd = (acc: Float64Array): number => (acc[0] >= 2 ? Math.sqrt(acc[1] / acc[0] / 2) : Number.NaN);
  return {
    lowLevel: lo.level,
    highLevel: hi.level,
    lowSd: lo.sd,
    highSd: hi.sd,
    lowCount: lo.count,
    highCount: hi.count,
    lowDiffSd: diffSd(lowDiff),
    highDiffSd: diffSd(highDiff),
  };
}

/**
 * The pass over the samples, a function of its own: it runs once per analysis and is made fast by on-stack
 * replacement while it runs, without the rest of stateNoise (whose code after the loop, not yet run when the loop
 * was compiled, sent the compiled code back to the interpreter: 3 compilations and 3 deoptimizations for the two
 * channels of the 10 M-sample capture). Adds every `stride`-th sample inside a state's band to its shell of
 * [count, Σd, Σd²] and, with the sample after it when that is inside the same band, to the state's [count, Σ Δ²].
 */
function accumulateShells(
  values: ArrayLike<number>, stride: number, low: number, high: number, widest: number,
  lowStats: Float64Array, highStats: Float64Array, lowDiff: Float64Array, highDiff: Float64Array,
): void {
  const n = values.length;
  // |d|/widest·2³⁰ as an integer: its leading zeros give the shell (each shell halves the band) in one
  // instruction instead of a loop of comparisons per sample.
  const toInt = 2 ** 30 / widest;
  // Both states' tests run for every sample (|x| ≤ widest is x ≤ widest && x ≥ −widest, NaN failing both), so that
  // the loop's compiled code has seen every comparison from its first samples: a test reached only once the other
  // state appeared sent it back to the interpreter mid-pass.
  for (let i = 0; i < n; i += stride) {
    const v = values[i];
    const fromLow = v - low;
    const fromHigh = v - high;
    const inLow = Math.abs(fromLow) <= widest;
    const inHigh = Math.abs(fromHigh) <= widest;
    if (!inLow && !inHigh) continue; // also skips NaN
    const d = inLow ? fromLow : fromHigh;
    const level = inLow ? low : high;
    const stats = inLow ? lowStats : highStats;
    const diff = inLow ? lowDiff : highDiff;
    if (i + 1 < n) {
      const e = values[i + 1] - level;
      if (Math.abs(e) <= widest) {
        diff[0]++;
        diff[1] += (e - d) * (e - d);
      }
    }
    const q = Math.abs(d) * toInt;
    let j = Math.clz32(q) - 2; // q in (2²⁹, 2³⁰] → shell 0
    if (j < 0) j = 0;
    else if (j > SHELLS - 1) j = SHELLS - 1;
    const at = 3 * j;
    stats[at]++;
    stats[at + 1] += d;
    stats[at + 2] += d * d;
  }
}
