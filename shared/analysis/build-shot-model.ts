import { fitConstantDeceleration } from './fit-constant-deceleration.ts';
import type { ModelInput } from './measurement-model.ts';
import type { PulseResult } from './types.ts';

export interface FiredGate {
  channel: string;
  /** Nominal gate position, m. */
  position: number;
  pulse: PulseResult;
}

export interface BuildShotModelOptions {
  /** Half-width of the rectangular tolerance of each gate position, m. @default 0 */
  positionTolerance?: number;
  /** Half-width of the time base's relative accuracy, ppm (rectangular). @default 0 */
  timebaseAccuracyPpm?: number;
  /** Length cut by the beam, m (NaN when unknown: no occlusion models). @default NaN */
  projectileLength?: number;
  /** Half-width of the rectangular tolerance of the length, m. @default 0 */
  lengthTolerance?: number;
  /** Which instant of each pulse times the fit: its mid-time, its leading or its trailing edge. @default 'mid' */
  timingEdge?: TimingEdge;
}

export type TimingEdge = 'mid' | 'leading' | 'trailing';

type Output = (x: Float64Array) => number;

/** Inputs of every speed model of one shot, and the models as functions of them. */
export interface ShotModel {
  inputs: ModelInput[];
  /** Mean speed between gates i and j from like edges: pulse mid-times, leading or trailing edges. */
  flight: (i: number, j: number, edge: 'mid' | 'leading' | 'trailing') => Output;
  /** Constant-deceleration fit (≥ 3 gates): speed at the first gate and deceleration; null with fewer gates. */
  fitSpeed: Output | null;
  fitDeceleration: Output | null;
  /** Fitted speed at gate k's mid-time (≥ 3 gates). */
  fitSpeedAt: ((k: number) => Output) | null;
  /** Occlusion speed ℓ/τ of gate k; null when the projectile length is unknown. */
  occlusion: ((k: number) => Output) | null;
}

const PER_GATE = 5;
const rect = (halfWidth: number): number => halfWidth / Math.sqrt(3);

/**
 * The measurement model of a shot (JCGM 100:2008): one set of input quantities — each gate's position,
 * each crossing instant's noise jitter (normal) and interpolation error (rectangular), the time base's scale
 * error and the projectile's length — and every reported speed as a function of them. Because flight, fit
 * and occlusion speeds share the same inputs, their differences (the cross-check) carry the correlations.
 * Instants are taken at the mesial level; mid-times (entry + exit)/2 average two like-edge flight times.
 */
