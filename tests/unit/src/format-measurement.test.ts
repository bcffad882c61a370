import { describe, expect, it } from 'vitest';
import { formatMeasurement, formatSeconds } from '../../../src/lib/format.ts';

// Rounding rule: GUM (JCGM 100:2008) 7.2.6 — give the uncertainty with at most two significant digits and round
// the value to the same decimal place.
describe('formatMeasurement', () => {
  it('When U is below one, then U keeps two significant digits and the value the same decimals', () => {
    expect(formatMeasurement(412.3712938, 0.4213, 'm/s')).toBe('412.37 ± 0.42 m/s');
  });
  it('When U is a few units (DOMAIN.md worked example, U = 2.128 m/s), then one decimal', () => {
    expect(formatMeasurement(333.333, 2.128, 'm/s')).toBe('333.3 ± 2.1 m/s');
  });
  it('When U is in the hundreds, then both round to tens', () => {
    expect(formatMeasurement(12_345, 163, 'J')).toBe('12350 ± 160 J');
  });
  it('When U is small, then trailing zeros of the value are kept to its decimal place', () => {
    expect(formatMeasurement(1, 0.0096)).toBe('1.0000 ± 0.0096');
  });
  it('When there is no value or no uncertainty, then a dash or the bare value', () => {
    expect(formatMeasurement(null, 1)).toBe('—');
    expect(formatMeasurement(Number.NaN, 1)).toBe('—');
    expect(formatMeasurement(2.5, null, 'm/s')).toBe('2.5 m/s');
  });
});

describe('formatSeconds', () => {
  it('When durations span decades, then each gets its own unit', () => {
    expect(formatSeconds(3.1e-9)).toBe('3.100 ns');
    expect(formatSeconds(0.0001905)).toBe('190.5 µs');
    expect(formatSeconds(0.0014333)).toBe('1.433 ms');
    expect(formatSeconds(2)).toBe('2.000 s');
    expect(formatSeconds(null)).toBe('—');
  });
});
