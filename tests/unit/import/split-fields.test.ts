import { describe, expect, it } from 'vitest';
import { splitFields } from '../../../shared/import/split-fields.ts';

describe('splitFields', () => {
  it('When fields are quoted, then RFC 4180 §2 rules apply (delimiters and doubled quotes inside quotes)', () => {
    // Examples written after RFC 4180 §2 rules 5-7.
    expect(splitFields('"a,b",1,"c ""d"""', ',')).toEqual(['a,b', '1', 'c "d"']);
    expect(splitFields('"x;y";2,5', ';')).toEqual(['x;y', '2,5']);
    expect(splitFields('"",""', ',')).toEqual(['', '']);
    expect(splitFields('"Time (s)","CH1 (V)",', ',')).toEqual(['Time (s)', 'CH1 (V)', '']);
    expect(splitFields('1, "2"', ',')).toEqual(['1', '2']);
  });

  it('When quotes are broken, then the text is kept so the caller can name the line', () => {
    expect(splitFields('"abc,1', ',')).toEqual(['"abc,1']);
    expect(splitFields('ab"c,1', ',')).toEqual(['ab"c', '1']);
    expect(splitFields('"a"b,1', ',')).toEqual(['ab', '1']);
  });

  it('When the delimiter is whitespace, then runs of spaces and tabs split and the ends are trimmed', () => {
    expect(splitFields('  1.5 \t 2.5   3.5 ', 'whitespace')).toEqual(['1.5', '2.5', '3.5']);
    expect(splitFields('   ', 'whitespace')).toEqual([]);
  });
});
