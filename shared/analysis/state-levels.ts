export interface StateLevelsOptions {
  /** Number of histogram bins over the (trimmed) value range. @default 100 */
  bins?: number;
  /** "mode": centre of the most populated bin of each half; "mean": count-weighted mean of its bin centres.
   * @default "mode" */
  method?: 'mode' | 'mean';
  /** Fraction of the finite samples ignored at each end of the value range, so that a few spikes cannot
   * stretch the histogram until both states share one half (0 = the plain method). @default 0 */
  trimFraction?: number;
}

export interface StateLevels {
  /** Lower state level s₁, in the unit of the values. */
  low: number;
  /** Upper state level s₂. */
  high: number;
  /** Bounds of the histogram actually used. */
  histogramMin: number;
  histogramMax: number;
  /** Finite samples seen (NaN and ±Infinity are skipped). */
  finiteCount: number;
}

// Resolution of the first histogram that locates the trimmed range; 4096 bins put the trim bounds within
// 1/4096 of the full range, far below the state histogram's own bin width.
const TRIM_BINS = 4096;
const TRIM_SAMPLES = 1_000_000;

/**
 * State levels of a two-state waveform by the histogram method of IEEE Std 181-2011 §5.2.1.3 (also
 * IEC 60469:2013): the histogram of the record is split into lower and upper halves at its middle bin and each
 * state level is the mode (or mean) of its half. Bin rules follow the open reference implementation
 * `statelevels` of the GNU Octave signal package, so its published values are reproduced: bounds min − ε and
 * max + ε (ε = 2⁻⁵²), bin ⌈n·(x − lower)/(upper − lower)⌉, both halves include the middle bin
 * iLow + ⌊(iHigh − iLow)/2⌋, a level is a bin centre.
 *
 * One pass for the range and one for the histogram (plus one with `trimFraction` > 0): no sort, so it stays
 * linear on records of tens of millions of samples.
 */
export function stateLevels(values: ArrayLike<number>, options: StateLevelsOptions = {}): StateLevels {
  const { bins = 100, method = 'mode', trimFraction = 0 } = options;
  if (!Number.isInteger(bins) || bins < 2) throw new RangeError('bins must be an integer ≥ 2');
  if (!(trimFraction >= 0 && trimFraction < 0.5)) throw new RangeError('trimFraction must lie in [0, 0.5)');
  if (method !== 'mode' && method !== 'mean') throw new TypeError('method must be "mode" or "mean"');
  const n = values.length;
  let min = Number.POSITIVE_INFINITY;
  let max = Number.NEGATIVE_INFINITY;
  let nanCount = 0;
  // NaN fails both comparisons, so it never becomes min or max; counting it apart keeps this loop branch-light.
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (v < min) min = v;
    if (v > max) max = v;
    if (v !== v) nanCount++;
  }
  let finiteCount = n - nanCount;
  if (min === Number.NEGATIVE_INFINITY || max === Number.POSITIVE_INFINITY) {
    // ±Infinity is not a level: recount with finite samples only (rare, so the slow path is fine).
    min = Number.POSITIVE_INFINITY;
    max = Number.NEGATIVE_INFINITY;
    finiteCount = 0;
    for (let i = 0; i < n; i++) {
      const v = values[i];
      if (v - v !== 0) continue;
      finiteCount++;
      if (v < min) min = v;
      if (v > max) max = v;
    }
  }
  if (finiteCount < 2) throw new RangeError('state levels need at least 2 finite samples');

  if (trimFraction > 0 && max > min) {
    // The trimmed range is a quantile, so a systematic subsample of about 10⁶ samples locates it well enough and
    // saves most of a pass on deep records. A lone spike the subsample misses leaves its bin empty, and empty
    // end bins are trimmed anyway.
    const stride = Math.max(1, Math.floor(n / TRIM_SAMPLES));
    const counts = new Float64Array(TRIM_BINS);
    const scale = TRIM_BINS / (max - min);
    let counted = 0;
    for (let i = 0; i < n; i += stride) {
      const k = Math.floor((values[i] - min) * scale);
      if (k >= 0 && k < TRIM_BINS) {
        counts[k]++;
        counted++;
      } else if (k === TRIM_BINS) {
        counts[TRIM_BINS - 1]++;
        counted++;
      }
    }
    const cut = trimFraction * counted;
    let below = 0;
    let kLow = 0;
    while (kLow < TRIM_BINS - 1 && below + counts[kLow] <= cut) below += counts[kLow++];
    let above = 0;
    let kHigh = TRIM_BINS - 1;
    while (kHigh > kLow && above + counts[kHigh] <= cut) above += counts[kHigh--];
    const width = (max - min) / TRIM_BINS;
    const trimmedMin = min + kLow * width;
    const trimmedMax = min + (kHigh + 1) * width;
    min = trimmedMin;
    max = trimmedMax;
  }

  const eps = 2 ** -52;
  const lower = min - eps;
  const upper = max + eps;
  // A flat record (or one so large that ε vanishes in rounding) has a single level.
  if (!(upper > lower)) return { low: min, high: max, histogramMin: min, histogramMax: max, finiteCount };
  const counts = new Float64Array(bins + 1); // 1-based, as in the reference implementation
  const scale = bins / (upper - lower);
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (!(v >= lower && v <= upper)) continue; // also skips NaN and trimmed samples
    let k = Math.ceil((v - lower) * scale);
    if (k < 1) k = 1;
    else if (k > bins) k = bins;
    counts[k]++;
  }
  let iLow = 1;
  while (iLow < bins && counts[iLow] === 0) iLow++;
  let iHigh = bins;
  while (iHigh > 1 && counts[iHigh] === 0) iHigh--;
  const iMid = iLow + Math.floor((iHigh - iLow) / 2);
  const binWidth = (upper - lower) / bins;
  const centre = (k: number): number => lower + (k - 0.5) * binWidth;
  const level = (from: number, to: number): number => {
    if (method === 'mode') {
      let best = from;
      for (let k = from + 1; k <= to; k++) if (counts[k] > counts[best]) best = k;
      return centre(best);
    }
    let sum = 0;
    let weight = 0;
    for (let k = from; k <= to; k++) {
      sum += counts[k] * centre(k);
      weight += counts[k];
    }
    return sum / weight;
  };
  return { low: level(iLow, iMid), high: level(iMid, iHigh), histogramMin: lower, histogramMax: upper, finiteCount };
}
