import { describe, expect, it } from 'vitest';
import { analyzeShot } from '../../../shared/analysis/analyze-shot.ts';
import { ENGINE_VERSION } from '../../../shared/analysis/engine-version.ts';
import { createRandom } from '../../../shared/analysis/create-random.ts';
import { speedOfSound } from '../../../shared/analysis/speed-of-sound.ts';
import { simulateShot } from '../../../shared/simulate/simulate-shot.ts';
import { simulatedShotToCapture } from '../../../shared/simulate/simulated-shot-to-capture.ts';
import { simulateAndAnalyze, trueMeanSpeed } from './helpers.ts';

// Every truth below comes from the simulator's inputs (speed, positions, chord geometry), never from the engine.
const D = 0.04; // table-tennis ball, ITTF Laws 2.3.1

describe('analyzeShot on simulated captures with known truth', () => {
  it('clean trace: mesial instants to 1 ns, flight speed to 1e-5 relative, IEEE 181 levels refined past the bin width', () => {
    const { shot, analysis } = simulateAndAnalyze({}, { spacing: 0.1, projectile: { length: D } });
    expect(analysis.engineVersion).toBe(ENGINE_VERSION);
    for (let g = 0; g < 2; g++) {
      const truth = shot.truth.gates[g];
      const gate = analysis.gates[g];
      expect(gate.status).toBe('ok');
      expect(gate.pulses).toHaveLength(1);
      expect(Math.abs(gate.pulses[0].start - truth.entry)).toBeLessThan(1e-9);
      expect(Math.abs(gate.pulses[0].end - truth.exit)).toBeLessThan(1e-9);
      const ch = analysis.channels[g];
      expect(ch.polarity).toBe('falling');
      // The histogram mode is refined by the mean of the state's samples: within 50 µV on a clean trace (a bin is 46 mV).
      expect(ch.levels.high).toBeCloseTo(4.8, 4);
      expect(ch.levels.low).toBeCloseTo(0.2, 4);
    }
    expect(analysis.speed?.method).toBe('flight');
    expect(analysis.speed?.basis).toBe('pair');
    expect(analysis.speed?.coverage).toBe(2);
    expect(Math.abs((analysis.speed?.value ?? 0) / 300 - 1)).toBeLessThan(1e-5);
    // Occlusion: centred beam, 50 % crossings → ℓ = D exactly (DOMAIN.md, beam width and threshold).
    for (const o of analysis.occlusion) expect(Math.abs(o.speed / 300 - 1)).toBeLessThan(1e-5);
    expect(analysis.crossChecks.every((c) => c.consistent)).toBe(true);
    expect(analysis.warnings).toEqual([]);
  });

  it('noisy trace: speed within its expanded uncertainty, noise per state measured, instants within 4σ of their jitter', () => {
    const { shot, analysis } = simulateAndAnalyze({ noiseRms: 0.05, seed: 5 }, { spacing: 0.1, projectile: { length: D } });
    const speed = analysis.speed!;
    expect(Math.abs(speed.value - trueMeanSpeed(shot, 0, 1))).toBeLessThan(speed.uncertainty);
    const ch = analysis.channels[0];
    expect(ch.noise.high).toBeGreaterThan(0.045);
    expect(ch.noise.high).toBeLessThan(0.055);
    const pulse = ch.pulses[0];
    expect(Math.abs(pulse.start - shot.truth.gates[0].entry)).toBeLessThan(4 * pulse.entry.jitter + 1e-9);
    // σ_t = σ_v/slope: 0.05 V / (0.8·4.6 V over the 1 mm / 300 m/s ramp's 80 %) ≈ 36 ns (DOMAIN.md jitter formula).
    expect(pulse.entry.jitter).toBeGreaterThan(15e-9);
    expect(pulse.entry.jitter).toBeLessThan(40e-9);
  });

  it('hum and spikes: one pulse per gate, no spurious transitions, speed within U', () => {
    const { shot, analysis } = simulateAndAnalyze(
      { noiseRms: 0.02, humAmplitude: 0.15, humFrequency: 50, spikeCount: 25, spikeAmplitude: 2.5, seed: 9 },
      { spacing: 0.1 },
    );
    expect(analysis.channels.map((c) => c.pulses.length)).toEqual([1, 1]);
    expect(analysis.channels.map((c) => c.transitions.length)).toEqual([2, 2]);
    expect(Math.abs(analysis.speed!.value - trueMeanSpeed(shot, 0, 1))).toBeLessThan(analysis.speed!.uncertainty);
  });

  it('slow sensor (τ = 10 µs, a phototransistor): equal delays cancel in the flight time', () => {
    const { shot, analysis } = simulateAndAnalyze({ responseTime: 1e-5, length: 12000 }, { spacing: 0.1 });
    // Each edge is late by about τ·ln 2 (first-order step response) yet the flight speed is unaffected.
    const late = analysis.gates[0].pulses[0].start - shot.truth.gates[0].entry;
    expect(late).toBeGreaterThan(0.5 * 1e-5 * Math.LN2);
    expect(late).toBeLessThan(1.5 * 1e-5 * Math.LN2);
    expect(Math.abs(analysis.speed!.value / 300 - 1)).toBeLessThan(1e-4);
  });

  it('very slow sensor (τ = 100 µs, a photodarlington, on a 133 µs pulse): gates still fire, the cross-check warns', () => {
    // DOMAIN.md: photodarlingtons ~100 µs. The dip never settles, so the width (and ℓ/τ) is distorted while the
    // like-edge flight time is not: exactly what the cross-check exists to flag.
    const { analysis } = simulateAndAnalyze({ responseTime: 1e-4, length: 20000, noiseRms: 0.01 }, { spacing: 0.1, projectile: { length: D } });
    expect(analysis.gates.map((g) => g.status)).toEqual(['ok', 'ok']);
    expect(Math.abs(analysis.speed!.value - 300)).toBeLessThan(analysis.speed!.uncertainty);
    expect(analysis.crossChecks[0].consistent).toBe(false);
    expect(analysis.warnings.join('\n')).toMatch(/cross-check.*slow or asymmetric sensor/);
  });

  it('detects rising and falling polarity from the trace', () => {
    for (const polarity of ['rising', 'falling'] as const) {
      const { analysis } = simulateAndAnalyze({ polarity, noiseRms: 0.01 }, { spacing: 0.1 });
      expect(analysis.channels.map((c) => c.polarity)).toEqual([polarity, polarity]);
      expect(Math.abs(analysis.speed!.value / 300 - 1)).toBeLessThan(1e-3);
    }
  });

  it('a slow projectile whose pulses fill most of the record (53 %): polarity is still read right, in both senses', () => {
    // 10 m/s, 40 mm ball: each beam is blocked for D/v = 4 ms of a 7.5 ms record (common practice: a record set up
    // around the shot starts and ends with the beam clear). Gates 20 mm apart: flight time 2 ms.
    for (const polarity of ['falling', 'rising'] as const) {
      const { shot, analysis } = simulateAndAnalyze(
        { polarity, speed: 10, gatePositions: [0, 0.02], sampleInterval: 1e-6, length: 7500, t0: 0, arrivalTime: 3e-3, noiseRms: 0.01 },
        { spacing: 0.02, projectile: { length: D } },
      );
      const blocked = (shot.truth.gates[0].exit - shot.truth.gates[0].entry) / 7.5e-3;
      expect(blocked).toBeCloseTo(4 / 7.5, 6);
      expect(analysis.channels.map((c) => c.polarity)).toEqual([polarity, polarity]);
      expect(analysis.gates.map((g) => g.status)).toEqual(['ok', 'ok']);
      const speed = analysis.speed!;
      expect(speed.method).toBe('flight');
      expect(Math.abs(speed.value - trueMeanSpeed(shot, 0, 1))).toBeLessThanOrEqual(speed.uncertainty);
    }
  });

  it('two gates wired to one channel: pulses in time order go to the gates in position order', () => {
    const { shot, analysis } = simulateAndAnalyze(
      { gatePositions: [0, 0.3], gateChannels: [0, 0], length: 14000, noiseRms: 0.01 },
      { gates: [{ channel: 'CH1', position: 0.3 }, { channel: 'CH1', position: 0 }] },
    );
    expect(analysis.gates.map((g) => [g.position, g.status])).toEqual([
      [0, 'ok'],
      [0.3, 'ok'],
    ]);
    expect(Math.abs(analysis.gates[1].pulses[0].start - shot.truth.gates[1].entry)).toBeLessThan(1e-8);
    expect(Math.abs(analysis.speed!.value / 300 - 1)).toBeLessThan(1e-4);
  });

  it('three gates with deceleration: the fit gives the speed at the first gate and the deceleration within U', () => {
    const { shot, analysis } = simulateAndAnalyze(
      { speed: 320, deceleration: 15000, gatePositions: [0, 0.15, 0.3], length: 14000, noiseRms: 0.02, seed: 3 },
      { spacing: 0.15, positionTolerance: 0.0001 },
    );
    const fit = analysis.fit!;
    expect(analysis.speed!.basis).toBe('fit');
    expect(Math.abs(analysis.speed!.value - 320)).toBeLessThan(analysis.speed!.uncertainty);
    expect(Math.abs(fit.deceleration - 15000)).toBeLessThan(fit.decelerationUncertainty);
    // The mean speed of the first pair is the speed halfway in time, below v₀: the fit must not be that.
    expect(analysis.flight[0].speed).toBeLessThan(320 - 3);
    expect(Math.abs(analysis.flight[0].speed - trueMeanSpeed(shot, 0, 1))).toBeLessThan(analysis.flight[0].uncertainty);
  });

  it('a missed gate is reported as missed with its sub-threshold dip, and the speed comes from the gates that fired', () => {
    const { shot, analysis } = simulateAndAnalyze(
      { gatePositions: [0, 0.1, 0.2], dipDepth: [1, 1, 0.38], length: 12000, noiseRms: 0.01 },
      { spacing: 0.1 },
    );
    expect(analysis.gates.map((g) => g.status)).toEqual(['ok', 'ok', 'missed']);
    const ch = analysis.channels[2];
    expect(ch.status).toBe('missed');
    expect(ch.pulses).toEqual([]);
    expect(Math.abs(ch.candidate!.depthFraction - 0.38)).toBeLessThan(0.02);
    const g3 = shot.truth.gates[2];
    expect(ch.candidate!.time).toBeGreaterThan(g3.entry);
    expect(ch.candidate!.time).toBeLessThan(g3.exit);
    // The dip's span: from where the blocked fraction leaves the noise (half a beam-crossing time, 1.7 µs, before
    // the 50 % entry instant, plus the 9-sample mean) to where it is back (as long after the exit).
    expect(ch.candidate!.start).toBeGreaterThan(g3.entry - 3e-6);
    expect(ch.candidate!.start).toBeLessThan(g3.entry);
    expect(ch.candidate!.end).toBeGreaterThan(g3.exit);
    expect(ch.candidate!.end).toBeLessThan(g3.exit + 3e-6);
    expect(Math.abs(ch.candidate!.depth! - 0.38 * 4.6)).toBeLessThan(0.01);
    expect(analysis.warnings.join('\n')).toMatch(
      /CH3: missed .*dipped from 0\.(69|70)\d ms to 0\.83\d ms, 1\.7\d V deep \(3[789] % of the step\) \(threshold 50 %\): lower the threshold to use it/,
    );
    expect(analysis.speed!.basis).toBe('pair');
    expect(Math.abs(analysis.speed!.value / 300 - 1)).toBeLessThan(1e-3);
    // Following the advice: a 30 % threshold (arms 20–40 %) catches the 38 % dip and the third gate fires.
    const again = analyzeShot(simulatedShotToCapture(shot), { spacing: 0.1, threshold: { level: 30, hysteresis: 10 } });
    expect(again.gates.map((g) => g.status)).toEqual(['ok', 'ok', 'ok']);
    expect(again.gates[2].pulses[0].start).toBeGreaterThan(g3.entry - 3e-6);
    expect(again.gates[2].pulses[0].start).toBeLessThan(g3.entry + 3e-6);
  });

  it('a missed dip with a burst of noise and a spike near its trailing edge: span and depth are the dip\'s, not the noise\'s', () => {
    // Truth from the simulator: gate 3's dip is 38 % of the 4.6 V step between its entry and exit instants.
    const shot = simulateShot({ gatePositions: [0, 0.1, 0.2], dipDepth: [1, 1, 0.38], length: 12000, noiseRms: 0.01, seed: 7 });
    const g3 = shot.truth.gates[2];
    const v = shot.channels[2].values;
    const index = (t: number) => Math.round((t - shot.time.t0) / shot.time.dt);
    // Pickup in the last 10 µs of the dip: 0.3 V rms, and a 0.5 µs spike down to 70 % of the step 2 µs before the exit.
    const random = createRandom(11);
    for (let i = index(g3.exit - 12e-6); i < index(g3.exit - 2e-6); i++) v[i] += 0.3 * random.normal();
    for (let i = index(g3.exit - 2.5e-6); i < index(g3.exit - 2e-6); i++) v[i] = 4.8 - 0.7 * 4.6;
    const analysis = analyzeShot(simulatedShotToCapture(shot), { spacing: 0.1 });
    const ch = analysis.channels[2];
    expect(ch.status).toBe('missed');
    const c = ch.candidate!;
    expect(Math.abs(c.depthFraction - 0.38)).toBeLessThan(0.01);
    expect(Math.abs(c.depth! - 0.38 * 4.6)).toBeLessThan(0.05);
    expect(c.start).toBeGreaterThan(g3.entry - 3e-6);
    expect(c.start).toBeLessThan(g3.entry);
    expect(c.end).toBeGreaterThan(g3.exit);
    expect(c.end).toBeLessThan(g3.exit + 3e-6);
    // Its time is the dip's middle (the centre's passage), not the spike 2 µs before the exit.
    expect(Math.abs(c.time - g3.centre)).toBeLessThan(2e-6);
    expect(c.message).toMatch(/^dipped from 0\.(69|70)\d ms to 0\.83\d ms, 1\.7\d V deep \(38 % of the step\)$/);
  });

  it('a gate with no dip at all is missed without a candidate, and noise is not analysed into pulses', () => {
    const { analysis } = simulateAndAnalyze({ dipDepth: [1, 0], noiseRms: 0.02 }, { spacing: 0.1, projectile: { length: D } });
    expect(analysis.channels[1].status).toBe('missed');
    expect(analysis.channels[1].transitions).toEqual([]);
    expect(analysis.channels[1].candidate).toBeNull();
    // One gate left: the speed falls back to its occlusion speed ℓ/τ.
    expect(analysis.speed!.method).toBe('occlusion');
    expect(Math.abs(analysis.speed!.value / 300 - 1)).toBeLessThan(2e-3);
  });

  it('hum and noise without a projectile: every gate is missed, none is analysed into noise pulses', () => {
    // A record ending before the ball arrives; 50 Hz hum makes the histogram bimodal (two false "states").
    for (const [hum, noise] of [
      [0.02, 0.02],
      [0.05, 0.005],
      [0.2, 0.01],
    ]) {
      const { analysis } = simulateAndAnalyze(
        { arrivalTime: 1, humAmplitude: hum, noiseRms: noise, length: 200000, sampleInterval: 1e-7 },
        { spacing: 0.1 },
      );
      expect(analysis.gates.map((g) => g.status)).toEqual(['missed', 'missed']);
      expect(analysis.channels.every((c) => c.pulses.length === 0 && c.candidate === null)).toBe(true);
      expect(analysis.speed).toBeNull();
      expect(analysis.warnings).toContain('no gate fired: no speed');
    }
  });

  it('a gate channel with dozens of clean pulses (interference, a chopper) is missed, not timed', () => {
    const capture = simulatedShotToCapture(simulateShot({ gatePositions: [0] }));
    const v = capture.channels[0].values;
    for (let i = 0; i < v.length; i++) v[i] = Math.floor(i / 100) % 2 === 0 ? 4.8 : 0.2;
    const analysis = analyzeShot(capture, { gates: [{ channel: 'CH1', position: 0 }] });
    expect(analysis.gates[0].status).toBe('missed');
    expect(analysis.channels[0].reason).toBe('49 pulses where 1 gate(s) should give 1: hum or noise, not a projectile'); // the 50th is cut by the record's end
  });

  it('off-centre beam (b = 5 mm on a 40 mm ball): occlusion reads +3.3 % and the cross-check warns', () => {
    // DOMAIN.md: chord 2√(R² − b²) is 3.2 % short, so ℓ = D over-states the speed by 3.3 %.
    const { analysis } = simulateAndAnalyze({ beamOffset: 0.005, noiseRms: 0.02 }, { spacing: 0.1, projectile: { length: D } });
    const chord = 2 * Math.sqrt(0.02 ** 2 - 0.005 ** 2);
    for (const o of analysis.occlusion) expect(o.speed / 300).toBeCloseTo(D / chord, 3);
    expect(analysis.crossChecks[0].consistent).toBe(false);
    expect(analysis.warnings.join('\n')).toMatch(/cross-check.*off-centre beam/);
  });

  it('a threshold at 30 % of the step lengthens the pulse by w(1 − 0.3 − 0.3) (DOMAIN.md beam width and threshold)', () => {
    const w = 0.002;
    const { analysis } = simulateAndAnalyze(
      { beamWidth: w },
      { spacing: 0.1, threshold: { unit: 'percent', level: 30, hysteresis: 20 }, projectile: { length: D } },
    );
    expect(analysis.gates[0].pulses[0].width).toBeCloseTo((D + w * 0.4) / 300, 9);
    // ℓ = D is then wrong by 0.4·w, and the analyst is told so.
    expect(analysis.warnings.join('\n')).toMatch(/holds for crossings at 50 % of the step; at 30 % the blocked time also depends on the beam width/);
  });

  it('a threshold in volts with its own hysteresis gives the same flight speed', () => {
    const { analysis } = simulateAndAnalyze({ noiseRms: 0.01 }, { spacing: 0.1, threshold: { unit: 'volts', level: 2.5, hysteresis: 1 } });
    expect(analysis.channels[0].threshold).toEqual({ level: 2.5, lowArm: 1.5, highArm: 3.5 });
    expect(Math.abs(analysis.speed!.value / 300 - 1)).toBeLessThan(1e-3);
  });

  it('Savitzky–Golay smoothing lowers the jitter and leaves the raw trace untouched', () => {
    const shot = simulateShot({ noiseRms: 0.1, seed: 2 });
    const capture = simulatedShotToCapture(shot);
    const before = Float64Array.from(capture.channels[0].values);
    const raw = analyzeShot(capture, { spacing: 0.1 });
    const smooth = analyzeShot(capture, { spacing: 0.1, smoothing: { windowSize: 9, polynomial: 2 } });
    expect(capture.channels[0].values).toEqual(before);
    expect(smooth.channels[0].pulses[0].entry.jitter).toBeLessThan(raw.channels[0].pulses[0].entry.jitter);
    expect(Math.abs(smooth.speed!.value - 300)).toBeLessThan(smooth.speed!.uncertainty);
  });

  it('skips NaN (flagged) samples, even on an edge', () => {
    const shot = simulateShot({ noiseRms: 0.01 });
    const capture = simulatedShotToCapture(shot);
    const edge = Math.round((shot.truth.gates[0].entry - shot.time.t0) / shot.time.dt);
    for (const i of [5, 500, edge, edge + 1, 9000]) capture.channels[0].values[i] = Number.NaN;
    capture.channels[0].invalidCount = 5;
    const analysis = analyzeShot(capture, { spacing: 0.1 });
    expect(analysis.gates[0].status).toBe('ok');
    expect(Math.abs(analysis.gates[0].pulses[0].start - shot.truth.gates[0].entry)).toBeLessThan(2e-8);
    expect(analysis.warnings).toContain('CH1: 5 invalid samples were skipped');
  });

  it('derives Mach number (USSA 1976 speed of sound), kinetic energy and momentum with uncertainties', () => {
    const { analysis } = simulateAndAnalyze({}, { spacing: 0.1, ambient: { temperature: 293.15 }, projectile: { mass: 0.0027, massTolerance: 0.00005 } });
    const d = analysis.derived;
    // c(20 °C) = 343.23 m/s (USSA 1976, DOMAIN.md); 2.7 g ball (ITTF Laws 2.3.2).
    expect(d.speedOfSound!.value).toBeCloseTo(343.23, 2);
    expect(d.mach!.value).toBeCloseTo(300 / 343.23, 4);
    expect(d.kineticEnergy!.value).toBeCloseTo(0.5 * 0.0027 * 300 ** 2, 2);
    expect(d.momentum!.value).toBeCloseTo(0.0027 * 300, 5);
    // Mass dominates: u_rel(E) ≈ √((0.05/2.7/√3)² + (2 u_v/v)²).
    const uv = analysis.speed!.standardUncertainty / 300;
    expect(d.kineticEnergy!.uncertainty / d.kineticEnergy!.value).toBeCloseTo(2 * Math.hypot(0.05 / 2.7 / Math.sqrt(3), 2 * uv), 6);
    expect(speedOfSound(293.15)).toBeCloseTo(343.23, 2);
  });

  it('Monte Carlo (JCGM 101) of the same model agrees with the GUM standard uncertainty', () => {
    const { analysis } = simulateAndAnalyze({ noiseRms: 0.05 }, { spacing: 0.1, monteCarloDraws: 50000 });
    const mc = analysis.speed!.monteCarlo!;
    expect(Math.abs(mc.standardDeviation / analysis.speed!.standardUncertainty - 1)).toBeLessThan(0.03);
    expect(mc.intervalLow).toBeLessThan(analysis.speed!.value);
    expect(mc.intervalHigh).toBeGreaterThan(analysis.speed!.value);
  });

  it('reads an explicit time base and Float32 values the same way as a uniform Float64 record', () => {
    const shot = simulateShot({ noiseRms: 0.01, seed: 4 });
    const capture = simulatedShotToCapture(shot);
    const t = new Float64Array(capture.length);
    for (let i = 0; i < t.length; i++) t[i] = shot.time.t0 + i * shot.time.dt;
    const explicit = analyzeShot({ ...capture, time: { kind: 'explicit', t } }, { spacing: 0.1 });
    const single = analyzeShot(
      { ...capture, channels: capture.channels.map((c) => ({ ...c, values: Float32Array.from(c.values) })) },
      { spacing: 0.1 },
    );
    for (const a of [explicit, single]) {
      expect(Math.abs(a.gates[0].pulses[0].start - shot.truth.gates[0].entry)).toBeLessThan(2e-8);
      expect(Math.abs(a.speed!.value / 300 - 1)).toBeLessThan(1e-3);
    }
  });

  it('reports a flat (disconnected) channel as missed instead of failing', () => {
    const capture = simulatedShotToCapture(simulateShot({ gatePositions: [0, 0.1] }));
    capture.channels[1].values = new Float64Array(capture.length).fill(0.01);
    const analysis = analyzeShot(capture, { spacing: 0.1, projectile: { length: D } });
    expect(analysis.channels[1].status).toBe('missed');
    expect(analysis.gates[1].status).toBe('missed');
    expect(analysis.speed!.method).toBe('occlusion');
  });

  it('a channel that is no gate (a 10 V trigger) neither sets the reference step nor raises warnings', () => {
    const shot = simulateShot({ noiseRms: 0.01 });
    const capture = simulatedShotToCapture(shot);
    const trigger = new Float64Array(capture.length);
    for (let i = 0; i < trigger.length; i++) trigger[i] = i > 800 ? 10 : 0;
    capture.channels.push({ name: 'TRIG', unit: 'V', sourceUnit: 'V', values: trigger, invalidCount: 0 });
    const analysis = analyzeShot(capture, { gates: [{ channel: 'CH1', position: 0 }, { channel: 'CH2', position: 0.1 }] });
    expect(analysis.gates.map((g) => g.status)).toEqual(['ok', 'ok']);
    expect(analysis.warnings).toEqual([]);
    expect(Math.abs(analysis.speed!.value / 300 - 1)).toBeLessThan(1e-3);
  });

  it('returns plain JSON: a round trip through JSON changes nothing', () => {
    const { analysis } = simulateAndAnalyze(
      { gatePositions: [0, 0.1, 0.2], dipDepth: [1, 1, 0.4], noiseRms: 0.02, length: 12000 },
      { spacing: 0.1, projectile: { length: D }, monteCarloDraws: 1000 },
    );
    expect(JSON.parse(JSON.stringify(analysis))).toEqual(analysis);
  });

  it('When a gate map names channels in another case ("ch1" for "CH1"), then they are found and the speed is the same', () => {
    const capture = simulatedShotToCapture(simulateShot());
    const exact = analyzeShot(capture, { gates: [{ channel: 'CH1', position: 0 }, { channel: 'CH2', position: 0.1 }], monteCarloDraws: 0 });
    const folded = analyzeShot(capture, { gates: [{ channel: 'ch1', position: 0 }, { channel: 'Ch2', position: 0.1 }], monteCarloDraws: 0 });
    expect(folded.speed?.value).toBe(exact.speed?.value);
    expect(folded.gates.map((g) => g.channel)).toEqual(['CH1', 'CH2']);
  });

  it('rejects bad gate maps and options with messages a person can act on', () => {
    const capture = simulatedShotToCapture(simulateShot());
    expect(() => analyzeShot(capture, { gates: [{ channel: 'CH9', position: 0.3 }] })).toThrow(
      'the gate at 0.3 m names channel "CH9", which the capture does not have (it has CH1, CH2)',
    );
    expect(() => analyzeShot(capture)).toThrow('gate positions are unknown: give the gates (channel and position) or the gate spacing');
    expect(() => analyzeShot(capture, { spacing: -1 })).toThrow(/^invalid analysis options: .*spacing/s);
    expect(() => analyzeShot({ ...capture, channels: [] }, { spacing: 0.1 })).toThrow('the capture has no channels');
    const copied = { ...capture, channels: [capture.channels[0], { ...capture.channels[0], name: 'CH2' }] };
    expect(() => analyzeShot(copied, { spacing: 0.1 })).toThrow('the gates at 0 m and 0.1 m show the very same pulse: check the gate map');
  });
});