export function buildShotModel(gates: FiredGate[], options: BuildShotModelOptions = {}): ShotModel {
  const { positionTolerance = 0, timebaseAccuracyPpm = 0, projectileLength = Number.NaN, lengthTolerance = 0, timingEdge = 'mid' } = options;
  const inputs: ModelInput[] = [];
  for (const g of gates) {
    const label = `${g.channel} @ ${g.position} m`;
    const { entry, exit } = g.pulse;
    inputs.push(
      { name: `${label}: position`, group: 'gate positions', value: g.position, standardUncertainty: rect(positionTolerance), distribution: 'rectangular' },
      { name: `${label}: entry noise`, group: 'noise jitter', value: 0, standardUncertainty: entry.jitter, distribution: 'normal' },
      { name: `${label}: entry interpolation`, group: 'sample interval', value: 0, standardUncertainty: rect(entry.interpolationHalfWidth), distribution: 'rectangular' },
      { name: `${label}: exit noise`, group: 'noise jitter', value: 0, standardUncertainty: exit.jitter, distribution: 'normal' },
      { name: `${label}: exit interpolation`, group: 'sample interval', value: 0, standardUncertainty: rect(exit.interpolationHalfWidth), distribution: 'rectangular' },
    );
  }
  const timebase = inputs.length;
  inputs.push({ name: 'time-base scale error', group: 'time-base accuracy', value: 0, standardUncertainty: rect(timebaseAccuracyPpm * 1e-6), distribution: 'rectangular' });
  const lengthIndex = inputs.length;
  const hasLength = Number.isFinite(projectileLength) && projectileLength > 0;
  if (hasLength) {
    inputs.push({ name: 'projectile length', group: 'projectile size', value: projectileLength, standardUncertainty: rect(lengthTolerance), distribution: 'rectangular' });
  }

  // Instants are offsets from the first gate's entry so the scale error multiplies durations, not epochs.
  const origin = gates.length > 0 ? gates[0].pulse.entry.time : 0;
  const entryAt = (x: Float64Array, k: number): number =>
    (gates[k].pulse.entry.time - origin + x[PER_GATE * k + 1] + x[PER_GATE * k + 2]) * (1 + x[timebase]);
  const exitAt = (x: Float64Array, k: number): number =>
    (gates[k].pulse.exit.time - origin + x[PER_GATE * k + 3] + x[PER_GATE * k + 4]) * (1 + x[timebase]);
  const midAt = (x: Float64Array, k: number): number => 0.5 * (entryAt(x, k) + exitAt(x, k));
  const positionAt = (x: Float64Array, k: number): number => x[PER_GATE * k];

  const instantAt = (edge: TimingEdge) => (edge === 'mid' ? midAt : edge === 'leading' ? entryAt : exitAt);
  const flight = (i: number, j: number, edge: TimingEdge): Output => {
    const at = instantAt(edge);
    return (x) => (positionAt(x, j) - positionAt(x, i)) / (at(x, j) - at(x, i));
  };
  const timeAt = instantAt(timingEdge);

  let fitSpeed: Output | null = null;
  let fitDeceleration: Output | null = null;
  let fitSpeedAt: ((k: number) => Output) | null = null;
  if (gates.length >= 3) {
    const n = gates.length;
    const x0 = new Float64Array(inputs.length);
    for (let i = 0; i < inputs.length; i++) x0[i] = inputs[i].value;
    const roughSpeed = Math.abs(flight(0, n - 1, timingEdge)(x0));
    // Weights 1/σ² in position: the gate's own tolerance plus its timing instant's uncertainty times the speed.
    // Fixed at the estimates, as in the weighted fit itself, so the model stays a fixed function of its inputs.
    const weights = new Float64Array(n);
    for (let k = 0; k < n; k++) {
      const { entry, exit } = gates[k].pulse;
      const uEdge = (e: typeof entry) => Math.sqrt(e.jitter ** 2 + e.interpolationHalfWidth ** 2 / 3);
      const uTime = timingEdge === 'leading' ? uEdge(entry) : timingEdge === 'trailing' ? uEdge(exit)
        : 0.5 * Math.sqrt(entry.jitter ** 2 + exit.jitter ** 2 + (entry.interpolationHalfWidth ** 2 + exit.interpolationHalfWidth ** 2) / 3);
      weights[k] = 1 / Math.max(rect(positionTolerance) ** 2 + (roughSpeed * uTime) ** 2, 1e-30);
    }
    const tRef = timeAt(x0, 0);
    const times = new Float64Array(n);
    const positions = new Float64Array(n);
    const fit = (x: Float64Array) => {
      for (let k = 0; k < n; k++) {
        times[k] = timeAt(x, k);
        positions[k] = positionAt(x, k);
      }
      return fitConstantDeceleration(times, positions, weights, tRef);
    };
    fitSpeed = (x) => fit(x).speed;
    fitDeceleration = (x) => fit(x).deceleration;
    fitSpeedAt = (k) => (x) => {
      const f = fit(x);
      return f.speed - f.deceleration * (timeAt(x, k) - tRef);
    };
  }

  const occlusion = hasLength ? (k: number): Output => (x) => x[lengthIndex] / (exitAt(x, k) - entryAt(x, k)) : null;
  return { inputs, flight, fitSpeed, fitDeceleration, fitSpeedAt, occlusion };
}
