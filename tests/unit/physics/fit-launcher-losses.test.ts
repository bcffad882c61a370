// The launcher fit on campaigns simulated from the model itself with known friction and leak area: the parameters
// must come back within their stated uncertainties as often as the normal distribution says (coverage over many
// simulated campaigns, as tests/unit/analysis/calibration.test.ts does for the speed's U), and χ²/ν must average 1.
// Expected rates: |error| ≤ 1·u in 68.3 % and ≤ 2·u in 95.4 % of fits (normal distribution; GUM, JCGM 100:2008,
// G.1.3); the joint Δᵀ·C⁻¹·Δ follows χ² with 2 degrees of freedom, mean 2. Bounds are about 3 binomial standard
// deviations wide for the number of campaigns run.
import { describe, expect, it } from 'vitest';
import { createRandom } from '../../../shared/analysis/create-random.ts';
import { fitLauncherLosses, type LauncherFitShot } from '../../../shared/physics/fit-launcher-losses.ts';
import { predictLauncherSpeed } from '../../../shared/physics/predict-launcher-speed.ts';
import { simulateLauncherShot } from '../../../shared/physics/simulate-launcher-shot.ts';
import { vacuumForTargetSpeed } from '../../../shared/physics/vacuum-for-target-speed.ts';

const geometry = { tubeLength: 2, boreDiameter: 0.0405, projectileDiameter: 0.040, mass: 0.0027 };

/** A campaign of `n` shots at tube pressures spread over 0.5–15 kPa, speeds from the model plus normal scatter of u. */
function simulateCampaign(seed: number, friction: number, leakArea: number, n = 10, u = 0.3): LauncherFitShot[] {
  const random = createRandom(seed);
  return Array.from({ length: n }, (_, i) => {
    const tubePressure = 500 * 30 ** ((i + random.uniform()) / n);
    const ambientPressure = 99_500 + 2500 * random.uniform();
    const ambientTemperature = 291 + 5 * random.uniform();
    const truth = simulateLauncherShot({ ...geometry, tubePressure, ambientPressure, ambientTemperature, frictionForce: friction, leakArea, steps: 1000 }).exitSpeed;
    const shotU = u * (0.7 + 0.6 * random.uniform());
    return { tubePressure, ambientPressure, ambientTemperature, speed: truth + shotU * random.normal(), expandedUncertainty: 2 * shotU, coverageFactor: 2 };
  });
}

