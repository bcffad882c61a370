import { describe, expect, it } from 'vitest';
import { formatBytes } from '../../../shared/units/format-bytes.ts';

describe('formatBytes', () => {
  it('When given sizes across the prefixes, then it uses SI decimal prefixes (1 kB = 1000 bytes, BIPM SI Brochure §3) with three digits', () => {
    expect(formatBytes(0)).toBe('0 bytes');
    expect(formatBytes(999)).toBe('999 bytes');
    expect(formatBytes(1000)).toBe('1.00 kB');
    expect(formatBytes(10_000)).toBe('10.0 kB');
    expect(formatBytes(999_400)).toBe('999 kB');
    expect(formatBytes(999_600)).toBe('1.00 MB');
    expect(formatBytes(50 * 1024 ** 3)).toBe('53.7 GB');
  });

  it('When the count is negative or not a number, then it throws RangeError', () => {
    expect(() => formatBytes(-1)).toThrow(new RangeError('bytes must be a finite number of 0 or more'));
    expect(() => formatBytes(Number.NaN)).toThrow(RangeError);
  });
});
