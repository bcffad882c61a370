import { describe, expect, it } from 'vitest';
import { niceTicks, timeTicks } from '../../../shared/units/nice-ticks.ts';

const isOneTwoFive = (step: number) => {
  const mantissa = step / 10 ** Math.floor(Math.log10(step) + 1e-12);
  return [1, 2, 5].some((m) => Math.abs(mantissa - m) < 1e-9);
};

describe('niceTicks (1-2-5 steps, common practice on graticules)', () => {
  it('over many ranges: round steps, whole multiples, inside the range, covering it, at most maxTicks', () => {
    for (let k = 0; k < 2000; k++) {
      // Deterministic spread of ranges from nanoseconds to seconds, some straddling zero.
      const span = 10 ** (-9 + (k % 97) / 10);
      const from = ((k % 13) - 6) * span * 0.173;
      const to = from + span;
      const maxTicks = 5 + (k % 6);
      const { values, step } = niceTicks(from, to, { maxTicks });
      expect(isOneTwoFive(step)).toBe(true);
      expect(values.length).toBeGreaterThanOrEqual(2);
      expect(values.length).toBeLessThanOrEqual(maxTicks);
      for (const v of values) {
        expect(v).toBeGreaterThanOrEqual(from - step * 1e-6);
        expect(v).toBeLessThanOrEqual(to + step * 1e-6);
        expect(Math.abs(v / step - Math.round(v / step))).toBeLessThan(1e-6);
      }
      expect(values[0] - from).toBeLessThan(step * (1 + 1e-6));
      expect(to - values[values.length - 1]).toBeLessThan(step * (1 + 1e-6));
    }
  });

  it('a 1.2 ms trace starting before the trigger gets µs labels every 200 µs', () => {
    const t = timeTicks(-1e-4, 1.1e-3, { maxTicks: 7 });
    expect(t.unit).toBe('µs');
    expect(t.labels).toEqual(['0', '200', '400', '600', '800', '1000']);
  });

  it('sub-unit steps get just the decimals they need, and no "-0"', () => {
    expect(timeTicks(-0.5e-3, 2.6e-3, { maxTicks: 8 }).labels).toEqual(['-0.5', '0.0', '0.5', '1.0', '1.5', '2.0', '2.5']);
    expect(timeTicks(0.0123, 0.0131, { maxTicks: 5 }).labels).toEqual(['12.4', '12.6', '12.8', '13.0']);
    expect(timeTicks(0, 5, { maxTicks: 6 }).labels).toEqual(['0', '1', '2', '3', '4', '5']);
  });

  it('refuses an empty or reversed range with an exact message', () => {
    expect(() => niceTicks(1, 1)).toThrow('the range must be finite with to > from');
    expect(() => niceTicks(0, 1, { maxTicks: 1 })).toThrow('maxTicks must be a whole number of at least 2');
  });
});
