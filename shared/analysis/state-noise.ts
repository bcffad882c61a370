export interface StateNoiseOptions {
  /** Samples within this fraction of the amplitude of a state level count as that state. @default 0.4 */
  bandFraction?: number;
}

export interface StateNoise {
  /** Standard deviation of the samples in the lower state, in the values' unit. */
  lowSd: number;
  /** Standard deviation of the samples in the upper state. */
  highSd: number;
  lowCount: number;
  highCount: number;
}

/**
 * Noise of each state: the standard deviation of the samples lying within ±bandFraction·amplitude of its state
 * level (IEEE Std 181-2011 uses the state's samples; the band keeps transitions out). A wide band (±40 %) keeps
 * the gaussian tails in up to 4σ for noise of 10 % of the amplitude. One pass, shifted sums for accuracy.
 */
export function stateNoise(values: ArrayLike<number>, low: number, high: number, options: StateNoiseOptions = {}): StateNoise {
  const { bandFraction = 0.4 } = options;
  if (!(bandFraction > 0 && bandFraction <= 0.5)) throw new RangeError('bandFraction must lie in (0, 0.5]');
  const band = bandFraction * Math.abs(high - low);
  let lowCount = 0;
  let lowSum = 0;
  let lowSum2 = 0;
  let highCount = 0;
  let highSum = 0;
  let highSum2 = 0;
  const n = values.length;
  for (let i = 0; i < n; i++) {
    const v = values[i];
    const dl = v - low;
    const dh = v - high;
    if (dl <= band && dl >= -band) {
      lowCount++;
      lowSum += dl;
      lowSum2 += dl * dl;
    } else if (dh <= band && dh >= -band) {
      highCount++;
      highSum += dh;
      highSum2 += dh * dh;
    }
  }
  const sd = (count: number, sum: number, sum2: number): number =>
    count > 1 ? Math.sqrt(Math.max(0, (sum2 - (sum * sum) / count) / (count - 1))) : Number.NaN;
  return { lowSd: sd(lowCount, lowSum, lowSum2), highSd: sd(highCount, highSum, highSum2), lowCount, highCount };
}
