import { describe, expect, it } from 'vitest';
import { createRandom } from '../../../shared/analysis/create-random.ts';
import { simulateAndAnalyze } from './helpers.ts';

/**
 * Calibration of the uncertainty: over many simulated shots with known speed, the interval value ± U (k = 2)
 * must cover the truth in about 95 % of them (NIST TN 1297 §6: k = 2 ≈ 95 % for a near-normal output).
 * An uncertainty that is too large fails this as surely as one that is too small. Accepted range 93–98 %
 * (issue 4); with N = 500 the binomial standard deviation of the rate is 1 %.
 */
const D = 0.04;

function coverage(hits: boolean[]): number {
  return hits.filter(Boolean).length / hits.length;
}

describe('uncertainty calibration on simulated shots', () => {
  it('noise-dominated: flight and occlusion intervals cover the true speed in 93–98 % of 500 shots', () => {
    const random = createRandom(2024);
    const flightHits: boolean[] = [];
    const occlusionHits: boolean[] = [];
    for (let s = 0; s < 500; s++) {
      const speed = 200 + 200 * random.uniform();
      const { analysis } = simulateAndAnalyze(
        {
          speed,
          noiseRms: 0.05 + 0.25 * random.uniform(),
          arrivalTime: 1e-4 + 4e-7 * random.uniform(), // sub-sample phase varies from shot to shot
          sampleInterval: 4e-7,
          length: 2300,
          seed: 1000 + s,
        },
        { spacing: 0.1, positionTolerance: 0, timebaseAccuracyPpm: 0, projectile: { length: D } },
      );
      const v = analysis.speed!;
      flightHits.push(Math.abs(v.value - speed) <= v.uncertainty);
      const o = analysis.occlusion[0];
      occlusionHits.push(Math.abs(o.speed - speed) <= o.uncertainty);
    }
    const flight = coverage(flightHits);
    const occlusion = coverage(occlusionHits);
    console.info(`calibration (noise): flight ${(100 * flight).toFixed(1)} %, occlusion ${(100 * occlusion).toFixed(1)} % of 500 shots`);
    expect(flight).toBeGreaterThanOrEqual(0.93);
    expect(flight).toBeLessThanOrEqual(0.98);
    expect(occlusion).toBeGreaterThanOrEqual(0.93);
    expect(occlusion).toBeLessThanOrEqual(0.98);
  });

  it('gate-position tolerance: with gates really misplaced within ±0.5 mm, U covers the truth in 93–98 % of 500 shots', () => {
    // Each true position is drawn uniformly within the stated tolerance; the analysis gets the nominal ones.
    // Two rectangular errors sum to a triangular one: k = 2 then covers 96.6 % (analytic).
    const random = createRandom(77);
    const a = 0.0005;
    const hits: boolean[] = [];
    for (let s = 0; s < 500; s++) {
      const speed = 250 + 100 * random.uniform();
      const p1 = a * (2 * random.uniform() - 1);
      const p2 = 0.1 + a * (2 * random.uniform() - 1);
      const { analysis } = simulateAndAnalyze(
        { speed, gatePositions: [p1, p2], noiseRms: 0.03, sampleInterval: 4e-7, length: 2300, seed: 5000 + s },
        { gates: [{ channel: 'CH1', position: 0 }, { channel: 'CH2', position: 0.1 }], positionTolerance: a, timebaseAccuracyPpm: 0 },
      );
      // The simulated speed is constant, so the true mean speed over the span is `speed`.
      hits.push(Math.abs(analysis.speed!.value - speed) <= analysis.speed!.uncertainty);
    }
    const rate = coverage(hits);
    console.info(`calibration (positions): ${(100 * rate).toFixed(1)} % of 500 shots`);
    expect(rate).toBeGreaterThanOrEqual(0.93);
    expect(rate).toBeLessThanOrEqual(0.98);
  });

  it('three gates, constant-deceleration fit: U of the speed at the first gate and of the deceleration cover the truth in 93–98 % of 300 shots', () => {
    // Random deceleration 0–20 000 m/s², gates misplaced within ±0.5 mm, noise 50 mV: the whole fit model at once.
    const random = createRandom(9);
    const a = 0.0005;
    const speedHits: boolean[] = [];
    const decelerationHits: boolean[] = [];
    for (let s = 0; s < 300; s++) {
      const speed = 250 + 100 * random.uniform();
      const deceleration = 20000 * random.uniform();
      const positions = [0, 0.1, 0.2].map((p) => p + a * (2 * random.uniform() - 1));
      const { shot, analysis } = simulateAndAnalyze(
        { speed, deceleration, gatePositions: positions, noiseRms: 0.05, sampleInterval: 4e-7, length: 3000, seed: 700 + s },
        { spacing: 0.1, positionTolerance: a, timebaseAccuracyPpm: 0 },
      );
      // Truth: the simulator's speed of the ball's centre as it passes the first gate, and its deceleration.
      speedHits.push(Math.abs(analysis.speed!.value - shot.truth.gates[0].speed) <= analysis.speed!.uncertainty);
      decelerationHits.push(Math.abs(analysis.fit!.deceleration - deceleration) <= analysis.fit!.decelerationUncertainty);
    }
    const v = coverage(speedHits);
    const d = coverage(decelerationHits);
    console.info(`calibration (fit): speed ${(100 * v).toFixed(1)} %, deceleration ${(100 * d).toFixed(1)} % of 300 shots`);
    for (const rate of [v, d]) {
      expect(rate).toBeGreaterThanOrEqual(0.93);
      expect(rate).toBeLessThanOrEqual(0.98);
    }
  });
});
