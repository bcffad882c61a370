import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { TimeBase } from '../../../shared/contracts/capture.ts';
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
    expect(() => findDipCandidate(v, { time: uniform(0, 1), clearLevel: 5, referenceStep: 0 })).toThrow('referenceStep must be a non-zero number');
  });
});
