import { createRandom } from '../analysis/create-random.ts';

export interface SimulateShotOptions {
  /** Speed of the projectile's centre as it passes the first gate, m/s. @default 300 */
  speed?: number;
  /** Constant deceleration along the path, m/s²; positive slows the projectile down. @default 0 */
  deceleration?: number;
  /** Gate positions along the flight path, m, in flight order (increasing). @default [0, 0.1] */
  gatePositions?: number[];
  /** Index of the channel each gate is wired to; several gates may share one channel (wired-OR).
   * @default one channel per gate, in gate order */
  gateChannels?: number[];
  /** Channel names, one per channel. @default "CH1", "CH2", … */
  channelNames?: string[];
  /** Instant the projectile's centre passes the first gate, s. @default 1e-4 */
  arrivalTime?: number;
  /** Projectile (sphere) diameter, m. @default 0.04 (a table-tennis ball, ITTF Laws 2.3.1) */
  diameter?: number;
  /** Width of each light beam along the flight path, m (a uniform strip). @default 0.001 */
  beamWidth?: number;
  /** Distance of each beam from the ball's centre line, m; one value for all gates or one per gate.
   * The beam then sees the chord 2√(R² − b²). @default 0 */
  beamOffset?: number | number[];
  /** Time constant of each gate's first-order sensor response, s; one value or one per gate. @default 0 */
  responseTime?: number | number[];
  /** "falling": a blocked beam pulls the output low (clear = highVoltage); "rising": the opposite.
   * @default "falling" */
  polarity?: 'falling' | 'rising';
  /** Output level of the high state, V. @default 4.8 */
  highVoltage?: number;
  /** Output level of the low state, V. @default 0.2 */
  lowVoltage?: number;
  /** Fraction of the full clear-to-blocked step that each gate reaches when fully blocked (0 = the gate
   * missed entirely, 0.38 = a weak dip); one value or one per gate. @default 1 */
  dipDepth?: number | number[];
  /** RMS of white gaussian noise added by the scope's front end, V. @default 0 */
  noiseRms?: number;
  /** Amplitude of mains hum, V. @default 0 */
  humAmplitude?: number;
  /** Frequency of mains hum, Hz. @default 50 */
  humFrequency?: number;
  /** Number of one-sample spikes (pickup from the launch) per channel, at random instants. @default 0 */
  spikeCount?: number;
  /** Amplitude of each spike, V (sign random). @default 2 */
  spikeAmplitude?: number;
  /** Vertical resolution of the scope's ADC, V (0 = none). @default 0 */
  adcStep?: number;
  /** Sample interval, s. @default 1e-7 */
  sampleInterval?: number;
  /** Number of samples per channel. @default 10000 */
  length?: number;
  /** Time of the first sample, s; negative for pre-trigger. @default -1e-4 */
  t0?: number;
  /** Seed of the pseudo-random generator: same seed, same capture. @default 1 */
  seed?: number;
}

/** What really happened in a simulated shot, for checking an analysis against. */
export interface SimulatedGateTruth {
  position: number;
  channel: string;
  channelIndex: number;
  /** Instant the chord's leading end reaches the beam centre: the 50 % (mesial) crossing of the optical
   * signal before the sensor's response, s. */
  entry: number;
  /** Instant the chord's trailing end leaves the beam centre, s. */
  exit: number;
  /** Instant the ball's centre passes the gate, s. */
  centre: number;
  /** Speed of the ball's centre as it passes the gate, m/s. */
  speed: number;
  /** Chord cut by the beam, m. */
  chord: number;
  dipDepth: number;
}

export interface SimulatedShot {
  time: { t0: number; dt: number };
  channels: { name: string; values: Float64Array }[];
  truth: {
    speedAtFirstGate: number;
    deceleration: number;
    gates: SimulatedGateTruth[];
  };
}

function perGate(value: number | number[], count: number, name: string): number[] {
  if (typeof value === 'number') return new Array<number>(count).fill(value);
  if (value.length !== count) {
    throw new RangeError(`${name} has ${value.length} values but there are ${count} gates`);
  }
  return value.slice();
}