describe('fitLauncherLosses on simulated campaigns', () => {
  it('When 60 campaigns are simulated with known friction and leak, then both come back within u and 2u as often as they should', () => {
    const random = createRandom(15);
    let in1F = 0, in1A = 0, in2F = 0, in2A = 0, joint = 0, reduced = 0;
    const runs = 60;
    for (let k = 0; k < runs; k++) {
      const friction = 1 + 3 * random.uniform();
      const leak = (0.5 + 2.5 * random.uniform()) * 1e-6;
      const fit = fitLauncherLosses({ ...geometry, shots: simulateCampaign(1000 + k, friction, leak) });
      expect(fit.converged).toBe(true);
      const dF = fit.frictionForce.value - friction;
      const dA = fit.leakArea.value - leak;
      const uF = fit.frictionForce.standardUncertainty;
      const uA = fit.leakArea.standardUncertainty;
      in1F += Math.abs(dF) <= uF ? 1 : 0;
      in1A += Math.abs(dA) <= uA ? 1 : 0;
      in2F += Math.abs(dF) <= 2 * uF ? 1 : 0;
      in2A += Math.abs(dA) <= 2 * uA ? 1 : 0;
      // Δᵀ·C⁻¹·Δ for the 2×2 covariance.
      const [[a, b], [, d]] = fit.covariance;
      const det = a * d - b * b;
      joint += (d * dF * dF - 2 * b * dF * dA + a * dA * dA) / det;
      reduced += fit.reducedChiSquare;
    }
    console.info(`launcher fit coverage over ${runs} campaigns: friction ${in1F}/${in2F}, leak ${in1A}/${in2A} within 1u/2u; mean Δᵀ C⁻¹ Δ ${(joint / runs).toFixed(2)}; mean χ²/ν ${(reduced / runs).toFixed(2)}`);
    for (const hits of [in1F, in1A]) {
      expect(hits / runs).toBeGreaterThanOrEqual(0.5);
      expect(hits / runs).toBeLessThanOrEqual(0.87);
    }
    for (const hits of [in2F, in2A]) expect(hits / runs).toBeGreaterThanOrEqual(0.87);
    expect(joint / runs).toBeGreaterThan(1.3);
    expect(joint / runs).toBeLessThan(2.8);
    expect(reduced / runs).toBeGreaterThan(0.8);
    expect(reduced / runs).toBeLessThan(1.3); // a little above 1 on average: a fit that stops on a bound (small leaks) cannot lower χ² further
  }, 240_000); // some 20 000 integrations: about 15 s on an idle core

  it('When the speeds follow a straight line in tube pressure instead, then χ²/ν is far from 1 and the fit says the model does not describe them', () => {
    const shots = [12, 8.5, 6, 4.2, 3, 2.1, 1.5, 1.1].map((kPa) => ({
      tubePressure: kPa * 1000, ambientPressure: 100_900, ambientTemperature: 293.15, speed: 318 - 9.2 * kPa, expandedUncertainty: 0.42, coverageFactor: 2,
    }));
    const fit = fitLauncherLosses({ ...geometry, shots });
    expect(fit.describesData).toBe(false);
    expect(fit.reducedChiSquare).toBeGreaterThan(100);
    expect(fit.findings[0]).toMatch(/^χ²\/ν = .*far more than their U allow/);
    expect(fit.uncertaintyScale).toBeCloseTo(Math.sqrt(fit.reducedChiSquare), 9);
  });

  it('When shots fit the model, then the page\'s findings say the scatter is as expected', () => {
    const fit = fitLauncherLosses({ ...geometry, shots: simulateCampaign(7, 2, 1.5e-6) });
    expect(fit.describesData).toBe(true);
    expect(fit.findings[0]).toMatch(/the scatter about the model is what the shots' U lead one to expect/);
    expect(fit.uncertaintyScale).toBe(1);
  });

  it('When fewer than 3 shots are given, then it refuses with a message', () => {
    expect(() => fitLauncherLosses({ ...geometry, shots: simulateCampaign(1, 2, 1e-6, 2) })).toThrow(
      new RangeError('A fit of two losses needs at least 3 shots with a speed, U and tube pressure (got 2)'),
    );
  });
});

describe('predictions and the inverse question from a fit', () => {
  const fit = fitLauncherLosses({ ...geometry, shots: simulateCampaign(99, 2.5, 2e-6) });

  it('When the model is asked at a shot\'s own conditions, then it gives the fitted speed; the band widens away from the measured range', () => {
    const inside = predictLauncherSpeed(fit, 3000);
    const outside = predictLauncherSpeed(fit, 0);
    expect(inside.standardUncertainty).toBeGreaterThan(0);
    expect(inside.predictionUncertainty).toBeGreaterThan(inside.standardUncertainty);
    expect(outside.standardUncertainty).toBeGreaterThan(inside.standardUncertainty);
    // u² = gᵀ·C·g by hand from the returned gradient and covariance.
    const [g0, g1] = inside.gradient;
    const c = fit.covariance;
    expect(inside.standardUncertainty ** 2).toBeCloseTo(g0 * g0 * c[0][0] + 2 * g0 * g1 * c[0][1] + g1 * g1 * c[1][1], 9);
  });

  it('When asked what vacuum gives the model\'s own speed at 3 kPa, then it answers 3 kPa, with u(p) = u(v)/|∂v/∂p|', () => {
    const at = predictLauncherSpeed(fit, 3000);
    const answer = vacuumForTargetSpeed(fit, at.speed);
    expect(answer.reachable).toBe(true);
    if (!answer.reachable) return;
    expect(answer.tubePressure).toBeCloseTo(3000, 0);
    expect(answer.slope).toBeLessThan(0);
    expect(answer.standardUncertainty).toBeCloseTo(at.standardUncertainty / Math.abs(answer.slope), 1);
    expect(answer.outsideMeasured).toBe(false);
  });

  it('When the target is above what the fitted launcher gives at a hard vacuum, then it is not reachable by pumping harder', () => {
    const top = predictLauncherSpeed(fit, 0).speed;
    expect(vacuumForTargetSpeed(fit, top + 5)).toMatchObject({ reachable: false, reason: 'above-hard-vacuum' });
    expect(() => vacuumForTargetSpeed(fit, -3)).toThrow(new RangeError('targetSpeed must be a positive number of m/s (got -3)'));
  });
});
