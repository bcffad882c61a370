/**
 * The parameter set of a shot analysis: one schema for the client's form, the API's request validation and
 * the worker's job data, so all three accept exactly the same options. SI units throughout
 * (metres, seconds, volts, kilograms, kelvin); percentages are of the clear-to-blocked step.
 */
import * as z from 'zod';

export const thresholdSchema = z
  .object({
    /** "percent": `level` and `hysteresis` are percentages of each channel's step, measured from its clear
     * (beam unblocked) level toward its blocked level; "volts": absolute levels. */
    unit: z.enum(['percent', 'volts']).default('percent'),
    /** Where the transition instant is taken: 50 % is the IEEE 181 mesial level. */
    level: z.number().default(50),
    /** Half-width of the hysteresis band around `level`: the trace must go from below level − hysteresis to
     * above level + hysteresis (or back) for a transition to count. 40 % around 50 % = state bands of ±10 %
     * of the amplitude around each state level (IEEE 181 state boundaries). */
    hysteresis: z.number().min(0).default(40),
  })
  .refine((t) => t.unit === 'volts' || (t.level - t.hysteresis > 0 && t.level + t.hysteresis < 100), {
    message: 'a percent threshold and its hysteresis band must lie strictly between 0 % and 100 %',
  });

export const gateSchema = z.object({
  /** Channel name as imported ("CH1"). */
  channel: z.string().min(1),
  /** Position of the gate along the flight path, m. */
  position: z.number(),
});

/** Savitzky–Golay smoothing window (samples, odd) and polynomial order. */
export const smoothingSchema = z
  .object({
    windowSize: z.number().int().min(5).max(1001).refine((n) => n % 2 === 1, 'windowSize must be odd'),
    polynomial: z.number().int().min(1).max(10),
  })
  .refine((s) => s.polynomial < s.windowSize, 'polynomial order must be smaller than windowSize');

export const analysisOptionsSchema = z.object({
  levels: z
    .object({
      /** IEEE 181 histogram method: the mode (default) or the mean of each half. */
      method: z.enum(['mode', 'mean']).default('mode'),
      bins: z.number().int().min(4).max(65536).default(100),
      /** Largest fraction of the samples dropped at each end of the value range as isolated outliers (spikes)
       * before the histogram, so they cannot stretch it; dense states are never dropped (0 = the plain
       * IEEE 181 / Octave method). */
      trimFraction: z.number().min(0).max(0.05).default(0.01),
    })
    .prefault({}),
  threshold: thresholdSchema.prefault({}),
  /** Which like edges time the flight between gates: "both" uses each pulse's mid-time (the mean of its leading and
   * trailing edges, halving interpolation and noise); "leading" or "trailing" uses one edge only, for when the other
   * is disturbed (a sabot or debris following the ball, a sensor that recovers slowly). */
  edges: z.enum(['both', 'leading', 'trailing']).default('both'),
  /** "falling": a blocked beam pulls the output low; "auto": the state the trace spends less time in is blocked. */
  polarity: z.enum(['auto', 'falling', 'rising']).default('auto'),
  /** Savitzky–Golay smoothing before transition detection (the raw trace is kept); null = none. */
  smoothing: smoothingSchema.nullable().default(null),
  /** Gate rig: channel (and pulse order within the channel, by position) → position. When absent, every channel
   * is a gate in column order at 0, spacing, 2·spacing, … */
  gates: z.array(gateSchema).min(1).optional(),
  /** Distance between consecutive gates when `gates` is absent, m. */
  spacing: z.number().positive().optional(),
  /** Half-width of the rectangular tolerance of each gate position, m (common practice for rule-set mounts). */
  positionTolerance: z.number().min(0).default(0.0005),
  /** Time-base accuracy of the scope, ± parts per million, rectangular (common practice: datasheets quote 10–50 ppm). */
  timebaseAccuracyPpm: z.number().min(0).default(50),
  projectile: z
    .object({
      /** Length cut by the beam along the flight path (a sphere's diameter), m: enables occlusion speeds. */
      length: z.number().positive().optional(),
      /** Half-width of the rectangular tolerance of `length`, m. */
      lengthTolerance: z.number().min(0).default(0),
      /** Mass, kg: enables kinetic energy and momentum. */
      mass: z.number().positive().optional(),
      /** Half-width of the rectangular tolerance of `mass`, kg. */
      massTolerance: z.number().min(0).default(0),
    })
    .prefault({}),
  ambient: z
    .object({
      /** Air temperature, K: enables the Mach number. */
      temperature: z.number().positive().optional(),
      /** Half-width of the rectangular tolerance of `temperature`, K. */
      temperatureTolerance: z.number().min(0).default(1),
    })
    .prefault({}),
  missed: z
    .object({
      /** A channel whose step is smaller than this many noise standard deviations has no usable pulse. */
      minSnr: z.number().positive().default(10),
      /** A channel whose step is smaller than this fraction of the reference step (the largest good channel's,
       * or `expectedStep`) is reported as missed. When absent: the percent threshold's level (a dip that does not
       * reach the threshold of a full step is missed, and lowering the threshold brings it back), or 0.5. */
      minStepFraction: z.number().min(0).max(1).optional(),
      /** Clear-to-blocked step of the gates, V, when known from the rig. */
      expectedStep: z.number().positive().optional(),
      /** Dips shallower than this fraction of the reference step are not reported as candidates. */
      minCandidateFraction: z.number().min(0).max(1).default(0.1),
    })
    .prefault({}),
  /** Coverage factor for the flight/occlusion cross-check: warn when they differ by more than k·u(difference). */
  crossCheckCoverage: z.number().positive().default(2),
  /** Monte Carlo draws (JCGM 101) to validate the speed's uncertainty; 0 = off. */
  monteCarloDraws: z.number().int().min(0).max(10_000_000).default(0),
  /** Seed of the Monte Carlo generator (same seed, same result). */
  seed: z.number().int().default(1),
});

/** Options after parsing: every default filled in. */
export type AnalysisOptions = z.infer<typeof analysisOptionsSchema>;
/** Options as a caller may give them (any field may be left out). */
export type AnalysisOptionsInput = z.input<typeof analysisOptionsSchema>;
