import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { TimeBase } from '../../../shared/contracts/capture.ts';
import { createRandom } from '../../../shared/analysis/create-random.ts';
import { findDipCandidate } from '../../../shared/analysis/find-dip-candidate.ts';
import { findLevelCrossing } from '../../../shared/analysis/find-level-crossing.ts';
import { findTransitions } from '../../../shared/analysis/find-transitions.ts';

const uniform = (t0: number, dt: number): TimeBase => ({ kind: 'uniform', t0, dt, jitter: 0 });

describe('findLevelCrossing (IEEE 181 linear interpolation between samples)', () => {
  it('is exact on any sampled straight line (analytic: t = t₀ + (L − a)/b)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -10, max: 10, noNaN: true }),
        fc.double({ min: 0.01, max: 100, noNaN: true }),
        fc.double({ min: 0.05, max: 0.95, noNaN: true }),
        fc.constantFrom(-1, 1),
        (offset, slope, where, sign) => {
          const n = 50;
          const dt = 1e-6;
          const v = new Float64Array(n);
          for (let i = 0; i < n; i++) v[i] = offset + sign * slope * i;
          const level = offset + sign * slope * where * (n - 1);
          const c = findLevelCrossing(v, uniform(0, dt), level);
          expect(c).not.toBeNull();
          expect(Math.abs((c as { time: number }).time - where * (n - 1) * dt)).toBeLessThan(1e-9 * dt * n);
        },
      ),
      { numRuns: 200, seed: 42 },
    );
  });

  it('returns null for an empty record, one sample, or no crossing; steps over NaN gaps', () => {
    expect(findLevelCrossing(new Float64Array(0), uniform(0, 1), 0.5)).toBeNull();
    expect(findLevelCrossing(new Float64Array([1]), uniform(0, 1), 0.5)).toBeNull();
    expect(findLevelCrossing(new Float64Array([1, 2, 3]), uniform(0, 1), 5)).toBeNull();
    const gap = findLevelCrossing(new Float64Array([0, Number.NaN, Number.NaN, 3]), uniform(0, 1), 1);
    expect(gap?.time).toBeCloseTo(1, 12); // interpolated across the gap between samples 0 and 3
    const explicit: TimeBase = { kind: 'explicit', t: new Float64Array([0, 1, 3, 7]) };
    expect(findLevelCrossing(new Float64Array([0, 0, 2, 2]), explicit, 1)?.time).toBeCloseTo(2, 12);
  });
});

describe('findTransitions (IEEE 181 state-band rule)', () => {
  it('ignores chatter around the mesial level that never reaches the other state band', () => {
    // 0 → 1 → 0 pulse, plus a stretch oscillating ±0.3 around 0.5 that must not count (hysteresis).
    const v = new Float64Array(400);
    for (let i = 0; i < 400; i++) v[i] = i >= 100 && i < 200 ? 1 : 0;
    for (let i = 250; i < 300; i++) v[i] = 0.5 + (i % 2 === 0 ? 0.3 : -0.3);
    const t = findTransitions(v, uniform(0, 1), { crossLevel: 0.5, lowArm: 0.1, highArm: 0.9, low: 0, high: 1 });
    expect(t.map((x) => x.direction)).toEqual(['rising', 'falling']);
    expect(t[0].time).toBeCloseTo(99.5, 12);
    expect(t[1].time).toBeCloseTo(199.5, 12);
  });

  it('measures the 10–90 % duration of a linear edge (analytic: 0.8 of the ramp time)', () => {
    const v = new Float64Array(300);
    for (let i = 0; i < 300; i++) v[i] = Math.min(1, Math.max(0, (i - 100) / 50));
    const [rise] = findTransitions(v, uniform(0, 1e-6), { crossLevel: 0.5, lowArm: 0.1, highArm: 0.9, low: 0, high: 1 });
    expect(rise.duration).toBeCloseTo(40e-6, 12);
    expect(rise.slope).toBeCloseTo(1 / 50e-6, 3);
  });

  it('rejects a crossing level outside its band with an exact message', () => {
    expect(() => findTransitions(new Float64Array(4), uniform(0, 1), { crossLevel: 1, lowArm: 0.1, highArm: 0.9, low: 0, high: 1 })).toThrow(
      new RangeError('the crossing level must lie strictly inside the hysteresis band'),
    );
  });
});

