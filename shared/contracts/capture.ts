/**
 * The in-memory form of an imported scope capture: what shared/import produces and shared/analysis consumes.
 * SI inside, always: times in seconds, values in volts (or the channel's SI unit).
 */

/** Evenly spaced samples: t[i] = t0 + i·dt. `jitter` is the largest deviation of the file's own time column
 * from that grid, in seconds (0 when the file gave no time column). */
export interface UniformTimeBase {
  kind: 'uniform';
  t0: number;
  dt: number;
  jitter: number;
}

/** Unevenly spaced samples: one strictly increasing time per sample, in seconds. */
export interface ExplicitTimeBase {
  kind: 'explicit';
  t: Float64Array;
}

export type TimeBase = UniformTimeBase | ExplicitTimeBase;

export interface ChannelData {
  /** Name as the file gives it ("CH1", "Gate A"), or "CH<n>" by column order when it gives none. */
  name: string;
  /** SI unit of `values` after conversion ("V"; "A" for a current probe; "" when the file gave none). */
  unit: string;
  /** Unit as written in the file ("mV", "kV"), for display. */
  sourceUnit: string;
  /** One value per sample. Samples that were NaN, overrange or clipped sentinels are NaN here and counted below. */
  values: Float32Array | Float64Array;
  /** Count of samples flagged as invalid (NaN/overrange/clipped sentinels), never silently turned into numbers. */
  invalidCount: number;
}

/**
 * How a capture's time base was found: shown beside the file ("how it was read"), stored with the capture, and
 * read by the analysis, which flags a result whose time base was rebuilt or assumed ("check the time base").
 */
export interface TimeBaseOrigin {
  /**
   * 'time-column': the file's own time column, in a unit it states;
   * 'metadata': start and interval stated by the file (preamble, header columns or fields beside the data);
   * 'rebuilt': the printed times were too coarse for their offset, so the grid was rebuilt from the interval the file states;
   * 'given': the user gave the interval (`dt` option, "Fix how it is read", `--dt`).
   */
  how: 'time-column' | 'metadata' | 'rebuilt' | 'given';
  /** Where, in words a user can check: "from `Increment` in the second header row". */
  source: string;
  /** True when the reader had to assume something about time (e.g. seconds, because no unit was written). */
  assumed: boolean;
}

export interface ImportedCapture {
  channels: ChannelData[];
  time: TimeBase;
  /** Number of samples per channel (every channel has the same length). */
  length: number;
  /** Key/value metadata read from the file's preamble or side columns, keys as written. */
  metadata: Record<string, string>;
  /** What the importer detected (or was told), so a user can check it. */
  layout: Record<string, unknown>;
  /** Human-readable warnings, e.g. "column 4 is empty and was ignored", "12 clipped samples in CH2". */
  warnings: string[];
  /** How the time base was found (absent on captures read before it was recorded). */
  timeOrigin?: TimeBaseOrigin;
  /** 'codes': the values are raw converter codes, not volts (the file gave no usable scale). Timing still works. */
  valueKind?: 'physical' | 'codes';
}
