import { describe, expect, it } from 'vitest';
import { simulateShot } from '../../../shared/simulate/simulate-shot.ts';

/** First crossing of `level` after sample `from`, linearly interpolated; written here independently of the engine. */
function crossing(values: Float64Array, t0: number, dt: number, level: number, from = 0): number {
  for (let i = from + 1; i < values.length; i++) {
    const a = values[i - 1] - level;
    const b = values[i] - level;
    if ((a > 0 && b <= 0) || (a < 0 && b >= 0)) return t0 + (i - 1 + a / (a - b)) * dt;
  }
  return Number.NaN;
}

describe('simulateShot', () => {
  it('puts the mesial instants where the chord ends pass the beam centre (analytic kinematics)', () => {
    // Constant speed: entry = arrival − R/v, exit = arrival + R/v; next gate L/v later.
    const shot = simulateShot({ speed: 250, gatePositions: [0, 0.2], arrivalTime: 2e-4, length: 20000 });
    const [g1, g2] = shot.truth.gates;
    expect(g1.entry).toBeCloseTo(2e-4 - 0.02 / 250, 12);
    expect(g1.exit).toBeCloseTo(2e-4 + 0.02 / 250, 12);
    expect(g2.centre - g1.centre).toBeCloseTo(0.2 / 250, 12);
    // The 50 % crossings of the clean trace fall on those instants (strip beam: linear ramp, exact to rounding).
    const mid = (4.8 + 0.2) / 2;
    const v = shot.channels[0].values;
    const entry = crossing(v, shot.time.t0, shot.time.dt, mid);
    const exit = crossing(v, shot.time.t0, shot.time.dt, mid, Math.ceil((entry - shot.time.t0) / shot.time.dt) + 1);
    expect(entry).toBeCloseTo(g1.entry, 10);
    expect(exit).toBeCloseTo(g1.exit, 10);
    expect(crossing(shot.channels[1].values, shot.time.t0, shot.time.dt, mid)).toBeCloseTo(g2.entry, 10);
  });

  it('shortens the blocked time by the chord 2√(R² − b²) for an off-centre beam (DOMAIN.md: b = 5 mm on 40 mm, −3.2 %)', () => {
    const shot = simulateShot({ beamOffset: 0.005, gatePositions: [0] });
    const g = shot.truth.gates[0];
    expect(g.chord).toBeCloseTo(2 * Math.sqrt(0.02 ** 2 - 0.005 ** 2), 12);
    expect(g.chord / 0.04 - 1).toBeCloseTo(-0.032, 3);
    expect((g.exit - g.entry) * 300).toBeCloseTo(g.chord, 10);
  });

  it('follows constant deceleration: v² = v₀² − 2a·Δx between gates', () => {
    const shot = simulateShot({ speed: 300, deceleration: 2e4, gatePositions: [0, 0.1, 0.2], length: 12000 });
    for (const g of shot.truth.gates) expect(g.speed ** 2).toBeCloseTo(300 ** 2 - 2 * 2e4 * g.position, 6);
  });

  it('delays a step through a first-order sensor by τ·ln 2 at the 50 % level (first-order step response)', () => {
    // A narrow beam makes the optical edge nearly a step (0.1 mm at 300 m/s = 0.33 µs) so the lag is τ ln 2.
    const tau = 1e-5;
    const shot = simulateShot({ gatePositions: [0], beamWidth: 1e-4, responseTime: tau, sampleInterval: 1e-8, length: 30000, t0: 0 });
    const g = shot.truth.gates[0];
    const entry = crossing(shot.channels[0].values, 0, 1e-8, 2.5);
    expect(entry - g.entry).toBeCloseTo(tau * Math.LN2, 7);
  });

  it('reproduces the same capture from the same seed and adds noise of the requested RMS', () => {
    const a = simulateShot({ noiseRms: 0.05, gatePositions: [0], arrivalTime: 1, length: 50000, seed: 7 });
    const b = simulateShot({ noiseRms: 0.05, gatePositions: [0], arrivalTime: 1, length: 50000, seed: 7 });
    const c = simulateShot({ noiseRms: 0.05, gatePositions: [0], arrivalTime: 1, length: 50000, seed: 8 });
    expect(a.channels[0].values).toEqual(b.channels[0].values);
    expect(a.channels[0].values).not.toEqual(c.channels[0].values);
    // The ball arrives after the record ends: all clear level, so the sample SD is the noise RMS (±2 % for 50 000 draws).
    const v = a.channels[0].values;
    let s = 0;
    let s2 = 0;
    for (const x of v) {
      s += x;
      s2 += x * x;
    }
    const sd = Math.sqrt(s2 / v.length - (s / v.length) ** 2);
    expect(sd).toBeGreaterThan(0.049);
    expect(sd).toBeLessThan(0.051);
  });

  it('wires several gates to one channel and inverts for rising polarity', () => {
    const shot = simulateShot({ gatePositions: [0, 0.1], gateChannels: [0, 0], polarity: 'rising' });
    expect(shot.channels).toHaveLength(1);
    const v = shot.channels[0].values;
    const first = crossing(v, shot.time.t0, shot.time.dt, 2.5);
    expect(v[0]).toBeCloseTo(0.2, 12);
    expect(first).toBeCloseTo(shot.truth.gates[0].entry, 10);
  });

  it('reduces the dip of a weak gate to the requested depth', () => {
    const shot = simulateShot({ gatePositions: [0], dipDepth: 0.38 });
    let min = Infinity;
    for (const x of shot.channels[0].values) min = Math.min(min, x);
    expect(min).toBeCloseTo(4.8 - 0.38 * 4.6, 10);
  });

  it('rejects impossible set-ups with a message naming the option', () => {
    expect(() => simulateShot({ speed: -1 })).toThrow(new RangeError('speed must be positive'));
    expect(() => simulateShot({ beamOffset: 0.03 })).toThrow('beamOffset must be smaller than the projectile radius');
    expect(() => simulateShot({ gatePositions: [0.1, 0] })).toThrow('gatePositions must increase');
    expect(() => simulateShot({ speed: 10, deceleration: 1000, gatePositions: [0, 1] })).toThrow('the projectile stops before reaching 1 m');
  });
});
