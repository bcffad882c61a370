/**
 * The result of a shot analysis. Plain numbers, strings, arrays and objects only (no typed arrays, no
 * Infinity): the worker stores it as JSONB and the client reads it back unchanged. SI units: s, m, V, m/s.
 */
import type { AnalysisOptions } from '../contracts/analysis.ts';
import type { TimeBaseOrigin } from '../contracts/capture.ts';
import type { BudgetLine } from './measurement-model.ts';

export type Polarity = 'falling' | 'rising';

export interface TransitionResult {
  direction: 'rising' | 'falling';
  /** Mesial (threshold) crossing, s. */
  time: number;
  /** 10–90 % transition duration, s (null when a reference level was not crossed). */
  duration: number | null;
  /** Slope at the crossing, V/s. */
  slope: number;
  /** Standard uncertainty of `time` from noise, σ_v/|slope|·√((1−α)² + α²), s. */
  jitter: number;
  /** Half-width of the rectangular interpolation error of `time`, s. */
  interpolationHalfWidth: number;
}

export interface PulseResult {
  /** Beam blocked (mesial instant of the entry transition), s. */
  start: number;
  /** Beam clear again, s. */
  end: number;
  /** end − start, s. */
  width: number;
  entry: TransitionResult;
  exit: TransitionResult;
}

export interface DipCandidate {
  /** Depth of the dip's core toward the blocked level, as a fraction of the reference step. */
  depthFraction: number;
  /** Middle of the dip's core (half depth to half depth), s; engines before 1.4.0: its deepest point. */
  time: number;
  /** Where the dip leaves the idle level's noise and where it has returned within it, s (absent in results
   * of engines before 1.4.0, which carry only `time`). */
  start?: number;
  end?: number;
  /** Depth of the dip's core below (or above) the idle level, V (positive; absent in older results). */
  depth?: number;
  message: string;
}

export interface ChannelResult {
  name: string;
  status: 'ok' | 'missed';
  /** Why a channel was judged missed, in words; null when ok. */
  reason: string | null;
  polarity: Polarity;
  /** IEEE 181 state levels, V. */
  levels: { low: number; high: number; amplitude: number; method: 'mode' | 'mean'; bins: number };
  /** IEEE 181 reference levels (10 / 50 / 90 % of the amplitude above the low state), V. */
  referenceLevels: { proximal: number; mesial: number; distal: number };
  /** Standard deviation within each state, V. */
  noise: { low: number | null; high: number | null };
  /** Amplitude over the clear state's noise (null for a noise-free record). */
  snr: number | null;
  /** Levels actually used for detection, V: crossing level and the hysteresis band. */
  threshold: { level: number; lowArm: number; highArm: number } | null;
  smoothed: boolean;
  invalidCount: number;
  transitions: TransitionResult[];
  pulses: PulseResult[];
  candidate: DipCandidate | null;
}

export interface GateResult {
  channel: string;
  position: number;
  status: 'ok' | 'missed';
  /** The pulse assigned to this gate (empty when missed), s. */
  pulses: { start: number; end: number; width: number }[];
}

export interface SpeedResult {
  method: 'flight' | 'occlusion';
  /** How the value was obtained: a constant-deceleration fit, one pair of gates, or one gate's occlusion. */
  basis: 'fit' | 'pair' | 'occlusion';
  /** Speed at the first gate that fired (mean speed over the span for a pair), m/s. */
  value: number;
  /** Expanded uncertainty U = k·u_c, m/s. */
  uncertainty: number;
  coverage: 2;
  standardUncertainty: number;
  budget: BudgetLine[];
  /** JCGM 101 validation when Monte Carlo draws were asked for. */
  monteCarlo: { draws: number; mean: number; standardDeviation: number; intervalLow: number; intervalHigh: number } | null;
}

export interface FlightPairResult {
  from: { channel: string; position: number };
  to: { channel: string; position: number };
  /** Mean speed over the span from the pulse mid-times (leading and trailing edges together), m/s. */
  speed: number;
  /** Expanded uncertainty (k = 2), m/s. */
  uncertainty: number;
  /** From leading edges only and from trailing edges only, m/s. */
  leadingEdgeSpeed: number;
  trailingEdgeSpeed: number;
}

