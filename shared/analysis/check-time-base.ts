import type { TimeBaseOrigin } from '../contracts/capture.ts';
import type { TimeBaseCheck, TimeBaseCheckReason } from './types.ts';

export interface CheckTimeBaseInput {
  /** Sample interval of the record (mean step of an explicit time base), s. */
  sampleInterval: number;
  /** How the importer found the time base (absent for captures read before it was recorded). */
  timeOrigin?: TimeBaseOrigin;
  /** Every speed the analysis reports, with a label for the message, m/s. */
  speeds: { label: string; value: number }[];
  /** The flight speed the pulse widths are compared with (null: fewer than two gates fired), m/s. */
  flightSpeed: number | null;
  /** Pulse width of each gate that fired, s. */
  pulses: { label: string; width: number }[];
  /** Projectile length logged for the shot (undefined when none was), m. */
  projectileLength?: number;
}

export interface CheckTimeBaseOptions {
  /** Slowest plausible speed, m/s (common practice: nothing launched past light gates is slower). @default 0.1 */
  minSpeed?: number;
  /** Fastest plausible speed, m/s (from memory: two-stage light-gas guns reach about 7–10 km/s). @default 10000 */
  maxSpeed?: number;
  /** Largest factor between the projectile length implied by a pulse width (speed × width) and the logged one. @default 3 */
  lengthFactor?: number;
  /** Longest plausible sample interval for a record that shows gate pulses, s (common practice: a projectile
   * crosses a beam in micro- to milliseconds, so a useful record samples far faster than 1 kHz). @default 1e-3 */
  maxSampleInterval?: number;
}

const num = (x: number): string => String(Number(x.toPrecision(3)));
/** A duration in the unit that reads best (0.000666 s → "666 µs"). */
function duration(t: number): string {
  const a = Math.abs(t);
  if (a >= 1 || a === 0) return `${num(t)} s`;
  if (a >= 1e-3) return `${num(t * 1e3)} ms`;
  if (a >= 1e-6) return `${num(t * 1e6)} µs`;
  return `${num(t * 1e9)} ns`;
}
const length = (x: number): string => (Math.abs(x) >= 1 ? `${num(x)} m` : Math.abs(x) >= 1e-4 ? `${num(x * 1e3)} mm` : `${num(x * 1e6)} µm`);

/**
 * Decides whether a result may be stated as a measurement, or must be marked "check the time base": a speed
 * outside the plausible range, pulse widths that imply a projectile length far from the logged one, a sample
 * interval too long for gate pulses, or a time base the importer rebuilt or assumed. A misread time base
 * (1 s per sample instead of 1 µs) scales every speed by the same factor and keeps the uncertainty relative,
 * so nothing else in the analysis catches it: these checks look at the magnitudes themselves.
 */
export function checkTimeBase(input: CheckTimeBaseInput, options: CheckTimeBaseOptions = {}): TimeBaseCheck {
  const { minSpeed = 0.1, maxSpeed = 10_000, lengthFactor = 3, maxSampleInterval = 1e-3 } = options;
  if (!(input.sampleInterval > 0)) throw new RangeError('sampleInterval must be a positive number of seconds');
  if (!(minSpeed > 0 && maxSpeed > minSpeed)) throw new RangeError('minSpeed must be positive and below maxSpeed');
  if (!(lengthFactor > 1)) throw new RangeError('lengthFactor must be above 1');
  const reasons: TimeBaseCheckReason[] = [];

  const outside = input.speeds.filter((s) => !(s.value >= minSpeed && s.value <= maxSpeed));
  if (outside.length > 0) {
    const s = outside[0];
    const more = outside.length > 1 ? ` (and ${outside.length - 1} more)` : '';
    reasons.push({
      code: 'speed-range',
      message: `the ${s.label} of ${num(s.value)} m/s${more} is outside ${minSpeed}–${maxSpeed.toLocaleString('en-US').replace(/,/g, '\u00a0')} m/s, the range a launched projectile can have`,
    });
  }

  const logged = input.projectileLength;
  if (logged !== undefined && logged > 0 && input.flightSpeed !== null && Number.isFinite(input.flightSpeed)) {
    const v = Math.abs(input.flightSpeed);
    const off = input.pulses
      .map((p) => ({ ...p, implied: v * p.width }))
      .filter((p) => p.implied > lengthFactor * logged || p.implied < logged / lengthFactor);
    if (off.length > 0) {
      const p = off[0];
      const factor = p.implied > logged ? p.implied / logged : logged / p.implied;
      reasons.push({
        code: 'length-mismatch',
        message:
          `at ${num(v)} m/s the ${duration(p.width)} pulse of ${p.label} implies a projectile ${length(p.implied)} long, ` +
          `${num(factor)} times ${p.implied > logged ? 'longer' : 'shorter'} than the logged ${length(logged)}` +
          (off.length > 1 ? ` (${off.length} gates disagree)` : ''),
      });
    }
  }

  if (input.pulses.length > 0 && input.sampleInterval > maxSampleInterval) {
    reasons.push({
      code: 'coarse-sampling',
      message: `the sample interval is ${duration(input.sampleInterval)}, above ${duration(maxSampleInterval)}, yet the gates show pulses: a projectile crosses a beam in micro- to milliseconds`,
    });
  }

  const origin = input.timeOrigin;
  if (origin?.how === 'rebuilt') {
    reasons.push({ code: 'time-base-rebuilt', message: `the time base was rebuilt, not read: ${origin.source}` });
  }
  if (origin?.assumed) {
    reasons.push({ code: 'time-base-assumed', message: `the reader assumed part of the time base: ${origin.source}` });
  }
  return { flagged: reasons.length > 0, reasons };
}
