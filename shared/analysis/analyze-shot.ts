import * as z from 'zod';
import { analysisOptionsSchema, type AnalysisOptions, type AnalysisOptionsInput } from '../contracts/analysis.ts';
import type { ImportedCapture } from '../contracts/capture.ts';
import { buildShotModel, type FiredGate } from './build-shot-model.ts';
import { checkTimeBase } from './check-time-base.ts';
import { ENGINE_VERSION } from './engine-version.ts';
import { findDipCandidate } from './find-dip-candidate.ts';
import type { ModelInput } from './measurement-model.ts';
import { prepareChannel, pulsesAt, thresholdOf, type PreparedChannel } from './prepare-channel.ts';
import { propagateMonteCarlo } from './propagate-monte-carlo.ts';
import { propagateUncertainty } from './propagate-uncertainty.ts';
import { smoothSavitzkyGolay } from './smooth-savitzky-golay.ts';
import { speedOfSound } from './speed-of-sound.ts';
import type {
  AnalysisAssumptions,
  ChannelResult,
  CrossCheckResult,
  DerivedResult,
  FitResult,
  FlightPairResult,
  GateResult,
  OcclusionResult,
  Polarity,
  PulseResult,
  ShotAnalysis,
  SpeedResult,
} from './types.ts';

/** Coverage factor of every expanded uncertainty reported: k = 2, ≈ 95 % for a near-normal output (NIST TN 1297 §6). */
const K = 2;
/** More pulses than this per gate on a channel means it is not seeing a projectile. */
const MAX_PULSES_PER_GATE = 10;

const finiteOrNull = (v: number): number | null => (Number.isFinite(v) ? v : null);
const ms = (t: number): string => `${(t * 1e3).toFixed(3)} ms`;
const volts = (v: number): string => (Math.abs(v) < 1 ? `${(v * 1e3).toPrecision(3)} mV` : `${v.toPrecision(3)} V`);
const pct = (f: number): string => `${(100 * f).toFixed(1)} %`;

function checkCapture(capture: ImportedCapture): void {
  if (capture === null || typeof capture !== 'object' || !Array.isArray(capture.channels)) {
    throw new TypeError('capture must be an imported capture with a channels array');
  }
  if (capture.channels.length === 0) throw new RangeError('the capture has no channels');
  if (!Number.isInteger(capture.length) || capture.length < 2) throw new RangeError('the capture needs at least 2 samples');
  for (const c of capture.channels) {
    if (c.values.length !== capture.length) {
      throw new RangeError(`channel ${c.name} has ${c.values.length} samples but the capture declares ${capture.length}`);
    }
  }
  const time = capture.time;
  if (time.kind === 'uniform') {
    if (!(time.dt > 0) || !Number.isFinite(time.t0)) throw new RangeError('the time base needs a finite t0 and a positive dt');
  } else if (time.t.length !== capture.length) {
    throw new RangeError(`the time column has ${time.t.length} values but the capture declares ${capture.length} samples`);
  }
}

function linear(inputs: ModelInput[], evaluate: (x: Float64Array) => number) {
  return propagateUncertainty({ inputs, evaluate });
}

/**
 * Analyses one shot: for each channel the IEEE Std 181-2011 state levels, transitions and pulses, or the
 * verdict "missed" with the deepest sub-threshold dip; gates mapped from channels; speeds by time of flight
 * (pairs of like edges, and a constant-deceleration fit with three or more gates) and by occlusion (ℓ/τ);
 * the uncertainty of each by the GUM law of propagation (JCGM 100:2008), optionally validated by Monte Carlo
 * (JCGM 101:2008); a flight/occlusion cross-check; Mach number (c = √(γRT), USSA 1976), kinetic energy and
 * momentum. Pure: the capture is not modified, the result is plain JSON.
 */
/** Which pulse instant times the flight: both like edges averaged (mid-time), or one edge alone. */
const EDGE = { both: 'mid', leading: 'leading', trailing: 'trailing' } as const;

/** The options as analyzeShot reads them (defaults filled in); RangeError naming what is wrong. */
export function parseAnalysisOptions(options: AnalysisOptionsInput = {}): AnalysisOptions {
  const parsed = analysisOptionsSchema.safeParse(options);
  if (!parsed.success) throw new RangeError(`invalid analysis options: ${z.prettifyError(parsed.error)}`);
  return parsed.data;
}

