import { describe, expect, it } from 'vitest';
import type { MeasurementModel } from '../../../shared/analysis/measurement-model.ts';
import { propagateMonteCarlo } from '../../../shared/analysis/propagate-monte-carlo.ts';
import { propagateUncertainty } from '../../../shared/analysis/propagate-uncertainty.ts';
import { speedOfSound } from '../../../shared/analysis/speed-of-sound.ts';
import { fitConstantDeceleration } from '../../../shared/analysis/fit-constant-deceleration.ts';

/** v = L/(t₂ − t₁): L = 0.1000 m ± 0.5 mm rectangular, t = 300.0 µs, both instants quantized by Δt_s = 1 µs. */
function workedExample(): MeasurementModel {
  return {
    inputs: [
      { name: 'L', group: 'gate spacing', value: 0.1, standardUncertainty: 0.0005 / Math.sqrt(3), distribution: 'rectangular' },
      // Resolution δ → u = δ/√12 (GUM F.2.2.1) for each instant; their difference then has u = Δt_s/√6.
      { name: 't1', group: 'quantization', value: 0, standardUncertainty: 1e-6 / Math.sqrt(12), distribution: 'rectangular' },
      { name: 't2', group: 'quantization', value: 300e-6, standardUncertainty: 1e-6 / Math.sqrt(12), distribution: 'rectangular' },
    ],
    evaluate: (x) => x[0] / (x[2] - x[1]),
  };
}

describe('GUM law of propagation (JCGM 100:2008 §5.1.2 eq. 10)', () => {
  // Worked check from DOMAIN.md (computed independently): v = 333.333 m/s, u_rel = 3.1914e-3, u = 1.0638 m/s, U(k=2) = 2.128 m/s.
  it('reproduces the worked example U = 2.128 m/s', () => {
    const r = propagateUncertainty(workedExample());
    expect(r.value).toBeCloseTo(333.333, 3);
    expect(r.standardUncertainty / r.value).toBeCloseTo(3.1914e-3, 7);
    expect(r.standardUncertainty).toBeCloseTo(1.0638, 4);
    expect(2 * r.standardUncertainty).toBeCloseTo(2.128, 3);
    // Budget: spacing (u_rel 2.887e-3) dominates quantization (1.361e-3): shares 8.333/10.185 and 1.852/10.185.
    expect(r.budget[0].group).toBe('gate spacing');
    expect(r.budget[0].share).toBeCloseTo(8.3333 / 10.1852, 3);
    expect(r.budget[1].share).toBeCloseTo(1.8519 / 10.1852, 3);
  });
});

describe('Monte Carlo propagation (JCGM 101:2008)', () => {
  // Same example, DOMAIN.md: mean 333.334 m/s, SD 1.0635 m/s, 95 % interval [331.41, 335.26].
  // With M = 10⁶ the MC standard error of the mean is ~0.001 m/s and of the percentiles ~0.005 m/s.
  it('reproduces mean, SD and the 95 % interval of the worked example', () => {
    const r = propagateMonteCarlo(workedExample(), { draws: 1_000_000, seed: 11 });
    expect(Math.abs(r.mean - 333.334)).toBeLessThan(0.005);
    expect(Math.abs(r.standardDeviation - 1.0635)).toBeLessThan(0.004);
    expect(Math.abs(r.intervalLow - 331.41)).toBeLessThan(0.02);
    expect(Math.abs(r.intervalHigh - 335.26)).toBeLessThan(0.02);
  });

  it('agrees with the linear propagation on a near-linear model, as JCGM 101 validation of the GUM framework expects', () => {
    const linear = propagateUncertainty(workedExample());
    const mc = propagateMonteCarlo(workedExample(), { draws: 200_000, seed: 3 });
    expect(Math.abs(mc.standardDeviation / linear.standardUncertainty - 1)).toBeLessThan(0.01);
  });
});

describe('speed of sound, c = √(γRT) with U.S. Standard Atmosphere 1976 constants', () => {
  // Values from DOMAIN.md (USSA 1976): c(0 °C) = 331.32, c(15 °C) = 340.294, c(20 °C) = 343.23 m/s.
  it('gives 331.32, 340.294 and 343.23 m/s at 0, 15 and 20 °C', () => {
    expect(speedOfSound(273.15)).toBeCloseTo(331.32, 2);
    expect(speedOfSound(288.15)).toBeCloseTo(340.294, 3);
    expect(speedOfSound(293.15)).toBeCloseTo(343.23, 2);
    expect(() => speedOfSound(-1)).toThrow(new RangeError('temperature must be a positive number of kelvin'));
  });
});

describe('fitConstantDeceleration', () => {
  it('recovers v and a exactly from points on x = v t − a t²/2 (analytic)', () => {
    const v = 310;
    const a = 12000;
    const t = [0, 3e-4, 7e-4, 1.1e-3];
    const x = t.map((s) => 0.05 + v * s - (a / 2) * s * s);
    const fit = fitConstantDeceleration(t, x, [1, 1, 1, 1], 0);
    expect(fit.speed).toBeCloseTo(v, 8);
    expect(fit.deceleration).toBeCloseTo(a, 4);
    expect(fit.position).toBeCloseTo(0.05, 12);
    expect(() => fitConstantDeceleration([0, 1], [0, 1], [1, 1], 0)).toThrow('a constant-deceleration fit needs at least 3 gates');
  });
});