export interface FitResult {
  gates: number;
  /** Speed at the first gate, m/s, and its expanded uncertainty (k = 2). */
  speed: number;
  speedUncertainty: number;
  /** Deceleration, m/s² (positive = slowing), and its expanded uncertainty (k = 2). */
  deceleration: number;
  decelerationUncertainty: number;
}

export interface OcclusionResult {
  channel: string;
  position: number;
  /** Length along the path assumed cut by the beam, m. */
  length: number;
  /** Blocked time, s. */
  width: number;
  speed: number;
  /** Expanded uncertainty (k = 2), m/s. */
  uncertainty: number;
}

export interface CrossCheckResult {
  /** Gate positions the comparison covers. */
  positions: number[];
  occlusionSpeed: number;
  flightSpeed: number;
  /** occlusion − flight, m/s, and k·u of that difference (k = crossCheckCoverage). */
  difference: number;
  limit: number;
  consistent: boolean;
}

export interface QuantityWithUncertainty {
  value: number;
  /** Expanded uncertainty (k = 2). */
  uncertainty: number;
}

export interface DerivedResult {
  /** Speed of sound at the ambient temperature, m/s. */
  speedOfSound: QuantityWithUncertainty | null;
  mach: QuantityWithUncertainty | null;
  /** J */
  kineticEnergy: QuantityWithUncertainty | null;
  /** kg·m/s */
  momentum: QuantityWithUncertainty | null;
}

/** Why a result is marked "check the time base". */
export interface TimeBaseCheckReason {
  code: 'speed-range' | 'length-mismatch' | 'coarse-sampling' | 'time-base-rebuilt' | 'time-base-assumed';
  /** In words a user can act on. */
  message: string;
}

/**
 * "Check the time base": when `flagged`, the speed is not stated as a measurement (shown greyed with the reasons)
 * and review cannot approve the version until an analyst confirms the read or a new version fixes it.
 */
export interface TimeBaseCheck {
  flagged: boolean;
  reasons: TimeBaseCheckReason[];
}

/** Every assumption behind the result, stated beside it (CLI, API, shot page, report). SI units. */
export interface AnalysisAssumptions {
  /** Half-width of the rectangular tolerance of each gate position, m. */
  positionTolerance: number;
  /** Half-width of the rectangular time-base (clock) accuracy, parts per million. */
  timebaseAccuracyPpm: number;
  /** Length cut by the beam and the half-width of its rectangular tolerance, m (length null when none was given). */
  projectile: { length: number | null; lengthTolerance: number };
  /** Crossing level and hysteresis half-width: percent of each channel's step, or volts. */
  threshold: { unit: 'percent' | 'volts'; level: number; hysteresis: number };
  /** Which like edges time the flight: both (pulse mid-times), leading or trailing. */
  edges: 'both' | 'leading' | 'trailing';
  /** Sample interval of the record (mean step of an explicit time base), s. */
  sampleInterval: number;
  /** How the importer found the time base (null for captures read before it was recorded). */
  timeBase: TimeBaseOrigin | null;
  /** 'codes': the values are raw converter codes, not volts (the levels are in codes; timing is unaffected). */
  values: 'physical' | 'codes';
}

export interface ShotAnalysis {
  engineVersion: string;
  options: AnalysisOptions;
  channels: ChannelResult[];
  gates: GateResult[];
  speed: SpeedResult | null;
  flight: FlightPairResult[];
  fit: FitResult | null;
  occlusion: OcclusionResult[];
  crossChecks: CrossCheckResult[];
  derived: DerivedResult;
  warnings: string[];
  /** Absent in results of engines before 1.3.0. */
  assumptions?: AnalysisAssumptions;
  /** Absent in results of engines before 1.3.0 (they were not checked). */
  timeBaseCheck?: TimeBaseCheck;
}
