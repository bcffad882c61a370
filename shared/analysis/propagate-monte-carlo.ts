import { createRandom } from './create-random.ts';
import type { MeasurementModel } from './measurement-model.ts';

export interface PropagateMonteCarloOptions {
  /** Number of Monte Carlo trials M. @default 1_000_000 (the order JCGM 101:2008 suggests) */
  draws?: number;
  /** Seed of the generator: same seed, same result. @default 1 */
  seed?: number;
  /** Coverage probability p of the probabilistically symmetric interval. @default 0.95 */
  coverage?: number;
}

export interface MonteCarloPropagation {
  draws: number;
  /** Mean of the M model values (the estimate of Y, JCGM 101). */
  mean: number;
  /** Their standard deviation (the standard uncertainty u(y)). */
  standardDeviation: number;
  /** Probabilistically symmetric coverage interval (JCGM 101). */
  intervalLow: number;
  intervalHigh: number;
}

/**
 * Propagation of distributions by the Monte Carlo method, JCGM 101:2008 (GUM Supplement 1): draw every input
 * from its assigned distribution (normal, or rectangular of half-width √3·u), evaluate the model M times and
 * take the mean, standard deviation and the 2.5 % / 97.5 % order statistics. Used to validate the linear
 * propagation where the model is not linear enough for GUM §5.1.2 to be trusted.
 */
export function propagateMonteCarlo(model: MeasurementModel, options: PropagateMonteCarloOptions = {}): MonteCarloPropagation {
  const { draws = 1_000_000, seed = 1, coverage = 0.95 } = options;
  if (!Number.isInteger(draws) || draws < 100) throw new RangeError('draws must be an integer ≥ 100');
  if (!(coverage > 0 && coverage < 1)) throw new RangeError('coverage must lie in (0, 1)');
  const { inputs, evaluate } = model;
  const random = createRandom(seed);
  const n = inputs.length;
  const x = new Float64Array(n);
  const y = new Float64Array(draws);
  const halfWidth = new Float64Array(n);
  for (let i = 0; i < n; i++) halfWidth[i] = Math.sqrt(3) * inputs[i].standardUncertainty;
  let sum = 0;
  for (let m = 0; m < draws; m++) {
    for (let i = 0; i < n; i++) {
      const input = inputs[i];
      x[i] =
        input.distribution === 'normal'
          ? input.value + input.standardUncertainty * random.normal()
          : input.value + halfWidth[i] * (2 * random.uniform() - 1);
    }
    const v = evaluate(x);
    y[m] = v;
    sum += v;
  }
  const mean = sum / draws;
  let s2 = 0;
  for (let m = 0; m < draws; m++) s2 += (y[m] - mean) ** 2;
  y.sort();
  const tail = (1 - coverage) / 2;
  return {
    draws,
    mean,
    standardDeviation: Math.sqrt(s2 / (draws - 1)),
    intervalLow: y[Math.floor(tail * draws)],
    intervalHigh: y[Math.ceil((1 - tail) * draws) - 1],
  };
}
