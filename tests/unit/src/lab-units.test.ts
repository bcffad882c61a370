// Conversions of the new-shot form, checked against the definitions of the units (not against the code's output).
import { describe, expect, it } from 'vitest';
import { celsiusToKelvin, fromPascal, millimetresToMetres, parseLabNumber, toPascal } from '../../../src/features/campaigns/utils/lab-units.ts';

describe('pressure units', () => {
  it('When 760 Torr are converted, then they are one standard atmosphere, 101 325 Pa (ISO 2533; torr = atm/760)', () => {
    expect(toPascal(760, 'Torr')).toBeCloseTo(101_325, 9);
  });
  it('When 1 Torr is converted, then it is 133.3224 Pa (NIST SP 811 Appendix B: 1.333 224 E+02 Pa)', () => {
    expect(toPascal(1, 'Torr')).toBeCloseTo(133.3224, 4);
  });
  it('When 1013.25 mbar are converted, then they are 101 325 Pa (1 bar = 10⁵ Pa)', () => {
    expect(toPascal(1013.25, 'mbar')).toBeCloseTo(101_325, 9);
  });
  it('When 1.5 kPa and 1500 Pa are converted, then both are 1500 Pa, and back again', () => {
    expect(toPascal(1.5, 'kPa')).toBe(1500);
    expect(toPascal(1500, 'Pa')).toBe(1500);
    expect(fromPascal(1500, 'kPa')).toBe(1.5);
  });
});

describe('temperature', () => {
  it('When 0 °C and 20 °C are converted, then they are 273.15 K and 293.15 K (SI Brochure, 9th ed.)', () => {
    expect(celsiusToKelvin(0)).toBe(273.15);
    expect(celsiusToKelvin(20)).toBeCloseTo(293.15, 12);
  });
});

describe('parseLabNumber', () => {
  it('When a field is blank, then it is not given (null)', () => {
    expect(parseLabNumber('')).toBeNull();
    expect(parseLabNumber('   ')).toBeNull();
    expect(parseLabNumber(undefined)).toBeNull();
  });
  it('When a number is typed with a point, a comma or an exponent, then it is read', () => {
    expect(parseLabNumber('1.5')).toBe(1.5);
    expect(parseLabNumber('1,5')).toBe(1.5);
    expect(parseLabNumber('-3')).toBe(-3);
    expect(parseLabNumber('2e-3')).toBe(0.002);
    expect(parseLabNumber('.5')).toBe(0.5);
  });
  it('When text is not a number, then NaN (so the form can say so), never a partial read', () => {
    expect(parseLabNumber('12 kPa')).toBeNaN();
    expect(parseLabNumber('1.2.3')).toBeNaN();
    expect(parseLabNumber('1,234,5')).toBeNaN();
    expect(parseLabNumber('abc')).toBeNaN();
  });
  it('When millimetres become metres, then the stored number is the decimal one typed (40.6 mm → 0.0406 m, no 0.0406000…04)', () => {
    // 40.6 / 1000 in binary floating point is 0.040600000000000004 (IEEE 754 double; printed by Node).
    expect(40.6 / 1000).not.toBe(0.0406);
    expect(millimetresToMetres(40.6)).toBe(0.0406);
    expect(millimetresToMetres(40.5)).toBe(0.0405);
    expect(millimetresToMetres(0.3)).toBe(0.0003);
    expect(millimetresToMetres(1234.5678)).toBe(1.2345678);
  });
});
