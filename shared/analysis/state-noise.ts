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
  // |d|/widest·2³⁰ as an integer: its leading zeros give the shell (each shell halves the band) in one
  // instruction instead of a loop of comparisons per sample.
  const toInt = 2 ** 30 / widest;
  // Successive differences [count, Σ Δ²] per state, both samples inside the same state's band.
  const lowDiff = [0, 0];
  const highDiff = [0, 0];
  for (let i = 0; i < n; i += stride) {
    const v = values[i];
    let d = v - low;
    let stats = lowStats;
    let level = low;
    let diff = lowDiff;
    if (!(d <= widest && d >= -widest)) {
      d = v - high;
      if (!(d <= widest && d >= -widest)) continue; // also skips NaN
      stats = highStats;
      level = high;
      diff = highDiff;
    }
    if (i + 1 < n) {
      const e = values[i + 1] - level;
      if (e <= widest && e >= -widest) {
        diff[0]++;
        diff[1] += (e - d) * (e - d);
      }
    }
    const q = (d < 0 ? -d : d) * toInt;
    let j = Math.clz32(q) - 2; // q in (2²⁹, 2³⁰] → shell 0
    if (j < 0) j = 0;
    else if (j > SHELLS - 1) j = SHELLS - 1;
    const at = 3 * j;
    stats[at]++;
    stats[at + 1] += d;
    stats[at + 2] += d * d;
  }
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
  const diffSd = (acc: number[]): number => (acc[0] >= 2 ? Math.sqrt(acc[1] / acc[0] / 2) : Number.NaN);
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