/**
 * `prepared`: every channel already prepared (prepareChannel, in channel order, on the unsmoothed traces: a caller
 * that has the channels prepared in parallel passes them here); the result is the same as without.
 */
export function analyzeShot(capture: ImportedCapture, options: AnalysisOptionsInput = {}, prepared?: PreparedChannel[]): ShotAnalysis {
  const opts = parseAnalysisOptions(options);
  checkCapture(capture);
  if (prepared !== undefined && (prepared.length !== capture.channels.length || opts.smoothing !== null)) {
    throw new RangeError('prepared channels must be one per channel, and only without smoothing');
  }
  const warnings: string[] = [];
  const time = capture.time;

  // The gate rig: which channels are gates, and where. Channels that are no gate (a trigger, a pressure
  // probe) are measured but set no reference step and raise no "missed" warnings.
  let gateSpecs = opts.gates;
  if (gateSpecs === undefined) {
    if (capture.channels.length > 1 && opts.spacing === undefined) {
      throw new RangeError('gate positions are unknown: give the gates (channel and position) or the gate spacing');
    }
    const spacing = opts.spacing ?? 0;
    gateSpecs = capture.channels.map((ch, i) => ({ channel: ch.name, position: i * spacing }));
  }
  const channelNames = capture.channels.map((ch) => ch.name);
  // Channel names match as written, else without regard to case ("CH1" finds "ch1"), as people type them.
  gateSpecs = gateSpecs.map((g) => {
    if (channelNames.includes(g.channel)) return g;
    const folded = channelNames.filter((name) => name.toLowerCase() === g.channel.toLowerCase());
    if (folded.length === 1) return { ...g, channel: folded[0] };
    throw new RangeError(
      `the gate at ${g.position} m names channel "${g.channel}", which the capture does not have (it has ${channelNames.join(', ')})`,
    );
  });
  const isGate = capture.channels.map((ch) => gateSpecs.some((g) => g.channel === ch.name));

  // 1. Levels, noise and polarity of every channel (on the smoothed copy when smoothing is asked for).
  if (opts.smoothing !== null && time.kind === 'explicit') {
    warnings.push('smoothing assumes evenly spaced samples, but this capture has an explicit, uneven time base');
  }
  const traces: ArrayLike<number>[] = capture.channels.map((c) => c.values);
  const ready: PreparedChannel[] = prepared ?? traces.map((raw, i) => {
    let trace = raw;
    try {
      if (opts.smoothing !== null) trace = traces[i] = smoothSavitzkyGolay(raw, opts.smoothing);
    } catch (error) {
      return { measured: null, error: (error as Error).message, found: null };
    }
    // Its pulses are looked for below, once the channel is known not to be missed.
    return prepareChannel(trace, time, opts, false);
  });
  ready.forEach((r, i) => {
    if (r.error !== null) warnings.push(`${capture.channels[i].name}: ${r.error}`);
  });
  const measured = ready.map((r) => r.measured);

  // 2. The reference step: the rig's, or the largest clean step among the channels.
  let referenceStep = opts.missed.expectedStep ?? 0;
  if (referenceStep === 0) {
    measured.forEach((m, c) => {
      if (m !== null && isGate[c] && m.snr >= opts.missed.minSnr) referenceStep = Math.max(referenceStep, m.amplitude);
    });
  }

  const minStepFraction = opts.missed.minStepFraction ?? (opts.threshold.unit === 'percent' ? opts.threshold.level / 100 : 0.5);

  // 3. Pulses of each usable channel; "missed" with a candidate dip for the others.
  const channels: ChannelResult[] = [];
  for (let c = 0; c < capture.channels.length; c++) {
    const channel = capture.channels[c];
    const m = measured[c];
    if (channel.invalidCount > 0) warnings.push(`${channel.name}: ${channel.invalidCount} invalid samples were skipped`);
    const base = {
      name: channel.name,
      smoothed: opts.smoothing !== null,
      invalidCount: channel.invalidCount,
    };
    if (m === null) {
      channels.push({
        ...base,
        status: 'missed',
        reason: 'no finite samples to analyse',
        polarity: opts.polarity === 'auto' ? 'falling' : opts.polarity,
        levels: { low: 0, high: 0, amplitude: 0, method: opts.levels.method, bins: opts.levels.bins },
        referenceLevels: { proximal: 0, mesial: 0, distal: 0 },
        noise: { low: null, high: null },
        snr: null,
        threshold: null,
        transitions: [],
        pulses: [],
        candidate: null,
      });
      continue;
    }
    const common = {
      ...base,
      levels: { low: m.low, high: m.high, amplitude: m.amplitude, method: opts.levels.method, bins: opts.levels.bins },
      referenceLevels: { proximal: m.low + 0.1 * m.amplitude, mesial: m.low + 0.5 * m.amplitude, distal: m.low + 0.9 * m.amplitude },
      noise: { low: finiteOrNull(m.lowSd), high: finiteOrNull(m.highSd) },
      snr: finiteOrNull(m.snr),
    };
    let reason: string | null = null;
    if (!(m.snr >= opts.missed.minSnr)) {
      reason = `its step (${m.amplitude.toPrecision(3)} V) is only ${m.snr.toFixed(1)} times the noise, below ${opts.missed.minSnr}`;
    } else if (m.amplitude < minStepFraction * referenceStep) {
      reason = `its step (${m.amplitude.toPrecision(3)} V) is below ${pct(minStepFraction)} of the reference step (${referenceStep.toPrecision(3)} V)`;
    }
    let result: ChannelResult | null = null;
    if (reason === null) {
      const { level, lowArm, highArm } = thresholdOf(m, opts);
      const found = prepared !== undefined ? ready[c].found : pulsesAt(traces[c], time, m, opts);
      if (found !== null) {
        if (found.openAtStart && isGate[c]) warnings.push(`${channel.name}: the record starts with the beam blocked; that pulse was ignored`);
        if (found.openAtEnd && isGate[c]) warnings.push(`${channel.name}: the record ends with the beam blocked; that pulse was ignored`);
        // A pulse no longer than two sample intervals is a spike, not a projectile (common practice).
        const minWidth = 2 * (time.kind === 'uniform' ? time.dt : (time.t[time.t.length - 1] - time.t[0]) / (time.t.length - 1));
        const pulses: PulseResult[] = found.pulses.filter((p) => p.width > minWidth);
        if (pulses.length < found.pulses.length && isGate[c]) {
          warnings.push(`${channel.name}: ${found.pulses.length - pulses.length} pulse(s) no longer than 2 samples were ignored as spikes`);
        }
        // A gate sees one pulse per projectile; dozens mean the "states" are hum or noise (common practice).
        const gatesHere = gateSpecs.filter((g) => g.channel === channel.name).length;
        if (isGate[c] && pulses.length > MAX_PULSES_PER_GATE * gatesHere) {
          reason = `${pulses.length} pulses where ${gatesHere} gate(s) should give ${gatesHere}: hum or noise, not a projectile`;
        } else if (pulses.length > 0) {
          result = {
            ...common,
            status: 'ok',
            reason: null,
            polarity: m.polarity,
            threshold: { level, lowArm, highArm },
            transitions: found.transitions,
            pulses,
            candidate: null,
          };
        } else {
          reason = found.transitions.length > 0 ? 'no complete pulse inside the record' : 'no transition through the threshold';
        }
      } else {
        reason = 'its threshold level lies outside its hysteresis band';
      }
    }
    channels.push(
      result ?? {
        ...common,
        status: 'missed',
        reason,
        polarity: m.polarity,
        threshold: null,
        transitions: [],
        pulses: [],
        candidate: null,
      },
    );
  }

  // Missed channels: the polarity the working gates show, and the deepest dip toward it.
  const okPolarities = channels.filter((c, i) => c.status === 'ok' && isGate[i]).map((c) => c.polarity);
  const rigPolarity: Polarity =
    opts.polarity !== 'auto'
      ? opts.polarity
      : okPolarities.filter((p) => p === 'rising').length > okPolarities.length / 2
        ? 'rising'
        : 'falling';
  for (let c = 0; c < channels.length; c++) {
    const ch = channels[c];
    const m = measured[c];
    if (ch.status !== 'missed' || m === null || !isGate[c]) continue;
    ch.polarity = rigPolarity;
    const clearLevel = rigPolarity === 'falling' ? m.high : m.low;
    // Without a clean gate (or the rig's expected step) a depth in "% of the step" would mean nothing.
    const step = referenceStep;
    let message = `${ch.name}: missed (${ch.reason})`;
    if (step > 0) {
      const dip = findDipCandidate(traces[c], { time, clearLevel, referenceStep: rigPolarity === 'falling' ? -step : step });
      if (dip !== null && dip.depthFraction >= opts.missed.minCandidateFraction) {
        const t = opts.threshold;
        const threshold = t.unit === 'percent' ? `${t.level} %` : `${t.level} V`;
        const thresholdDepth = t.unit === 'percent' ? t.level / 100 : Math.abs(t.level - clearLevel) / step;
        const text = `dipped from ${ms(dip.start)} to ${ms(dip.end)}, ${volts(dip.depth)} deep (${Math.round(100 * dip.depthFraction)} % of the step)`;
        ch.candidate = { depthFraction: dip.depthFraction, time: dip.time, start: dip.start, end: dip.end, depth: dip.depth, message: text };
        const advice = dip.depthFraction < thresholdDepth ? 'lower the threshold to use it' : 'smooth the trace or check the gate wiring';
        message += `; it ${text} (threshold ${threshold}): ${advice}`;
      }
    }
    warnings.push(message);
  }

  // 4. Gates: channel (and pulse order) → position.
  const byName = new Map(channels.map((ch) => [ch.name, ch]));
  const sortedSpecs = [...gateSpecs].sort((a, b) => a.position - b.position);
  const gates: GateResult[] = [];
  const fired: FiredGate[] = [];
  for (const ch of channels) {
    const mine = sortedSpecs.filter((g) => g.channel === ch.name);
    if (mine.length === 0) continue;
    if (ch.status === 'ok' && ch.pulses.length > mine.length) {
      warnings.push(`${ch.name}: ${ch.pulses.length} pulses for ${mine.length} gate(s); the first ${mine.length} in time were used`);
    } else if (ch.status === 'ok' && ch.pulses.length < mine.length) {
      warnings.push(`${ch.name}: ${ch.pulses.length} pulse(s) for ${mine.length} gates; they were given to the gates nearest the start`);
    }
  }
  for (const spec of sortedSpecs) {
    const ch = byName.get(spec.channel) as ChannelResult;
    const order = sortedSpecs.filter((g) => g.channel === spec.channel).indexOf(spec);
    const pulse = ch.status === 'ok' ? ch.pulses[order] : undefined;
    gates.push({
      channel: spec.channel,
      position: spec.position,
      status: pulse === undefined ? 'missed' : 'ok',
      pulses: pulse === undefined ? [] : [{ start: pulse.start, end: pulse.end, width: pulse.width }],
    });
    if (pulse !== undefined) fired.push({ channel: spec.channel, position: spec.position, pulse });
  }
  for (let k = 1; k < fired.length; k++) {
    if (fired[k].pulse.start <= fired[k - 1].pulse.start) {
      warnings.push(
        `the gate at ${fired[k].position} m (${fired[k].channel}) fired before the gate at ${fired[k - 1].position} m (${fired[k - 1].channel}): check the gate positions`,
      );
      break;
    }
  }

  // 5. Speeds and their uncertainties, all from one measurement model.
  const length = opts.projectile.length;
  const model = buildShotModel(fired, {
    positionTolerance: opts.positionTolerance,
    timebaseAccuracyPpm: opts.timebaseAccuracyPpm,
    projectileLength: length ?? Number.NaN,
    lengthTolerance: opts.projectile.lengthTolerance,
    timingEdge: EDGE[opts.edges],
  });
  const { inputs } = model;
  const x0 = new Float64Array(inputs.length);
  for (let i = 0; i < inputs.length; i++) x0[i] = inputs[i].value;

  const flight: FlightPairResult[] = [];
  for (let i = 0; i < fired.length; i++) {
    for (let j = i + 1; j < fired.length; j++) {
      if (fired[j].pulse.start + fired[j].pulse.end === fired[i].pulse.start + fired[i].pulse.end) {
        throw new RangeError(`the gates at ${fired[i].position} m and ${fired[j].position} m show the very same pulse: check the gate map`);
      }
      const r = linear(inputs, model.flight(i, j, EDGE[opts.edges]));
      flight.push({
        from: { channel: fired[i].channel, position: fired[i].position },
        to: { channel: fired[j].channel, position: fired[j].position },
        speed: r.value,
        uncertainty: K * r.standardUncertainty,
        leadingEdgeSpeed: model.flight(i, j, 'leading')(x0),
        trailingEdgeSpeed: model.flight(i, j, 'trailing')(x0),
      });
    }
  }
  let fit: FitResult | null = null;
  let fitUsable = model.fitSpeed !== null;
  if (model.fitSpeed !== null && model.fitDeceleration !== null) {
    try {
      const v = linear(inputs, model.fitSpeed);
      const a = linear(inputs, model.fitDeceleration);
      fit = { gates: fired.length, speed: v.value, speedUncertainty: K * v.standardUncertainty, deceleration: a.value, decelerationUncertainty: K * a.standardUncertainty };
    } catch (error) {
      fitUsable = false;
      warnings.push(`the constant-deceleration fit failed (${(error as Error).message}); the speed is the first pair's flight speed`);
    }
  }
  const occlusion: OcclusionResult[] = [];
  if (model.occlusion !== null && length !== undefined) {
    for (let k = 0; k < fired.length; k++) {
      const r = linear(inputs, model.occlusion(k));
      occlusion.push({
        channel: fired[k].channel,
        position: fired[k].position,
        length,
        width: fired[k].pulse.width,
        speed: r.value,
        uncertainty: K * r.standardUncertainty,
      });
    }
  }

  const t = opts.threshold;
  if (occlusion.length > 0 && !(t.unit === 'percent' && t.level === 50)) {
    // DOMAIN.md "beam width and threshold": switching at fractions f_on, f_off gives ℓ = D + w(1 − f_on − f_off).
    warnings.push(
      `occlusion speeds take the projectile length as the blocked length, which holds for crossings at 50 % of the step; ` +
        `at ${t.unit === 'percent' ? `${t.level} %` : `${t.level} V`} the blocked time also depends on the beam width`,
    );
  }

  let primary: { method: 'flight' | 'occlusion'; basis: 'fit' | 'pair' | 'occlusion'; evaluate: (x: Float64Array) => number } | null = null;
  if (model.fitSpeed !== null && fitUsable) primary = { method: 'flight', basis: 'fit', evaluate: model.fitSpeed };
  else if (fired.length >= 2) primary = { method: 'flight', basis: 'pair', evaluate: model.flight(0, 1, EDGE[opts.edges]) };
  else if (fired.length === 1 && model.occlusion !== null) primary = { method: 'occlusion', basis: 'occlusion', evaluate: model.occlusion(0) };
  let speed: SpeedResult | null = null;
  if (primary !== null) {
    const r = linear(inputs, primary.evaluate);
    const mc =
      opts.monteCarloDraws > 0
        ? propagateMonteCarlo({ inputs, evaluate: primary.evaluate }, { draws: Math.max(100, opts.monteCarloDraws), seed: opts.seed })
        : null;
    speed = {
      method: primary.method,
      basis: primary.basis,
      value: r.value,
      uncertainty: K * r.standardUncertainty,
      coverage: K,
      standardUncertainty: r.standardUncertainty,
      // Inputs with no tolerance given (say, the projectile size for a flight speed) add nothing: leave them out.
      budget: r.budget.filter((b) => b.contribution > 0),
      monteCarlo: mc,
    };
    if (fired.length === 1) warnings.push('only one gate fired: the speed is its occlusion speed ℓ/τ, which depends on the projectile length and the beam passing through its centre');
  } else if (fired.length === 0) {
    warnings.push('no gate fired: no speed');
  } else {
    warnings.push('only one gate fired and the projectile length is unknown: no speed (give the projectile length for an occlusion speed)');
  }

  // 6. Cross-check: flight against occlusion, through the same inputs so shared errors cancel correctly.
  const crossChecks: CrossCheckResult[] = [];
  if (model.occlusion !== null && fired.length >= 2) {
    const occ = model.occlusion;
    const pairs: { positions: number[]; occ: (x: Float64Array) => number; fl: (x: Float64Array) => number; label: string }[] = [];
    if (model.fitSpeedAt !== null && fitUsable) {
      const at = model.fitSpeedAt;
      for (let k = 0; k < fired.length; k++) {
        pairs.push({ positions: [fired[k].position], occ: occ(k), fl: at(k), label: `gate at ${fired[k].position} m (${fired[k].channel})` });
      }
    } else {
      // Two gates: the mean of the two occlusion speeds is the speed at the span's mid-time under constant
      // deceleration, which is what the flight speed measures.
      const o0 = occ(0);
      const o1 = occ(1);
      pairs.push({
        positions: [fired[0].position, fired[1].position],
        occ: (x) => 0.5 * (o0(x) + o1(x)),
        fl: model.flight(0, 1, 'mid'),
        label: `gates at ${fired[0].position} m and ${fired[1].position} m`,
      });
    }
    for (const p of pairs) {
      const d = linear(inputs, (x) => p.occ(x) - p.fl(x));
      const limit = opts.crossCheckCoverage * d.standardUncertainty;
      const o = p.occ(x0);
      const f = p.fl(x0);
      const consistent = Math.abs(d.value) <= limit;
      crossChecks.push({ positions: p.positions, occlusionSpeed: o, flightSpeed: f, difference: d.value, limit, consistent });
      if (!consistent) {
        warnings.push(
          `cross-check, ${p.label}: occlusion speed ${o.toFixed(2)} m/s differs from flight speed ${f.toFixed(2)} m/s by ${pct(d.value / f)}, ` +
            `more than their combined uncertainty (${pct(limit / f)} at k = ${opts.crossCheckCoverage}): off-centre beam, wrong projectile length, or a slow or asymmetric sensor?`,
        );
      }
    }
  }

  // 7. Derived quantities, GUM with relative uncertainties of independent inputs (JCGM 100:2008 §5.1.6, from memory).
  const derived: DerivedResult = { speedOfSound: null, mach: null, kineticEnergy: null, momentum: null };
  if (speed !== null) {
    const v = speed.value;
    const uvRel = speed.standardUncertainty / Math.abs(v);
    const T = opts.ambient.temperature;
    if (T !== undefined) {
      const c = speedOfSound(T);
      const ucRel = opts.ambient.temperatureTolerance / Math.sqrt(3) / (2 * T); // c ∝ √T
      derived.speedOfSound = { value: c, uncertainty: K * c * ucRel };
      derived.mach = { value: v / c, uncertainty: (K * Math.abs(v / c)) * Math.hypot(uvRel, ucRel) };
    }
    const mass = opts.projectile.mass;
    if (mass !== undefined) {
      const umRel = opts.projectile.massTolerance / Math.sqrt(3) / mass;
      const e = 0.5 * mass * v * v;
      const p = mass * v;
      derived.kineticEnergy = { value: e, uncertainty: K * e * Math.hypot(umRel, 2 * uvRel) };
      derived.momentum = { value: p, uncertainty: K * Math.abs(p) * Math.hypot(umRel, uvRel) };
    }
  }

  // 8. What the result rests on, and whether it may be stated as a measurement at all.
  const sampleInterval = time.kind === 'uniform' ? time.dt : (time.t[time.t.length - 1] - time.t[0]) / (time.t.length - 1);
  const assumptions: AnalysisAssumptions = {
    positionTolerance: opts.positionTolerance,
    timebaseAccuracyPpm: opts.timebaseAccuracyPpm,
    projectile: { length: length ?? null, lengthTolerance: opts.projectile.lengthTolerance },
    threshold: { unit: t.unit, level: t.level, hysteresis: t.hysteresis },
    edges: opts.edges,
    sampleInterval,
    timeBase: capture.timeOrigin ?? null,
    values: capture.valueKind ?? 'physical',
  };
  const gateLabel = (g: { channel: string; position: number }) => `${g.channel} @ ${g.position} m`;
  const timeBaseCheck = checkTimeBase({
    sampleInterval,
    timeOrigin: capture.timeOrigin,
    speeds: [
      ...(speed ? [{ label: 'speed', value: speed.value }] : []),
      ...flight.map((f) => ({ label: `flight speed ${gateLabel(f.from)} to ${gateLabel(f.to)}`, value: f.speed })),
      ...occlusion.map((o) => ({ label: `occlusion speed at ${gateLabel(o)}`, value: o.speed })),
    ],
    flightSpeed: speed?.method === 'flight' ? speed.value : null,
    pulses: fired.map((g) => ({ label: gateLabel(g), width: g.pulse.width })),
    projectileLength: length,
  });

  return {
    engineVersion: ENGINE_VERSION, options: opts, channels, gates, speed, flight, fit, occlusion, crossChecks, derived, warnings,
    assumptions, timeBaseCheck,
  };
}
