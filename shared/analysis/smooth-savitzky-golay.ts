import sg from 'ml-savitzky-golay';

// ml-savitzky-golay 5 is a function under Vite/vitest but `{ default: fn }` under Node/tsx (STACK.md).
const savitzkyGolay = ((sg as any).default ?? sg) as typeof sg;

export interface SmoothSavitzkyGolayOptions {
  /** Odd number of samples in the window (≥ 5). @default 9 */
  windowSize?: number;
  /** Degree of the fitted polynomial (< windowSize). @default 2 */
  polynomial?: number;
}

/**
 * Savitzky–Golay smoothing (Savitzky & Golay, Anal. Chem. 36(8) 1627, 1964; coefficient tables corrected by
 * Steinier, Termonia & Deltour, Anal. Chem. 44(11) 1906, 1972) through the ml-savitzky-golay package, which
 * fits the polynomial by least squares for any window. Returns a new array and leaves the raw trace alone.
 * Ends are padded by replicating the end samples so the output keeps the input's length. NaN samples are
 * bridged with the previous finite value for the filter and stay NaN in the output, so flagged samples never
 * turn into numbers. Assumes a uniform sample interval (the filter's coefficients do).
 */
export function smoothSavitzkyGolay(values: ArrayLike<number>, options: SmoothSavitzkyGolayOptions = {}): Float64Array {
  const { windowSize = 9, polynomial = 2 } = options;
  if (!Number.isInteger(windowSize) || windowSize < 5 || windowSize % 2 === 0) {
    throw new RangeError('windowSize must be an odd integer ≥ 5');
  }
  if (!Number.isInteger(polynomial) || polynomial < 1 || polynomial >= windowSize) {
    throw new RangeError('polynomial must be an integer from 1 to windowSize − 1');
  }
  const n = values.length;
  if (n < windowSize) throw new RangeError(`smoothing needs at least windowSize (${windowSize}) samples, got ${n}`);
  const bridged = new Array<number>(n);
  let last = Number.NaN;
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (v - v === 0) last = v;
    bridged[i] = last;
  }
  // Leading NaNs take the first finite value.
  let first = 0;
  while (first < n && !(bridged[first] - bridged[first] === 0)) first++;
  if (first === n) throw new RangeError('smoothing needs at least one finite sample');
  for (let i = 0; i < first; i++) bridged[i] = bridged[first];
  const smoothed = savitzkyGolay(bridged, 1, { windowSize, polynomial, derivative: 0, pad: 'pre', padValue: 'replicate' });
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const v = values[i];
    out[i] = v - v === 0 ? smoothed[i] : Number.NaN;
  }
  return out;
}
