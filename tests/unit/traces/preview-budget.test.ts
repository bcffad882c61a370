import { describe, expect, it } from 'vitest';
import { PREVIEW_MEMORY_BYTES, previewBytes } from '../../../shared/traces/preview-budget.ts';

describe('previewBytes', () => {
  it('When records of 10 million samples are previewed, then two channels fit a 500 MB tab and three do not', () => {
    expect(PREVIEW_MEMORY_BYTES).toBe(500e6);
    expect(previewBytes(10_000_000, 2, false)).toBe(400e6);
    expect(previewBytes(10_000_000, 2, false)).toBeLessThanOrEqual(PREVIEW_MEMORY_BYTES);
    expect(previewBytes(10_000_000, 3, false)).toBeGreaterThan(PREVIEW_MEMORY_BYTES);
  });

  it('When the time base is uneven, then its Float64 times count too', () => {
    expect(previewBytes(1_000_000, 1, true) - previewBytes(1_000_000, 1, false)).toBe(8e6);
  });
});
