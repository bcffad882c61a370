export interface SpeedSummary {
  count: number;
  /** m/s; null for no shots */
  mean: number | null;
  /** Sample standard deviation (n − 1 in the denominator), m/s; null below two shots. */
  standardDeviation: number | null;
  /** Standard error of the mean, s/√n (the sample standard deviation over √n), m/s; null below two shots. */
  standardError: number | null;
  /** max − min, m/s; null for no shots (0 for one). */
  extremeSpread: number | null;
}

/**
 * Count, mean, sample standard deviation, standard error of the mean and extreme spread of a group's speeds. Two passes (mean first, then the
 * squared deviations from it) avoid the cancellation of the one-pass sum-of-squares formula (NIST/SEMATECH
 * e-Handbook of Statistical Methods, 1.3.5.6; Chan, Golub & LeVeque, Am. Stat. 37(3) 1983).
 */
export function summarizeSpeeds(values: readonly number[]): SpeedSummary {
  if (!Array.isArray(values)) throw new TypeError('values must be an array of speeds in m/s');
  const n = values.length;
  if (n === 0) return { count: 0, mean: null, standardDeviation: null, standardError: null, extremeSpread: null };
  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (!Number.isFinite(v)) throw new RangeError(`speed ${i} is not a finite number (${v})`);
    sum += v;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  const mean = sum / n;
  let squares = 0;
  for (let i = 0; i < n; i++) squares += (values[i] - mean) ** 2;
  const standardDeviation = n > 1 ? Math.sqrt(squares / (n - 1)) : null;
  return { count: n, mean, standardDeviation, standardError: standardDeviation == null ? null : standardDeviation / Math.sqrt(n), extremeSpread: max - min };
}