describe('findDipCandidate', () => {
  it('reports a sustained dip and ignores a deeper single-sample spike', () => {
    const v = new Float64Array(100).fill(5);
    v[20] = 0; // spike: one sample only
    for (let i = 60; i < 70; i++) v[i] = 5 - 0.38 * 4.6;
    const c = findDipCandidate(v, { time: uniform(0, 1e-6), clearLevel: 5, referenceStep: -4.6 });
    expect(c?.depthFraction).toBeCloseTo(0.38, 12);
    expect(c?.index).toBeGreaterThanOrEqual(61);
    expect(c?.index).toBeLessThanOrEqual(68);
    // Noise-free: the span is the plateau widened by half the 9-sample mean on each side.
    expect(c?.startIndex).toBe(56);
    expect(c?.endIndex).toBe(73);
    expect(c?.depth).toBeCloseTo(0.38 * 4.6, 12);
    expect(() => findDipCandidate(v, { time: uniform(0, 1), clearLevel: 5, referenceStep: 0 })).toThrow('referenceStep must be a non-zero number');
  });

  it('a trapezoid dip in noise: span where it leaves and rejoins the noise, depth of its floor, not of its deepest sample', () => {
    // Analytic dip: ramps of 20 samples from idle 5 V down 1.2 V (floor 3.8 V) between samples 400 and 600.
    const n = 1000;
    const v = new Float64Array(n);
    const random = createRandom(3);
    for (let i = 0; i < n; i++) {
      const f = i < 400 || i > 600 ? 0 : i < 420 ? (i - 400) / 20 : i > 580 ? (600 - i) / 20 : 1;
      v[i] = 5 - 1.2 * f + 0.02 * random.normal();
    }
    // The deepest samples are a burst of noise at the trailing edge.
    v[585] = 3.2;
    v[586] = 3.25;
    v[587] = 3.2;
    const c = findDipCandidate(v, { time: uniform(0, 1e-6), clearLevel: 5, referenceStep: -4 })!;
    expect(c.noise).toBeGreaterThan(0.015);
    expect(c.noise).toBeLessThan(0.025);
    expect(c.startIndex).toBeGreaterThanOrEqual(398);
    expect(c.startIndex).toBeLessThanOrEqual(402);
    expect(c.endIndex).toBeGreaterThanOrEqual(598);
    expect(c.endIndex).toBeLessThanOrEqual(602);
    expect(Math.abs(c.depth - 1.2)).toBeLessThan(0.01);
    expect(c.depthFraction).toBeCloseTo(c.depth / 4, 12);
    // Its time is the middle of the half-depth span (400–600 → 500), not the burst at 585.
    expect(Math.abs(c.index - 500)).toBeLessThanOrEqual(3);
  });

  it('pure noise gives no dip; bad options are refused with exact messages', () => {
    const random = createRandom(4);
    const v = Float64Array.from({ length: 5000 }, () => 5 + 0.05 * random.normal());
    expect(findDipCandidate(v, { time: uniform(0, 1e-6), clearLevel: 5, referenceStep: -4 })).toBeNull();
    expect(findDipCandidate(new Float64Array(0), { time: uniform(0, 1e-6), clearLevel: 5, referenceStep: -4 })).toBeNull();
    expect(() => findDipCandidate(v, { time: uniform(0, 1), clearLevel: 5, referenceStep: -4, window: 4 })).toThrow('window must be an odd whole number of samples');
  });
});

describe('findTransitions runs through a state in a loop of its own', () => {
  it('When traces hold noise, samples between the arms and NaN, then the transitions are those of the sample-by-sample hysteresis rule', () => {
    // The rule (IEEE Std 181-2011 hysteresis), one sample at a time: in the upper state at or above highArm, in the
    // lower at or below lowArm; a change of state is a transition, its mesial instant found backwards from the
    // sample that entered the new state to the last sample still in the old one.
    const time: TimeBase = { kind: 'uniform', t0: 0, dt: 1e-6, jitter: 0 };
    const levels = { crossLevel: 0.5, lowArm: 0.2, highArm: 0.8, low: 0, high: 1 };
    const sample = fc.oneof(fc.constantFrom(0, 0.1, 0.2, 0.5, 0.8, 0.9, 1, NaN), fc.double({ min: -0.2, max: 1.2, noNaN: true }));
    fc.assert(fc.property(fc.array(sample, { minLength: 0, maxLength: 200 }), (xs) => {
      const values = Float64Array.from(xs);
      const expected: { direction: string; time: number }[] = [];
      let state = 0;
      let last = -1;
      values.forEach((v, i) => {
        const entered = v >= levels.highArm ? 1 : v <= levels.lowArm ? -1 : 0;
        if (entered === 0) return;
        if (state !== 0 && entered !== state) {
          const mesial = findLevelCrossing(values, time, levels.crossLevel, { from: last, to: i, backward: true });
          if (mesial !== null) expected.push({ direction: entered === 1 ? 'rising' : 'falling', time: mesial.time });
        }
        state = entered;
        last = i;
      });
      const got = findTransitions(values, time, levels).map((t) => ({ direction: t.direction, time: t.time }));
      expect(got).toEqual(expected);
    }), { numRuns: 500 });
  });
});
