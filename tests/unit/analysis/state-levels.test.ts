import { describe, expect, it } from 'vitest';
import { stateLevels } from '../../../shared/analysis/state-levels.ts';

// x = square(t) + cos(t), t = linspace(0, 20π, 100); square(t) = +1 where (t mod 2π) < π, else −1.
function octaveExample(): Float64Array {
  const x = new Float64Array(100);
  for (let i = 0; i < 100; i++) {
    const t = (20 * Math.PI * i) / 99;
    x[i] = (t % (2 * Math.PI) < Math.PI ? 1 : -1) + Math.cos(t);
  }
  return x;
}

describe('stateLevels (IEEE Std 181-2011 histogram method)', () => {
  // Reference values: GNU Octave signal package `statelevels`, as quoted in DOMAIN.md (reproduced independently to 1e-4).
  it('matches Octave statelevels with 100 bins, mode: [−1.9795, 1.9800]', () => {
    const s = stateLevels(octaveExample(), { bins: 100, method: 'mode' });
    expect(s.low).toBeCloseTo(-1.9795, 4);
    expect(s.high).toBeCloseTo(1.98, 4);
  });
  it('matches Octave statelevels with 50 bins, mode: [−1.9595, 1.9600]', () => {
    const s = stateLevels(octaveExample(), { bins: 50, method: 'mode' });
    expect(s.low).toBeCloseTo(-1.9595, 4);
    expect(s.high).toBeCloseTo(1.96, 4);
  });
  it('matches Octave statelevels with 100 bins, mean: [−1.0090, 0.9532]', () => {
    const s = stateLevels(octaveExample(), { bins: 100, method: 'mean' });
    expect(s.low).toBeCloseTo(-1.009, 4);
    expect(s.high).toBeCloseTo(0.9532, 4);
  });

  it('skips NaN samples and finds the two levels of a clean step to within a bin (analytic)', () => {
    const v = new Float64Array(1000);
    for (let i = 0; i < 1000; i++) v[i] = i < 700 ? 5 : 0;
    v[10] = Number.NaN;
    v[900] = Number.NaN;
    const s = stateLevels(v);
    expect(s.finiteCount).toBe(998);
    expect(Math.abs(s.low - 0)).toBeLessThan(0.05);
    expect(Math.abs(s.high - 5)).toBeLessThan(0.05);
  });

  it('keeps both states apart despite one huge spike when trimming (the plain method puts both in one half)', () => {
    const v = new Float64Array(10000);
    for (let i = 0; i < 10000; i++) v[i] = i % 10 < 3 ? 0 : 5;
    v[5000] = 40;
    const plain = stateLevels(v);
    expect(plain.high).toBeGreaterThan(30); // the failure the trim exists for
    const trimmed = stateLevels(v, { trimFraction: 0.001 });
    expect(Math.abs(trimmed.low)).toBeLessThan(0.05);
    expect(Math.abs(trimmed.high - 5)).toBeLessThan(0.05);
  });

  it('never trims a short but dense state: a 0.13 % blocked state in a 3-million-sample record (subsampled)', () => {
    // Like a 131 µs pulse in a 0.1 s record: the blocked state is rare but every one of its samples is real.
    const n = 3_000_000;
    const v = new Float64Array(n);
    let seed = 1;
    const noise = () => {
      seed = (seed * 16807) % 2147483647; // Park–Miller minimal standard generator, uniform noise ±0.02 V
      return 0.04 * (seed / 2147483647 - 0.5);
    };
    for (let i = 0; i < n; i++) v[i] = (i >= 1_000_000 && i < 1_003_900 ? 0.2 : 4.8) + noise();
    const s = stateLevels(v, { trimFraction: 0.01 });
    expect(s.stride).toBe(3);
    expect(Math.abs(s.low - 0.2)).toBeLessThan(0.05);
    expect(Math.abs(s.high - 4.8)).toBeLessThan(0.05);
  });

  it('When a deep record is subsampled, then the levels are those of every stride-th sample taken alone (NaN and ±Infinity among them)', () => {
    const n = 250_003;
    const v = new Float64Array(n);
    for (let i = 0; i < n; i++) v[i] = (i % 5000 < 700 ? 0.3 : 4.6) + 0.01 * Math.sin(i * 0.37);
    v[2 * 7] = Number.NaN; // examined (a multiple of the stride, 2)
    v[2 * 11] = Number.POSITIVE_INFINITY;
    v[2 * 13] = Number.NEGATIVE_INFINITY;
    v[2 * 17 + 1] = 1e9; // not examined: must not stretch the histogram
    for (const trimFraction of [0, 0.01]) {
      const deep = stateLevels(v, { trimFraction, maxSamples: 100_000 });
      expect(deep.stride).toBe(2);
      const every = v.filter((_, i) => i % deep.stride === 0);
      const alone = stateLevels(every, { trimFraction, maxSamples: 0 });
      expect({ ...deep, stride: 1 }).toEqual(alone);
    }
  });

  it('trims many isolated spikes of random height (0.5 % of the samples)', () => {
    const v = new Float64Array(20000);
    for (let i = 0; i < v.length; i++) v[i] = i % 10 < 3 ? 0 : 5;
    for (let k = 0; k < 100; k++) v[(k * 7919) % v.length] = 5 + 40 * (((k * 37) % 100) / 100);
    expect(stateLevels(v).low).toBeGreaterThan(4); // untrimmed, both states fall into the lower half
    const s = stateLevels(v, { trimFraction: 0.01 });
    expect(Math.abs(s.low)).toBeLessThan(0.05);
    expect(Math.abs(s.high - 5)).toBeLessThan(0.05);
  });

  it('rejects records without two finite samples and bad options with exact messages', () => {
    expect(() => stateLevels(new Float64Array([Number.NaN, 1]))).toThrow(new RangeError('state levels need at least 2 finite samples'));
    expect(() => stateLevels(new Float64Array(4), { bins: 1 })).toThrow(new RangeError('bins must be an integer ≥ 2'));
  });
});
