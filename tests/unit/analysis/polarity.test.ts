// Polarity "auto" of one channel (measureChannel). The rule is common practice, with no published source: a record
// armed before the projectile arrives starts and ends with the beam clear; when it does not (cut inside a pulse, a
// noise-only trace), the state the trace spends more time in is taken as clear. Traces are written out by hand.
import { describe, expect, it } from 'vitest';
import { measureChannel } from '../../../shared/analysis/measure-channel.ts';

/** Runs of constant level: [volts, samples], plus a small alternating ripple so each state has a spread. */
const trace = (...runs: [number, number][]): Float64Array => {
  const out: number[] = [];
  for (const [v, n] of runs) for (let i = 0; i < n; i++) out.push(v + (i % 2 === 0 ? 0.01 : -0.01));
  return Float64Array.from(out);
};

describe('measureChannel polarity "auto"', () => {
  it('When the beam is blocked (low) for 60 % of a record that starts and ends high, then the polarity is falling', () => {
    expect(measureChannel(trace([5, 300], [0.2, 600], [5, 100])).polarity).toBe('falling');
  });

  it('When the beam is blocked (high) for 60 % of a record that starts and ends low, then the polarity is rising', () => {
    expect(measureChannel(trace([0.2, 300], [5, 600], [0.2, 100])).polarity).toBe('rising');
  });

  it('When a short pulse sits in a long record, then both rules agree (the usual case)', () => {
    expect(measureChannel(trace([5, 450], [0.2, 100], [5, 450])).polarity).toBe('falling');
    expect(measureChannel(trace([0.2, 450], [5, 100], [0.2, 450])).polarity).toBe('rising');
  });

  it('When the record is cut inside a pulse (starts high, ends low), then the more populated state is the clear one', () => {
    expect(measureChannel(trace([5, 700], [0.2, 300])).polarity).toBe('falling');
    expect(measureChannel(trace([5, 300], [0.2, 700])).polarity).toBe('rising');
  });

  it('When a spike sits on the first sample, then the median of the first samples still reads the state', () => {
    const t = trace([5, 300], [0.2, 600], [5, 100]);
    t[0] = 0.2;
    t[1] = 0.2;
    expect(measureChannel(t).polarity).toBe('falling');
  });

  it('When the analyst sets the polarity, then it is kept whatever the record looks like', () => {
    expect(measureChannel(trace([5, 300], [0.2, 600], [5, 100]), { polarity: 'rising' }).polarity).toBe('rising');
  });
});
