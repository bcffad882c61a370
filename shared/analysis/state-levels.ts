export interface StateLevelsOptions {
  /** Number of histogram bins over the (trimmed) value range. @default 100 */
  bins?: number;
  /** "mode": centre of the most populated bin of each half; "mean": count-weighted mean of its bin centres.
   * @default "mode" */
  method?: 'mode' | 'mean';
  /** Largest fraction of the samples that may be dropped at each end of the value range as isolated outliers
   * (spikes), so they cannot stretch the histogram until both states share one half (0 = the plain method).
   * @default 0 */
  trimFraction?: number;
  /** Records longer than twice this are histogrammed from a systematic subsample of about this many samples
   * (0 = always every sample). @default 1_000_000 */
  maxSamples?: number;
}

export interface StateLevels {
  /** Lower state level s₁, in the unit of the values. */
  low: number;
  /** Upper state level s₂. */
  high: number;
  /** Bounds of the histogram actually used. */
  histogramMin: number;
  histogramMax: number;
  /** Finite samples examined (NaN and ±Infinity are skipped). */
  finiteCount: number;
  /** Every `stride`-th sample was examined. */
  stride: number;
}

// Resolution of the histogram that finds isolated outliers at the ends of the range.
const TRIM_BINS = 1024;
// An end bin holding no more than this share of the samples (and at least 1) counts as isolated outliers.
const SPARSE_SHARE = 1e-5;

/**
 * State levels of a two-state waveform by the histogram method of IEEE Std 181-2011 (also
 * IEC 60469:2013): the histogram of the record is split into lower and upper halves at its middle bin and each
 * state level is the mode (or mean) of its half. Bin rules follow the open reference implementation
 * `statelevels` of the GNU Octave signal package, so its published values are reproduced: bounds min − ε and
 * max + ε (ε = 2⁻⁵²), bin ⌈n·(x − lower)/(upper − lower)⌉, both halves include the middle bin
 * iLow + ⌊(iHigh − iLow)/2⌋, a level is a bin centre.
 *
 * Deep records are histogrammed from a systematic subsample: a histogram of 10⁶ samples locates a mode as well
 * as one of 10⁷, and the levels are refined afterwards on the whole record (see state-noise.ts). With
 * `trimFraction`, sparse bins at the ends (isolated samples: spikes) are dropped first, never a dense state.
 */
