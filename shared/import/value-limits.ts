/**
 * Bounds outside which a number in a scope file is not a reading, so that nothing the importer keeps can overflow
 * or underflow the arithmetic after it (levels, slopes, speeds, their uncertainties squared) or the Float32 channel
 * files (largest Float32 3.4028235e38, IEEE 754-2019 binary32).
 */

/**
 * A sample of this magnitude or more is no reading: SCPI-1999 Vol. 1 §7.2.1.4-5 (from memory) writes ±9.9E+37 for
 * ±infinity, and instruments export it for over-range. Such a sample is kept as an invalid one (NaN, counted and
 * named in a warning), as an overrange mark is.
 */
export const MAX_SAMPLE_MAGNITUDE = 9.9e37;

/** A time further than this from the trigger (10¹² s, about 31 700 years) comes from no recording: the file is refused. */
export const MAX_TIME_SECONDS = 1e12;

/**
 * The shortest sample interval taken: 1 fs. Real-time digitisers sample every few picoseconds at the fastest and
 * equivalent-time sampling reaches tens of femtoseconds (common practice; figures from memory); an interval below
 * 1 fs is a misread time column or a wrong unit.
 */
export const MIN_SAMPLE_INTERVAL_SECONDS = 1e-15;

/** Why a time read from a file is refused, or null when it is within bounds. */
export function timeOutOfRange(seconds: number): string | null {
  return Math.abs(seconds) <= MAX_TIME_SECONDS ? null
    : `the time ${seconds} s is beyond ±1e12 s (about 31 700 years) from the trigger, which no recording spans; check the time column and its unit`;
}

/** Why a sample interval is refused, or null when it is within bounds. */
export function sampleIntervalOutOfRange(dt: number): string | null {
  if (dt > MAX_TIME_SECONDS) return `the sample interval ${dt} s is beyond 1e12 s (about 31 700 years), which no recording spans; check the interval and its unit`;
  if (dt < MIN_SAMPLE_INTERVAL_SECONDS) return `the sample interval ${dt} s is below 1e-15 s (1 fs), shorter than any digitiser samples; check the interval and its unit`;
  return null;
}
