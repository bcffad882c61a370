import { describe, expect, it } from 'vitest';
import { analyzeShot } from '../../../shared/analysis/analyze-shot.ts';
import { checkTimeBase } from '../../../shared/analysis/check-time-base.ts';
import { describeAssumptions } from '../../../shared/analysis/describe-assumptions.ts';
import type { ImportedCapture } from '../../../shared/contracts/capture.ts';
import { simulateShot } from '../../../shared/simulate/simulate-shot.ts';
import { simulatedShotToCapture } from '../../../shared/simulate/simulated-shot-to-capture.ts';

// Truths come from the simulator's inputs (speed, spacing, ball size), never from the engine.
const D = 0.04; // table-tennis ball, ITTF Laws 2.3.1
const codes = (c: { reasons: { code: string }[] }) => c.reasons.map((r) => r.code);

/** A 66.6 m/s shot through gates 0.1 m apart, sampled every 1 µs for 4 ms. */
function slowShot(): ImportedCapture {
  return simulatedShotToCapture(simulateShot({ speed: 66.6, arrivalTime: 5e-4, sampleInterval: 1e-6, length: 4000 }));
}

describe('the "check the time base" flag', () => {
  it('When the time base is misread as 1 s per sample, then 0.0000666 m/s comes out flagged, not as a measurement (issue 10)', () => {
    const right = analyzeShot(slowShot(), { spacing: 0.1, projectile: { length: D } });
    expect(right.speed!.value).toBeCloseTo(66.6, 2);
    expect(right.timeBaseCheck).toEqual({ flagged: false, reasons: [] });

    // The same samples with sample numbers taken for seconds: every duration 10⁶ times too long.
    const misread: ImportedCapture = {
      ...slowShot(),
      time: { kind: 'uniform', t0: 0, dt: 1, jitter: 0 },
      timeOrigin: { how: 'time-column', source: 'column 1, no unit written: seconds assumed', assumed: true },
    };
    const a = analyzeShot(misread, { spacing: 0.1, projectile: { length: D } });
    expect(a.speed!.value).toBeCloseTo(0.0000666, 9);
    expect(a.timeBaseCheck!.flagged).toBe(true);
    expect(codes(a.timeBaseCheck!)).toEqual(['speed-range', 'coarse-sampling', 'time-base-assumed']);
    expect(a.timeBaseCheck!.reasons[0].message).toBe(
      'the speed of 0.0000666 m/s (and 3 more) is outside 0.1–10\u00a0000 m/s, the range a launched projectile can have',
    );
    expect(a.timeBaseCheck!.reasons[1].message).toMatch(/^the sample interval is 1 s, above 1 ms, yet the gates show pulses/);
  });

  it('When the gate spacing is typed in millimetres as metres, then the speed and the implied projectile length are flagged', () => {
    const capture = simulatedShotToCapture(simulateShot({}));
    const a = analyzeShot(capture, { spacing: 100, projectile: { length: D } });
    expect(a.speed!.value).toBeCloseTo(300_000, -2);
    expect(codes(a.timeBaseCheck!)).toEqual(['speed-range', 'length-mismatch']);
    // v·τ = 300 000 m/s × 133 µs = 40 m against the logged 40 mm: a factor of 1000.
    expect(a.timeBaseCheck!.reasons[1].message).toBe(
      'at 300000 m/s the 133 µs pulse of CH1 @ 0 m implies a projectile 40 m long, 1000 times longer than the logged 40 mm (2 gates disagree)',
    );
  });

  it('When the logged projectile length is off by more than a factor of 3, then only the length check flags it; within 3 it does not', () => {
    const capture = simulatedShotToCapture(simulateShot({}));
    const fivefold = analyzeShot(capture, { spacing: 0.1, projectile: { length: 5 * D } });
    expect(codes(fivefold.timeBaseCheck!)).toEqual(['length-mismatch']);
    expect(fivefold.timeBaseCheck!.reasons[0].message).toContain('5 times shorter than the logged 200 mm');
    expect(analyzeShot(capture, { spacing: 0.1, projectile: { length: 2.9 * D } }).timeBaseCheck!.flagged).toBe(false);
    expect(analyzeShot(capture, { spacing: 0.1, projectile: { length: D / 2.9 } }).timeBaseCheck!.flagged).toBe(false);
    // Without a logged length there is nothing to compare with.
    expect(analyzeShot(capture, { spacing: 0.1 }).timeBaseCheck!.flagged).toBe(false);
  });

  it('When the importer rebuilt the time base, then the result is flagged with where the interval came from', () => {
    const capture: ImportedCapture = {
      ...simulatedShotToCapture(simulateShot({})),
      timeOrigin: { how: 'rebuilt', source: 'from `Sample Interval` in the preamble (line 3)', assumed: false },
    };
    const a = analyzeShot(capture, { spacing: 0.1 });
    expect(a.timeBaseCheck).toEqual({
      flagged: true,
      reasons: [{ code: 'time-base-rebuilt', message: 'the time base was rebuilt, not read: from `Sample Interval` in the preamble (line 3)' }],
    });
    expect(a.assumptions!.timeBase).toEqual(capture.timeOrigin);
  });

  it('When the values are converter codes, then that is stated as an assumption but timing is not flagged', () => {
    const capture: ImportedCapture = { ...simulatedShotToCapture(simulateShot({})), valueKind: 'codes' };
    const a = analyzeShot(capture, { spacing: 0.1 });
    expect(a.timeBaseCheck!.flagged).toBe(false);
    expect(a.assumptions!.values).toBe('codes');
    expect(describeAssumptions(a.assumptions!).find((l) => l.label === 'Values')!.text).toMatch(/^raw converter codes, not volts/);
  });

  it('sample interval: above 1 ms with gate pulses is flagged; 1 ms, or no pulse at all, is not', () => {
    const base = { speeds: [{ label: 'speed', value: 1 }], flightSpeed: 1, pulses: [{ label: 'CH1 @ 0 m', width: 0.04 }] };
    expect(codes(checkTimeBase({ ...base, sampleInterval: 1.5e-3 }))).toEqual(['coarse-sampling']);
    expect(checkTimeBase({ ...base, sampleInterval: 1.5e-3 }).reasons[0].message).toBe(
      'the sample interval is 1.5 ms, above 1 ms, yet the gates show pulses: a projectile crosses a beam in micro- to milliseconds',
    );
    expect(checkTimeBase({ ...base, sampleInterval: 1e-3 }).flagged).toBe(false);
    expect(checkTimeBase({ ...base, pulses: [], sampleInterval: 1 }).flagged).toBe(false);
  });

  it('speed range: 0.1 and 10 000 m/s pass, just outside either end, a negative speed or NaN is flagged', () => {
    const at = (value: number) => checkTimeBase({ sampleInterval: 1e-7, speeds: [{ label: 'speed', value }], flightSpeed: null, pulses: [] });
    expect(at(0.1).flagged).toBe(false);
    expect(at(10_000).flagged).toBe(false);
    for (const v of [0.0999, 10_001, -300, Number.NaN]) expect(codes(at(v))).toEqual(['speed-range']);
  });

  it('rejects nonsense limits and intervals with exact messages', () => {
    const input = { sampleInterval: 1e-7, speeds: [], flightSpeed: null, pulses: [] };
    expect(() => checkTimeBase({ ...input, sampleInterval: 0 })).toThrow(new RangeError('sampleInterval must be a positive number of seconds'));
    expect(() => checkTimeBase(input, { minSpeed: 5, maxSpeed: 1 })).toThrow(new RangeError('minSpeed must be positive and below maxSpeed'));
    expect(() => checkTimeBase(input, { lengthFactor: 1 })).toThrow(new RangeError('lengthFactor must be above 1'));
  });
});

