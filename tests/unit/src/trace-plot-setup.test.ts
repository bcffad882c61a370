// The vertical range and the window columns that the shot's trace plots and the comparison share. Expected values
// are worked by hand from the stated rules (12 % of the step around the levels, 8 % of the data span without them).
import { describe, expect, it } from 'vitest';
import { levelsRange, windowColumns } from '../../../src/lib/trace-plot-setup.ts';

describe('levelsRange', () => {
  it('When levels 0.2 V and 4.8 V are known, then the range is padded by 12 % of the 4.6 V step (0.552 V)', () => {
    const [lo, hi] = levelsRange({ low: 0.2, high: 4.8 }, 0.21, 4.79);
    expect(lo).toBeCloseTo(-0.352, 12);
    expect(hi).toBeCloseTo(5.352, 12);
  });
  it('When a spike reaches past the padded levels, then the range still holds it', () => {
    expect(levelsRange({ low: 0.2, high: 4.8 }, -2, 9)).toEqual([-2, 9]);
  });
  it('When there are no levels (or a flat channel), then the data span is padded by 8 %, and 0.1 V when flat', () => {
    const [lo, hi] = levelsRange(null, 1, 3);
    expect(lo).toBeCloseTo(0.84, 12);
    expect(hi).toBeCloseTo(3.16, 12);
    expect(levelsRange({ low: 2, high: 2 }, 2, 2)).toEqual([1.9, 2.1]);
  });
});

describe('windowColumns', () => {
  it('When the window is min/max columns, then x is each column\'s middle, shifted by the offset', () => {
    const w = { raw: false as const, t0: 1e-3, dt: 2e-6, min: [0, 1], max: [2, 3], channel: { name: 'A', unit: 'V' } };
    const [xs, lo, hi] = windowColumns(w, 1e-3);
    expect(xs[0]).toBeCloseTo(1e-6, 15);
    expect(xs[1]).toBeCloseTo(3e-6, 15);
    expect([lo, hi]).toEqual([[0, 1], [2, 3]]);
  });
  it('When the window holds raw samples, then each sample is both min and max', () => {
    const w = { raw: true as const, t: [0, 1e-7], v: [0.5, null], channel: { name: 'A', unit: 'V' } };
    expect(windowColumns(w)).toEqual([[0, 1e-7], [0.5, null], [0.5, null]]);
  });
});
