import { describe, expect, it } from 'vitest';
import { ImportError } from '../../../shared/import/import-error.ts';
import { parseScopeCsv } from '../../../shared/import/parse-scope-csv.ts';

const bytes = (text: string) => new TextEncoder().encode(text);

function importError(text: string | Uint8Array, options = {}): ImportError {
  try {
    parseScopeCsv(typeof text === 'string' ? bytes(text) : text, options);
  } catch (error) {
    expect(error).toBeInstanceOf(ImportError);
    return error as ImportError;
  }
  throw new Error('expected an ImportError');
}

/** Rows of time, CH1, CH2 with time i µs. */
function rows(n: number, from = 0): string {
  let out = '';
  for (let i = from; i < from + n; i++) out += `${i}e-6,${(i % 7) / 10},${(i % 5) / 10}\n`;
  return out;
}

describe('parseScopeCsv errors a person can act on', () => {
  it('When the file is empty or only blank lines, then it says so', () => {
    expect(importError('').message).toBe('the file is empty: there is no text in it');
    expect(importError('\n\r\n  \n').message).toBe('the file is empty: there is no text in it');
  });

  it('When the file is binary, then it says so and where the first zero byte is', () => {
    const data = new Uint8Array(200).map((_, i) => (i * 37) % 256);
    const e = importError(data);
    expect(e.message).toMatch(/binary data \(a zero byte at offset 0\)/);
    expect(e.line).toBe(1);
  });

  it('When there is a header and no rows, then it names the header line', () => {
    const e = importError('Lab,Hollowmere Ballistics Lab\nTime (s),CH1 (V),CH2 (V)\n');
    expect(e.message).toBe('line 2: the header has no rows of samples after it');
  });

  it('When there is one row, then it asks for at least two', () => {
    expect(importError('Time (s),CH1 (V)\n0,1.5\n').message).toBe('line 2: the file holds only one row of samples; at least two are needed for a time base');
  });

  it('When a field deep in the file is text, then the line number is written with thousands separators', () => {
    const text = `Time (s),CH1 (V),CH2 (V)\n${rows(2039)}2039e-6,ERR,0.1\n${rows(10, 2040)}`;
    const e = importError(text);
    expect(e.message).toBe("line 2,041: expected 3 numbers, found 'ERR'");
    expect(e.line).toBe(2041);
    expect(e.reason).toBe("expected 3 numbers, found 'ERR'");
  });

  it('When the junk is on the third row, then it is an error there, not a preamble', () => {
    expect(importError(`t,a\n0,1\n1,2\nbad,3\n${'2,3\n'.repeat(0)}3,4\n4,5\n5,6\n`).message).toBe("line 4: expected 2 numbers, found 'bad'");
    expect(importError('1,2\nERR,3\n4,5\n6,7\n8,9\n').message).toBe("line 2: expected 2 numbers, found 'ERR'");
  });

  it('When times go backwards or repeat, then it names the line', () => {
    expect(importError(`t,a\n0,1\n2e-6,2\n1e-6,3\n3e-6,4\n`).message).toBe('line 4: the time 1e-6 is earlier than the previous time (times must increase)');
    // A repeated time is printed too coarsely when the times never go back; without an interval it is refused.
    expect(importError(`t,a\n0,1\n1e-6,2\n1e-6,3\n3e-6,4\n`).message).toBe('line 4: the printed times are too coarse for the sample interval: this row repeats the time of the row before it, and the file states no sample interval to rebuild them from; give the sample interval (the "Fix how it is read" form on the shot page, or --dt for the command line)');
  });

  it('When a row is short or long, then it names the line and what it found', () => {
    expect(importError(`t,a,b\n${rows(5)}5e-6,0.1\n${rows(3, 6)}`).message).toBe('line 7: expected 3 numbers, found 2 fields (a short row)');
    expect(importError(`t,a,b\n${rows(5)}5e-6,0.1,0.2,0.3\n${rows(3, 6)}`).message).toBe("line 7: expected 3 columns as in the rows above, found 4 (extra value '0.3')");
  });

  it('When the time is a sentinel, then it refuses the row rather than inventing a time', () => {
    expect(importError(`t (s),a\n0,1\n1,2\nNaN,3\n3,4\n`).message).toBe("line 4: the time is 'NaN', not a number; every row needs a valid time");
  });

  it('When there is no time column and no sample interval, then it asks for dt', () => {
    expect(importError('CH1\n0.1\n0.2\n0.3\n').message).toBe('line 2: there is no time column and the file gives no sample interval; give dt (seconds) in the import options');
  });

  it('When a sample index skips, then it names the line', () => {
    expect(importError('Index,CH1\n0,1\n1,2\n3,3\n4,4\n', { dt: 1e-6 }).message).toBe('line 4: the sample index 3 does not follow 1 (indices must count up by one)');
  });

  it('When the text is not a capture at all, then it says so', () => {
    expect(importError('Dear lab,\nplease find the results attached.\nRegards\n').message)
      .toBe('line 3: no rows of numbers were found; this does not look like an oscilloscope CSV export');
  });

  it('When the time unit is not a unit of time, then it asks for timeUnit', () => {
    expect(importError('Time (V),CH1 (V)\n0,1\n1,2\n2,3\n').message).toBe("line 1: the time column's unit 'V' is not a unit of time; give timeUnit in the options");
  });

  it('When options contradict the file, then they throw TypeError/RangeError with exact messages', () => {
    expect(() => parseScopeCsv('x' as unknown as Uint8Array)).toThrow(new TypeError('bytes must be a Uint8Array'));
    expect(() => parseScopeCsv(bytes('t,a\n0,1\n1,2\n'), { precision: 'float16' as 'float32' })).toThrow(new RangeError("precision must be 'float64' or 'float32'"));
    expect(() => parseScopeCsv(bytes('t (s),a\n0,1\n1,2\n'), { channelNames: ['A', 'B'] })).toThrow(new RangeError('channelNames has 2 names for 1 channels'));
    expect(() => parseScopeCsv(bytes('t (s),a\n0,1\n1,2\n'), { timeColumn: 5 })).toThrow(new RangeError('timeColumn 5 is not a column of numbers (numeric columns: 0, 1)'));
  });
});