describe('the assumptions stated beside a result', () => {
  it('When defaults are used, then the ±0.5 mm and 50 ppm behind the budget are stated, with threshold, hysteresis and edges', () => {
    const a = analyzeShot(simulatedShotToCapture(simulateShot({})), { spacing: 0.1, projectile: { length: D, lengthTolerance: 1e-4 } });
    expect(a.assumptions).toEqual({
      positionTolerance: 0.0005,
      timebaseAccuracyPpm: 50,
      projectile: { length: D, lengthTolerance: 1e-4 },
      threshold: { unit: 'percent', level: 50, hysteresis: 40 },
      edges: 'both',
      sampleInterval: 1e-7,
      timeBase: null,
      values: 'physical',
    });
    expect(describeAssumptions(a.assumptions!)).toEqual([
      { label: 'Gate positions', text: '± 0.5 mm each (rectangular)' },
      { label: 'Time-base accuracy', text: '± 50 ppm (rectangular)' },
      { label: 'Projectile length', text: '40 mm ± 0.1 mm (rectangular)' },
      { label: 'Threshold', text: '50 % of each channel’s step, hysteresis ± 40 %' },
      { label: 'Edges', text: 'pulse mid-times (leading and trailing edges averaged)' },
      { label: 'Sample interval', text: '100 ns' },
      { label: 'Values', text: 'volts (or the unit the file states)' },
    ]);
  });

  it('When volts, leading edges and a time base from metadata are used, then the lines say so', () => {
    const capture: ImportedCapture = {
      ...simulatedShotToCapture(simulateShot({})),
      timeOrigin: { how: 'metadata', source: 'from `Increment` in the second header row', assumed: false },
    };
    const a = analyzeShot(capture, { spacing: 0.1, threshold: { unit: 'volts', level: 2.5, hysteresis: 0.5 }, edges: 'leading', positionTolerance: 0.001, timebaseAccuracyPpm: 20 });
    const lines = Object.fromEntries(describeAssumptions(a.assumptions!).map((l) => [l.label, l.text]));
    expect(lines['Gate positions']).toBe('± 1 mm each (rectangular)');
    expect(lines['Time-base accuracy']).toBe('± 20 ppm (rectangular)');
    expect(lines['Projectile length']).toBe('not given (no occlusion speed or length check)');
    expect(lines.Threshold).toBe('2.5 V, hysteresis ± 0.5 V');
    expect(lines.Edges).toBe('leading edges only');
    expect(lines['Sample interval']).toBe('100 ns, built from the start and interval the file states (from `Increment` in the second header row)');
  });
});
