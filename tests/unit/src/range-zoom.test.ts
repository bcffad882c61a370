// The range arithmetic behind wheel and keyboard zoom on the shot page's traces and the compare view's plots
// (src/lib/range-zoom.ts). Ranges are small round numbers so each expected value can be worked by hand; the unit
// (seconds) does not matter to the arithmetic.
import { describe, expect, it } from 'vitest';
import { clampToRecord, instantAt, MIN_SPAN, panBy, rangeKeyAction, wheelFactor, zoomAround } from '../../../src/lib/range-zoom.ts';

const close = (actual: { from: number; to: number } | null, from: number, to: number) => {
  expect(actual).not.toBeNull();
  expect(actual!.from).toBeCloseTo(from, 12);
  expect(actual!.to).toBeCloseTo(to, 12);
};

describe('zoomAround', () => {
  it('When no centre is given, then the range scales about its middle', () => {
    // 2..10: middle 6, half-span 4. Factor 0.5: 6 ∓ 4 × 0.5 = 4..8. Factor 2: 6 ∓ 4 × 2 = −2..14.
    expect(zoomAround({ from: 2, to: 10 }, 0.5)).toEqual({ from: 4, to: 8 });
    expect(zoomAround({ from: 2, to: 10 }, 2)).toEqual({ from: -2, to: 14 });
  });

  it('When zooming about an off-centre instant, then that instant stays at the same place across the range', () => {
    // 2..10 about 4 by 0.8: from 4 − (4 − 2) × 0.8 = 2.4, to 4 + (10 − 4) × 0.8 = 8.8.
    // 4 sat a quarter of the way in before ((4 − 2) / 8) and after ((4 − 2.4) / 6.4 = 0.25).
    const r = zoomAround({ from: 2, to: 10 }, 0.8, 4);
    close(r, 2.4, 8.8);
    expect((4 - r.from) / (r.to - r.from)).toBeCloseTo(0.25, 12);
  });

  it('When one wheel step in is followed by one out at the same instant, then the range is back where it was', () => {
    // 2.4..8.8 about 4 by 1.25: from 4 − 1.6 × 1.25 = 2, to 4 + 4.8 × 1.25 = 10.
    const inward = zoomAround({ from: 2, to: 10 }, wheelFactor(-1), 4);
    close(zoomAround(inward, wheelFactor(1), 4), 2, 10);
  });
});

describe('panBy', () => {
  it('When there is no record to stay inside, then the range moves by the fraction of its span', () => {
    // 2..10, span 8: 0.2 × 8 = 1.6 later → 3.6..11.6; 1.6 earlier → 0.4..8.4.
    close(panBy({ from: 2, to: 10 }, 0.2), 3.6, 11.6);
    close(panBy({ from: 2, to: 10 }, -0.2), 0.4, 8.4);
  });

  it('When the move would leave the record, then the range stops at its edge and keeps its span', () => {
    // Record 0..11. Later: from 3.6 is past 11 − 8 = 3 → 3..11. Earlier from 1..9: 1 − 1.6 = −0.6 is before 0 → 0..8.
    close(panBy({ from: 2, to: 10 }, 0.2, { from: 0, to: 11 }), 3, 11);
    close(panBy({ from: 1, to: 9 }, -0.2, { from: 0, to: 11 }), 0, 8);
    // Inside the record it moves freely: 2 − 1.6 = 0.4 ≥ 0 → 0.4..8.4.
    close(panBy({ from: 2, to: 10 }, -0.2, { from: 0, to: 11 }), 0.4, 8.4);
  });
});

describe('clampToRecord', () => {
  const record = { from: 0, to: 100 };

  it('When the range lies inside the record, then it is kept as it is', () => {
    expect(clampToRecord({ from: 10, to: 20 }, record)).toEqual({ from: 10, to: 20 });
  });

  it('When the range starts before the record, then it starts at the record and keeps its span', () => {
    // −5..20, span 25: from max(0, −5) = 0, to min(100, 0 + 25) = 25.
    expect(clampToRecord({ from: -5, to: 20 }, record)).toEqual({ from: 0, to: 25 });
  });

  it('When the range ends after the record, then it is cut at the record end', () => {
    // 90..120: from 90, to min(100, 90 + 30) = 100.
    expect(clampToRecord({ from: 90, to: 120 }, record)).toEqual({ from: 90, to: 100 });
  });

  it('When the range is narrower than a few nanoseconds, then it is widened to the narrowest allowed', () => {
    // 10..10 + 1e-12: span max(1e-12, 1e-9) = 1e-9 → 10..10 + 1e-9.
    const r = clampToRecord({ from: 10, to: 10 + 1e-12 }, record);
    expect(MIN_SPAN).toBe(1e-9);
    expect(r!.from).toBe(10);
    expect(r!.to - r!.from).toBeCloseTo(1e-9, 15);
  });

  it('When what is left covers 99.9 % of the record or more, then it is null (not zoomed)', () => {
    // −10..110 → 0..100, the whole record. 0.05..100 covers 99.95 ≥ 99.9. 0.2..100 covers 99.8 < 99.9: kept.
    expect(clampToRecord({ from: -10, to: 110 }, record)).toBeNull();
    expect(clampToRecord({ from: 0.05, to: 100 }, record)).toBeNull();
    expect(clampToRecord({ from: 0.2, to: 100 }, record)).toEqual({ from: 0.2, to: 100 });
  });
});

describe('wheel over a plot', () => {
  it('When the pointer is a quarter of the way across the plot area, then the instant under it is a quarter into the range', () => {
    // Plot area 100..300 px; pointer at 150 px is (150 − 100) / 200 = 0.25 across; 2 + 0.25 × 8 = 4.
    expect(instantAt({ from: 2, to: 10 }, 150, { left: 100, width: 200 })).toBe(4);
    expect(instantAt({ from: 2, to: 10 }, 300, { left: 100, width: 200 })).toBe(10);
  });

  it('When the wheel rolls away from the user, then it zooms in; towards the user, out', () => {
    expect(wheelFactor(-120)).toBe(0.8);
    expect(wheelFactor(120)).toBe(1.25);
  });

  it('When zooming out near the record start, then the result is clamped into the record', () => {
    // 1..9 about 1 by 1.25: from 1 − 0 × 1.25 = 1, to 1 + 8 × 1.25 = 11; record 0..10 cuts it to 1..10.
    close(clampToRecord(zoomAround({ from: 1, to: 9 }, wheelFactor(1), 1), { from: 0, to: 10 }), 1, 10);
  });
});

describe('rangeKeyAction', () => {
  it('When + or − (or their unshifted keys) is pressed, then it zooms in by half or out by double', () => {
    expect(rangeKeyAction('+')).toEqual({ zoom: 0.5 });
    expect(rangeKeyAction('=')).toEqual({ zoom: 0.5 });
    expect(rangeKeyAction('-')).toEqual({ zoom: 2 });
    expect(rangeKeyAction('_')).toEqual({ zoom: 2 });
  });

  it('When an arrow key is pressed, then it pans a fifth of the range that way', () => {
    expect(rangeKeyAction('ArrowLeft')).toEqual({ pan: -0.2 });
    expect(rangeKeyAction('ArrowRight')).toEqual({ pan: 0.2 });
  });

  it('When 0 or Esc is pressed, then it resets; other keys do nothing', () => {
    expect(rangeKeyAction('0')).toBe('reset');
    expect(rangeKeyAction('Escape')).toBe('reset');
    expect(rangeKeyAction('a')).toBeNull();
    expect(rangeKeyAction('ArrowUp')).toBeNull();
  });
});
