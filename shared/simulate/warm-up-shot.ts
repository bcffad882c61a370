import { stateLevels } from '../analysis/state-levels.ts';
import { stateNoise } from '../analysis/state-noise.ts';
import type { AnalysisOptionsInput } from '../contracts/analysis.ts';
import { simulateShot, type SimulatedShot } from './simulate-shot.ts';

/**
 * The simulated shot a process runs its code on before its first real one (the worker's processor threads,
 * worker/processors/warm-thread.ts; the API's spare reading thread, server/modules/shots/upload-reader-thread.ts):
 * V8 compiles and optimises a function when it runs, so the first real job would otherwise pay for that.
 * Two gates 0.15 m apart, as a bench or lab pair, a 300 m/s projectile; 1 ms recorded in `length` samples (100 000:
 * every 10 ns, as a fast scope records a shot, each pulse thousands of samples long, as in the records the engine
 * meets). With noise and a photodiode's rise time, as real records have: on clean square pulses the engine's
 * crossing and noise paths and the reader's many-digit numbers would stay cold for the first real job.
 */
export function warmUpShot(length = 100_000): SimulatedShot {
  return simulateShot({
    length, sampleInterval: 1e-3 / length, t0: -1e-4, speed: 300, seed: 7, gatePositions: [0, 0.15], channelNames: ['Gate A', 'Gate B'],
    noiseRms: 0.01, responseTime: 1e-6,
  });
}

/** The parameters the warm-up shot's defaults would give: its gates with their channels, the projectile's size and mass. */
export const WARM_UP_PARAMETERS: AnalysisOptionsInput = {
  gates: [{ channel: 'Gate A', position: 0 }, { channel: 'Gate B', position: 0.15 }],
  positionTolerance: 0.0005,
  projectile: { length: 0.04, lengthTolerance: 0.0001, mass: 0.0027, massTolerance: 0.00005 },
};

/** A simulated shot as CSV: times in exponent notation (nine significant digits), volts with five decimals. */
export function simulatedShotCsv(shot: SimulatedShot): Uint8Array {
  const values = shot.channels.map((c) => c.values);
  const lines = [['Time (s)', ...shot.channels.map((c) => `${c.name} (V)`)].join(',')];
  for (let i = 0; i < (values[0]?.length ?? 0); i++) {
    lines.push([(shot.time.t0 + i * shot.time.dt).toExponential(8), ...values.map((v) => v[i].toFixed(5))].join(','));
  }
  return new TextEncoder().encode(`${lines.join('\n')}\n`);
}

/**
 * The passes of the levels and the noise that only records of more than two million samples take (every n-th sample
 * of the record: state-levels.ts, state-noise.ts), run on the warm-up shot's channels with a budget that makes them
 * take every tenth. The engine on the warm-up shot itself looks at every sample, so these stayed cold until a deep
 * upload: measured in the API's spare reading thread (bench:pipeline --deep, curl, 3 December 2026), the engine on
 * the 10-million-sample capture took 220–270 ms without them and 150–185 ms with them, once the thread had warmed
 * up. Returns the strides taken (10 for channels of 20 samples or more).
 */
export function warmUpDeepPasses(channels: readonly ArrayLike<number>[], rounds = 2): number[] {
  const strides: number[] = [];
  for (let round = 0; round < rounds; round++) {
    for (const values of channels) {
      const maxSamples = Math.max(1, Math.floor(values.length / 10));
      const levels = stateLevels(values, { trimFraction: 0.01, maxSamples });
      stateNoise(values, levels.low, levels.high, { maxSamples });
      strides.push(levels.stride);
    }
  }
  return strides;
}