/**
 * Simulates an oscilloscope record of a projectile crossing light gates, from the physics alone.
 *
 * Kinematics: constant deceleration, x(t) = x₀ + v₀s − a s²/2 with s = t − arrivalTime. Each beam is a
 * uniform strip of width w across the path at offset b from the ball's centre, so the blocked fraction is
 * the overlap of the chord [x − r, x + r], r = √(R² − b²), with the strip, divided by w; its 50 % instants
 * are exactly when the chord's ends pass the beam centre (DOMAIN.md "Beam width and threshold").
 * The sensor is a first-order low-pass, discretized exactly for an input that is linear between samples
 * (ramp-invariant discretization, e.g. Franklin, Powell & Workman, Digital Control of Dynamic Systems).
 * Noise, hum, spikes and ADC quantization are added afterwards, as in the scope's front end.
 */
export function simulateShot(options: SimulateShotOptions = {}): SimulatedShot {
  const {
    speed = 300,
    deceleration = 0,
    gatePositions = [0, 0.1],
    arrivalTime = 1e-4,
    diameter = 0.04,
    beamWidth = 0.001,
    beamOffset = 0,
    responseTime = 0,
    polarity = 'falling',
    highVoltage = 4.8,
    lowVoltage = 0.2,
    dipDepth = 1,
    noiseRms = 0,
    humAmplitude = 0,
    humFrequency = 50,
    spikeCount = 0,
    spikeAmplitude = 2,
    adcStep = 0,
    sampleInterval = 1e-7,
    length = 10000,
    t0 = -1e-4,
    seed = 1,
  } = options;
  const gateCount = gatePositions.length;
  const gateChannels = options.gateChannels ?? gatePositions.map((_, i) => i);

  if (!(speed > 0)) throw new RangeError('speed must be positive');
  if (!Number.isFinite(deceleration)) throw new RangeError('deceleration must be finite');
  if (gateCount === 0) throw new RangeError('gatePositions must hold at least one gate');
  for (let i = 1; i < gateCount; i++) {
    if (!(gatePositions[i] > gatePositions[i - 1])) throw new RangeError('gatePositions must increase');
  }
  if (gateChannels.length !== gateCount) throw new RangeError('gateChannels needs one channel index per gate');
  let channelCount = 0;
  for (const c of gateChannels) {
    if (!Number.isInteger(c) || c < 0) throw new RangeError('gateChannels must hold channel indices (integers ≥ 0)');
    channelCount = Math.max(channelCount, c + 1);
  }
  const channelNames = options.channelNames ?? Array.from({ length: channelCount }, (_, i) => `CH${i + 1}`);
  if (channelNames.length < channelCount) throw new RangeError('channelNames needs a name for every channel a gate uses');
  if (!(diameter > 0)) throw new RangeError('diameter must be positive');
  if (!(beamWidth >= 0)) throw new RangeError('beamWidth must be 0 or positive');
  if (!(sampleInterval > 0)) throw new RangeError('sampleInterval must be positive');
  if (!Number.isInteger(length) || length < 2) throw new RangeError('length must be an integer ≥ 2');
  if (!(noiseRms >= 0) || !(humAmplitude >= 0) || !(adcStep >= 0)) {
    throw new RangeError('noiseRms, humAmplitude and adcStep must be 0 or positive');
  }
  const offsets = perGate(beamOffset, gateCount, 'beamOffset');
  const taus = perGate(responseTime, gateCount, 'responseTime');
  const depths = perGate(dipDepth, gateCount, 'dipDepth');
  const radius = diameter / 2;
  const chords = offsets.map((b) => {
    if (!(Math.abs(b) < radius)) throw new RangeError('beamOffset must be smaller than the projectile radius');
    return 2 * Math.sqrt(radius * radius - b * b);
  });
  for (const tau of taus) if (!(tau >= 0)) throw new RangeError('responseTime must be 0 or positive');
  for (const d of depths) if (!(d >= 0 && d <= 1)) throw new RangeError('dipDepth must lie in [0, 1]');

  const x0 = gatePositions[0];
  // Time after arrival at which the centre reaches position X; stable form of the quadratic's root.
  const timeToReach = (X: number): number => {
    const dx = X - x0;
    const disc = speed * speed - 2 * deceleration * dx;
    if (disc <= 0) throw new RangeError(`the projectile stops before reaching ${X} m`);
    return (2 * dx) / (speed + Math.sqrt(disc));
  };
  const stopAfter = deceleration > 0 ? speed / deceleration : Number.POSITIVE_INFINITY;

  const gates: SimulatedGateTruth[] = gatePositions.map((position, g) => {
    const r = chords[g] / 2;
    const sCentre = timeToReach(position);
    return {
      position,
      channel: channelNames[gateChannels[g]],
      channelIndex: gateChannels[g],
      entry: arrivalTime + timeToReach(position - r),
      exit: arrivalTime + timeToReach(position + r),
      centre: arrivalTime + sCentre,
      speed: speed - deceleration * sCentre,
      chord: chords[g],
      dipDepth: depths[g],
    };
  });

  const random = createRandom(seed);
  const humPhase = 2 * Math.PI * random.uniform();
  const dt = sampleInterval;
  const clear = polarity === 'falling' ? highVoltage : lowVoltage;
  const blocked = polarity === 'falling' ? lowVoltage : highVoltage;
  const halfWidth = beamWidth / 2;

  const channels = channelNames.map((name, c) => {
    const values = new Float64Array(length);
    const mine: number[] = [];
    for (let g = 0; g < gateCount; g++) if (gateChannels[g] === c) mine.push(g);
    const previousInput = new Float64Array(mine.length);
    const output = new Float64Array(mine.length);
    const decay = mine.map((g) => (taus[g] > 0 ? Math.exp(-dt / taus[g]) : 0));
    // Ramp-invariant gain: how much of a linear input change over one step the output still lags behind.
    const lag = mine.map((g) => (taus[g] > 0 ? (taus[g] / dt) * (1 - Math.exp(-dt / taus[g])) : 1));
    for (let n = 0; n < length; n++) {
      let s = t0 + n * dt - arrivalTime;
      if (s > stopAfter) s = stopAfter;
      const x = x0 + speed * s - 0.5 * deceleration * s * s;
      let sum = 0;
      for (let k = 0; k < mine.length; k++) {
        const g = mine[k];
        const r = chords[g] / 2;
        const xg = gatePositions[g];
        let fraction: number;
        if (halfWidth > 0) {
          const overlap = Math.min(x + r, xg + halfWidth) - Math.max(x - r, xg - halfWidth);
          fraction = overlap > 0 ? overlap / beamWidth : 0;
        } else {
          fraction = Math.abs(x - xg) < r ? 1 : 0;
        }
        const u = fraction * depths[g];
        if (n === 0 || taus[g] === 0) {
          output[k] = u;
        } else {
          // y₁ = u₁ − kτ + (y₀ − u₀ + kτ)·e^(−dt/τ) with k = (u₁ − u₀)/dt, regrouped as
          // y₁ = u₁ − (u₁ − u₀)·(τ/dt)(1 − e^(−dt/τ)) + (y₀ − u₀)·e^(−dt/τ).
          const du = u - previousInput[k];
          output[k] = u - du * lag[k] + (output[k] - previousInput[k]) * decay[k];
        }
        previousInput[k] = u;
        sum += output[k];
      }
      values[n] = clear + (blocked - clear) * Math.min(1, sum);
    }
    if (noiseRms > 0) for (let n = 0; n < length; n++) values[n] += noiseRms * random.normal();
    if (humAmplitude > 0) {
      const w = 2 * Math.PI * humFrequency;
      for (let n = 0; n < length; n++) values[n] += humAmplitude * Math.sin(w * (t0 + n * dt) + humPhase + c);
    }
    for (let k = 0; k < spikeCount; k++) {
      const n = Math.floor(random.uniform() * length);
      values[n] += (random.uniform() < 0.5 ? -1 : 1) * spikeAmplitude;
    }
    if (adcStep > 0) for (let n = 0; n < length; n++) values[n] = Math.round(values[n] / adcStep) * adcStep;
    return { name, values };
  });

  return { time: { t0, dt }, channels, truth: { speedAtFirstGate: speed, deceleration, gates } };
}
