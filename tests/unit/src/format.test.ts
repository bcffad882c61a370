// Rounding of a value to its uncertainty for display. The rule: the uncertainty to two significant digits, the value
// to the same decimal place (JCGM 100:2008 "GUM" §7.2.6, "at most two significant digits" — section number from
// memory; the rounding of the value to the uncertainty's last digit is common practice in reporting results).
// Expected strings are written out by hand from that rule, never produced by the code under test.
import { describe, expect, it } from 'vitest';
import { formatMeasurement, roundToUncertainty } from '../../../src/lib/format.ts';

describe('formatMeasurement', () => {
  it('When a speed has many digits, then U keeps two significant digits and the value is cut at the same place (issue 6 example)', () => {
    expect(formatMeasurement(412.3712938, 0.4213, 'm/s')).toBe('412.37 ± 0.42 m/s');
  });

  it('When the GUM worked example of ../shared/DOMAIN.md is shown (v = 333.333 m/s, U = 2.128 m/s), then it reads 333.3 ± 2.1 m/s', () => {
    expect(formatMeasurement(333.333, 2.128, 'm/s')).toBe('333.3 ± 2.1 m/s');
  });

  it('When the value ends in a 5 at the cut, then it rounds half away from zero in decimal (412.365 → 412.37, not the binary 412.36)', () => {
    // 412.365 is stored as 412.36499999…; a naive Math.round(x·100)/100 gives 412.36.
    expect(formatMeasurement(412.365, 0.42)).toBe('412.37 ± 0.42');
    expect(formatMeasurement(-412.365, 0.42)).toBe('−412.37 ± 0.42');
  });

  it('When rounding U carries into a new digit (0.996 → 1.0, 9.96 → 10), then U still shows two digits and the value follows', () => {
    expect(formatMeasurement(412.37, 0.996, 'm/s')).toBe('412.4 ± 1.0 m/s');
    expect(formatMeasurement(412.37, 9.96, 'm/s')).toBe('412 ± 10 m/s');
    expect(formatMeasurement(0.125, 0.0996)).toBe('0.13 ± 0.10');
  });

  it('When U is larger than 100, then both are rounded to tens (no false digits below the uncertainty)', () => {
    expect(formatMeasurement(4123.4, 123)).toBe('4120 ± 120');
    expect(formatMeasurement(0.4, 120)).toBe('0 ± 120');
  });

  it('When values are tiny (microseconds in seconds), then fixed notation keeps the two digits of U', () => {
    expect(formatMeasurement(1.234567e-6, 3.4e-9, 's')).toBe('0.0000012346 ± 0.0000000034 s');
  });

  it('When trailing zeros are significant, then they are kept (0 ± 0.05 → 0.000 ± 0.050)', () => {
    expect(formatMeasurement(0, 0.05)).toBe('0.000 ± 0.050');
    expect(formatMeasurement(300, 2)).toBe('300.0 ± 2.0');
  });

  it('When a negative value rounds to zero, then no minus sign is shown', () => {
    expect(formatMeasurement(-0.004, 0.1)).toBe('0.00 ± 0.10');
  });

  it('When there is no uncertainty (missing, NaN, zero, negative), then the value alone shows with six significant digits, no trailing zeros', () => {
    expect(formatMeasurement(412.3712938, null, 'm/s')).toBe('412.371 m/s');
    expect(formatMeasurement(412.3712938, Number.NaN, 'm/s')).toBe('412.371 m/s');
    expect(formatMeasurement(412.3712938, 0, 'm/s')).toBe('412.371 m/s');
    expect(formatMeasurement(412.3712938, -1, 'm/s')).toBe('412.371 m/s');
    expect(formatMeasurement(1716.2, undefined)).toBe('1716.2');
    expect(formatMeasurement(0.0123456789, undefined)).toBe('0.0123457');
    // Zeros before the point are digits of the value, not padding: 100 000 stays 100000 (not "1").
    expect(formatMeasurement(100_000, null)).toBe('100000');
    expect(formatMeasurement(2.5, null)).toBe('2.5');
  });

  it('When there is no value, then a dash is shown', () => {
    expect(formatMeasurement(null, 0.4)).toBe('—');
    expect(formatMeasurement(Number.POSITIVE_INFINITY, 0.4)).toBe('—');
  });
});

describe('roundToUncertainty', () => {
  it('When asked for one significant digit, then U keeps one and the decimals follow (412.37 ± 0.42 → 412.4 ± 0.4)', () => {
    expect(roundToUncertainty(412.37, 0.42, 1)).toEqual({ value: '412.4', uncertainty: '0.4', decimals: 1 });
  });

  it('When U is 123, then the decimals are −1 (tens)', () => {
    expect(roundToUncertainty(4123.4, 123).decimals).toBe(-1);
  });
});
