// The export's rounding of a value to its uncertainty (server/modules/exports/to-csv.ts roundedPair), worked by hand
// from the rule of GUM, JCGM 100:2008 §7.2.6: the uncertainty to at most two significant digits, the value rounded
// to the same decimal place. Each expected cell below is worked out by hand, not read from the code.
import { describe, expect, it } from 'vitest';
import { csvCell, plainNumber, roundedPair, toCsv } from '../../../server/modules/exports/to-csv.ts';

const cells = (v: number | null, u: number | null) => roundedPair(v, u).map(csvCell);

describe('roundedPair', () => {
  it('When a speed has an uncertainty, then U keeps two significant digits and the speed the same decimal place', () => {
    expect(cells(287.3456, 1.5678)).toEqual(['287.3', '1.6']); // U 1.5678 → 1.6 (0.1 place); 287.3456 → 287.3
    expect(cells(412.3712938, 0.4213)).toEqual(['412.37', '0.42']); // U → 0.42 (0.01 place)
    expect(cells(95.5671, 0.0996)).toEqual(['95.57', '0.10']); // 0.0996 → 0.10: rounding up moved the place; trailing zero kept
    expect(cells(1234.5, 56.7)).toEqual(['1235', '57']); // U → 57 (units); 1234.5 → 1235 (half away from zero)
    expect(cells(5012, 1234)).toEqual(['5000', '1200']); // U → 1200 (hundreds); 5012 → 5000
    expect(cells(300, 2.1)).toEqual(['300.0', '2.1']); // a known trailing zero is written
  });

  it('When the value is negative, then the CSV gets a plain ASCII minus and stays a number (no formula quote)', () => {
    expect(cells(-5.4321, 0.0123)).toEqual(['-5.432', '0.012']);
    expect(toCsv(['v', 'u'], [roundedPair(-5.4321, 0.0123)])).toBe('\uFEFFv,u\r\n-5.432,0.012\r\n');
  });

  it('When there is no usable uncertainty, then the value keeps six significant digits and the U cell stays empty', () => {
    expect(cells(0.000123456789, null)).toEqual(['0.000123457', '']);
    expect(cells(12.0, null)).toEqual(['12', '']);
    expect(cells(187.654321, 0)).toEqual(['187.654', '0']);
    expect(cells(null, null)).toEqual(['', '']);
    expect(plainNumber(Number.NaN)).toBeNull();
  });

  it('When something not a plain decimal is written as one, then it is refused instead of written', () => {
    expect(() => csvCell({ decimal: '=1+2' })).toThrow('not a plain decimal number: "=1+2"');
  });
});
