// The plan's shortcut for rows of plain numbers (detect-capture-plan.ts, plainRowCells) must say what splitting the
// row and reading each field says (readSampleField: a number, a sentinel (NaN), or not a number), or nothing.
import { describe, expect, it } from 'vitest';
import { createRandom } from '../../../shared/analysis/create-random.ts';
import { plainRowCells } from '../../../shared/import/detect-capture-plan.ts';
import { readSampleField, type ReadSampleFieldOptions } from '../../../shared/import/read-sample-field.ts';
import { DEFAULT_NUMERIC_SENTINELS, DEFAULT_TEXT_SENTINELS } from '../../../shared/import/sample-sentinels.ts';
import { splitFields, type Delimiter } from '../../../shared/import/split-fields.ts';

const options = (over: Partial<ReadSampleFieldOptions> = {}): Required<ReadSampleFieldOptions> => ({
  decimalComma: false,
  textSentinels: new Set([...DEFAULT_TEXT_SENTINELS, '']),
  numericSentinels: new Set(DEFAULT_NUMERIC_SENTINELS),
  ...over,
});

/** What the plan's slow path makes of a line: each field read on its own. */
function cellsBySplitting(line: string, delimiter: Delimiter, o: Required<ReadSampleFieldOptions>): string[] {
  if (line.trim() === '') return [];
  return splitFields(line, delimiter).map((f) => {
    if (f.trim() === '') return 'empty';
    const v = readSampleField(f, o);
    return v === undefined ? 'text' : Number.isNaN(v) ? 'sentinel' : 'num';
  });
}

// Fields near every edge of the shortcut: digits before the point (17 and 18), exponents (19, 20, 36, 37, -9999,
// five digits), signs, bare points, SCPI's sentinels (9.9E+37, 9.91E+37), overrange, spaces, text, quotes, commas.
const FIELDS = [
  '0', '-0', '+1', '1.', '.5', '-.5', '.', '-', '+', '1e', '1e+', '1e-', '1E5', '2.5e-3', '-1.000000000e-3', '4.783753',
  '12345678901234567', '123456789012345678', '00000000000000000001', '1e19', '1e+019', '1e20', '9.99e36', '1e36', '1e37',
  '9.9E+37', '9.91E+37', '-9.9e37', '9.9e37', '1e-9999', '1e-10000', '1e00000000000000000000', '12345678901234567e19',
  '1.5 ', ' 1.5', 'NaN', 'inf', '---', '', 'ERR', '0x1F', '1,5', '"1"', '1e5.5', '1..2', '١٢', '1_000',
];

describe('plainRowCells', () => {
  it('When a row is plain numbers, then every cell is a number without splitting; otherwise it agrees with reading each field, or declines', () => {
    const random = createRandom(20261203);
    const pick = <T>(xs: readonly T[]): T => xs[Math.floor(random.uniform() * xs.length)];
    let taken = 0;
    let lines = 0;
    for (const delimiter of [',', ';', '\t'] as const) {
      const o = options();
      const plain = plainRowCells(delimiter, o);
      for (let k = 0; k < 4000; k++) {
        const width = 1 + Math.floor(random.uniform() * 4);
        // Mostly plain fields, so that whole rows of them come up often.
        const fields = Array.from({ length: width }, () => (random.uniform() < 0.7 ? pick(FIELDS.slice(0, 16)) : pick(FIELDS)));
        const line = fields.join(delimiter);
        const got = plain(line);
        lines++;
        if (got === null) continue;
        taken++;
        expect(got, line).toEqual(cellsBySplitting(line, delimiter, o));
      }
    }
    // The shortcut has to take most plain rows, or the plan is slow again: about a fifth of these lines are plain.
    expect(taken).toBeGreaterThan(lines / 10);
    expect(plainRowCells(',', options())('-1.000000000e-3,4.783753,4.756111')).toEqual(['num', 'num', 'num']);
    expect(plainRowCells('\t', options())('1e-5\t-2')).toEqual(['num', 'num']);
    for (const declined of ['9.9E+37,1', '1,9.91e37', '1e37,2', '123456789012345678,1', '1,,2', '1, 2', '1,2,', 'a,1']) {
      expect(plainRowCells(',', options())(declined), declined).toBeNull();
    }
  });

  it('When the delimiter is whitespace, the decimal a comma or a sentinel a small number, then it always declines', () => {
    expect(plainRowCells('whitespace', options())('1 2')).toBeNull();
    expect(plainRowCells(';', options({ decimalComma: true }))('1;2')).toBeNull();
    expect(plainRowCells(',', options({ numericSentinels: new Set([-1]) }))('1,2')).toBeNull();
    expect(plainRowCells(',', options({ numericSentinels: new Set([Number.NaN]) }))('1,2')).toBeNull();
  });
});
