/**
 * `npm run bench:launcher-fit`: the cost of the trends page's launcher fit, as a ratio to one integration of the
 * launcher model in this same run (the baseline), and in milliseconds for this machine. Figures only, no pass/fail.
 * The campaign is the demo sweep's shape: 8 shots from 1.1 to 12 kPa, 2 m tube, 40 mm 2.7 g ball.
 */
import { createRandom } from '../shared/analysis/create-random.ts';
import { fitLauncherLosses } from '../shared/physics/fit-launcher-losses.ts';
import { predictLauncherSpeed } from '../shared/physics/predict-launcher-speed.ts';
import { simulateLauncherShot } from '../shared/physics/simulate-launcher-shot.ts';
import { vacuumForTargetSpeed } from '../shared/physics/vacuum-for-target-speed.ts';

const geometry = { tubeLength: 2, boreDiameter: 0.0405, projectileDiameter: 0.04, mass: 0.0027 };
const random = createRandom(8);
const shots = [12, 8.5, 6, 4.2, 3, 2.1, 1.5, 1.1].map((kPa) => ({
  tubePressure: kPa * 1000, ambientPressure: 100_900, ambientTemperature: 293.15, expandedUncertainty: 0.5, coverageFactor: 2,
  speed: simulateLauncherShot({ ...geometry, tubePressure: kPa * 1000, ambientPressure: 100_900, frictionForce: 2, leakArea: 1.5e-6 }).exitSpeed + 0.25 * random.normal(),
}));

function time(what: string, runs: number, fn: () => void): number {
  fn(); // warm-up
  const t = performance.now();
  for (let i = 0; i < runs; i++) fn();
  const ms = (performance.now() - t) / runs;
  console.log(`${what.padEnd(46)} ${ms.toFixed(3).padStart(9)} ms`);
  return ms;
}

const base = time('one integration (baseline, 200 steps)', 200, () => simulateLauncherShot({ ...geometry, tubePressure: 3000, frictionForce: 2, leakArea: 1.5e-6, steps: 200 }));
const fitMs = time('fit of 8 shots', 5, () => fitLauncherLosses({ ...geometry, shots }));
const fit = fitLauncherLosses({ ...geometry, shots });
const curveMs = time('curve of 36 points with uncertainty', 5, () => { for (let i = 0; i < 36; i++) predictLauncherSpeed(fit, 400 * 1.1 ** i); });
const inverseMs = time('inverse question (one target speed)', 5, () => vacuumForTargetSpeed(fit, 200));
console.log(`\nratios to one integration: fit ${(fitMs / base).toFixed(0)}×, curve ${(curveMs / base).toFixed(0)}×, inverse ${(inverseMs / base).toFixed(0)}×`);
console.log(`fit iterations: ${fit.iterations}`);
