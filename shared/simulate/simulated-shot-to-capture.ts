import type { ImportedCapture } from '../contracts/capture.ts';
import type { SimulatedShot } from './simulate-shot.ts';

/** Wraps a simulated shot as an imported capture (uniform time base, volts), so the analysis can take it
 * exactly as it takes a scope file. The values are shared, not copied. */
export function simulatedShotToCapture(shot: SimulatedShot): ImportedCapture {
  const length = shot.channels.length > 0 ? shot.channels[0].values.length : 0;
  return {
    channels: shot.channels.map((c) => ({
      name: c.name,
      unit: 'V',
      sourceUnit: 'V',
      values: c.values,
      invalidCount: 0,
    })),
    time: { kind: 'uniform', t0: shot.time.t0, dt: shot.time.dt, jitter: 0 },
    length,
    metadata: { source: 'simulateShot' },
    layout: { simulated: true },
    warnings: [],
  };
}