export function stateLevels(values: ArrayLike<number>, options: StateLevelsOptions = {}): StateLevels {
  const { bins = 100, method = 'mode', trimFraction = 0, maxSamples = 1_000_000 } = options;
  if (!Number.isInteger(bins) || bins < 2) throw new RangeError('bins must be an integer ≥ 2');
  if (!(trimFraction >= 0 && trimFraction < 0.5)) throw new RangeError('trimFraction must lie in [0, 0.5)');
  if (method !== 'mode' && method !== 'mean') throw new TypeError('method must be "mode" or "mean"');
  if (!(Number.isInteger(maxSamples) && maxSamples >= 0)) throw new RangeError('maxSamples must be an integer ≥ 0');
  const n = values.length;
  const stride = maxSamples > 0 && n > 2 * maxSamples ? Math.floor(n / maxSamples) : 1;
  // A subsample is copied out in the first pass and the later passes (the trim and the histogram) read the copy:
  // with a stride every sample read from the record is on a cache line of its own. Same samples in the same order,
  // so the same levels; on the 10 M-sample capture (stride 10) both channels took 73–89 ms against 99–121 ms for
  // three strided passes, alternating in one process (3 December 2026).
  const copy = stride === 1 ? null : new Float64Array(Math.ceil(n / stride));
  const range = rangeOf(values, stride, copy);
  const examined = range.examined;
  const sample: ArrayLike<number> = copy ?? values;
  let { min, max } = range;
  let finiteCount = examined - range.nanCount;
  if (min === Number.NEGATIVE_INFINITY || max === Number.POSITIVE_INFINITY) {
    // ±Infinity is not a level: recount with finite samples only (rare, so the slow path is fine).
    min = Number.POSITIVE_INFINITY;
    max = Number.NEGATIVE_INFINITY;
    finiteCount = 0;
    for (let i = 0; i < examined; i++) {
      const v = sample[i];
      if (v - v !== 0) continue;
      finiteCount++;
      if (v < min) min = v;
      if (v > max) max = v;
    }
  }
  if (finiteCount < 2) throw new RangeError('state levels need at least 2 finite samples');

  if (trimFraction > 0 && max > min) {
    const counts = trimCounts(sample, examined, min, max);
    const cap = trimFraction * finiteCount;
    const sparse = Math.max(1, SPARSE_SHARE * finiteCount);
    let below = 0;
    let kLow = 0;
    while (kLow < TRIM_BINS - 1 && counts[kLow] <= sparse && below + counts[kLow] <= cap) below += counts[kLow++];
    let above = 0;
    let kHigh = TRIM_BINS - 1;
    while (kHigh > kLow && counts[kHigh] <= sparse && above + counts[kHigh] <= cap) above += counts[kHigh--];
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
  if (!(upper > lower)) return { low: min, high: max, histogramMin: min, histogramMax: max, finiteCount, stride };
  const counts = histogram(sample, examined, lower, upper, bins);
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
  return { low: level(iLow, iMid), high: level(iMid, iHigh), histogramMin: lower, histogramMax: upper, finiteCount, stride };
}

// The passes over the samples are functions of their own. A deep record is read once per analysis, so each loop is
// made fast by on-stack replacement while it runs; in one large function every loop after the first met code that
// had never run (no type feedback), fell back to the interpreter and waited for the whole function to be compiled
// again (7 compilations and 7 deoptimizations of stateLevels for the two channels of the 10 M-sample capture, each
// 2–10 ms of compiling while the loop ran slowly). Small functions compile in a fraction of that, once each.

/** Every `stride`-th sample from index 0: how many, their min and max, their NaNs; copied into `copy` when given. */
function rangeOf(values: ArrayLike<number>, stride: number, copy: Float64Array | null): { examined: number; min: number; max: number; nanCount: number } {
  const n = values.length;
  let min = Number.POSITIVE_INFINITY;
  let max = Number.NEGATIVE_INFINITY;
  let examined = 0;
  let nanCount = 0;
  // NaN fails both comparisons, so it never becomes min or max; counting it apart keeps this loop branch-light.
  for (let i = 0; i < n; i += stride) {
    const v = values[i];
    if (copy !== null) copy[examined] = v;
    examined++;
    if (v < min) min = v;
    if (v > max) max = v;
    if (v !== v) nanCount++;
  }
  return { examined, min, max, nanCount };
}

/** Counts of the first `examined` samples in TRIM_BINS equal bins over [min, max] (the top edge in the last bin). */
function trimCounts(sample: ArrayLike<number>, examined: number, min: number, max: number): Float64Array {
  const counts = new Float64Array(TRIM_BINS);
  const scale = TRIM_BINS / (max - min);
  const last = TRIM_BINS - 1;
  for (let i = 0; i < examined; i++) {
    // The top edge (k = TRIM_BINS) goes in the last bin; NaN in none. Every operation runs for every sample, so the
    // loop's compiled code has seen them all (a branch for the top edge alone, first taken at the maximum, sent it
    // back to the interpreter mid-pass).
    const k = Math.floor((sample[i] - min) * scale);
    if (k >= 0 && k <= TRIM_BINS) counts[k < TRIM_BINS ? k : last]++;
  }
  return counts;
}

/** The histogram of the reference implementation: bins 1…`bins` (index 0 unused), bin ⌈bins·(v − lower)/(upper −
 * lower)⌉ clamped to the range, samples outside [lower, upper] (and NaN) left out. */
function histogram(sample: ArrayLike<number>, examined: number, lower: number, upper: number, bins: number): Float64Array {
  const counts = new Float64Array(bins + 1); // 1-based, as in the reference implementation
  const scale = bins / (upper - lower);
  for (let i = 0; i < examined; i++) {
    const v = sample[i];
    if (!(v >= lower && v <= upper)) continue; // also skips NaN and trimmed samples
    let k = Math.ceil((v - lower) * scale);
    if (k < 1) k = 1;
    else if (k > bins) k = bins;
    counts[k]++;
  }
  return counts;
}
