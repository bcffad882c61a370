import type { ChannelData, ImportedCapture, TimeBaseOrigin } from '../contracts/capture.ts';
import { ImportError } from './import-error.ts';

export interface CombineCapturesOptions {
  /** Largest difference of t0, dt or sample times allowed, as a fraction of dt. @default 0.01 */
  tolerance?: number;
  /** Names of the captures (file names) for the messages and the channel-name clash check. @default "capture 1", … */
  labels?: string[];
}

/**
 * Combines captures of one shot written one file per channel into a single capture on their common time base.
 * Every capture must have the same number of samples and the same time base (t0 and dt, or the same explicit
 * times, within `tolerance`·dt); otherwise an ImportError says which file disagrees and by how much.
 */
export function combineCaptures(captures: ImportedCapture[], options: CombineCapturesOptions = {}): ImportedCapture {
  const { tolerance = 0.01, labels = captures.map((_, i) => `capture ${i + 1}`) } = options;
  if (!Array.isArray(captures) || captures.length === 0) throw new RangeError('captures must be a non-empty array');
  if (labels.length !== captures.length) throw new RangeError('labels must have one entry per capture');
  if (!(tolerance >= 0)) throw new RangeError('tolerance must be a number >= 0');
  const [base, ...rest] = captures;
  const dtOf = (c: ImportedCapture) => (c.time.kind === 'uniform' ? c.time.dt : (c.time.t[c.length - 1] - c.time.t[0]) / (c.length - 1));
  const dt = dtOf(base);
  const limit = tolerance * dt;
  rest.forEach((c, k) => {
    const label = labels[k + 1];
    if (c.length !== base.length) {
      throw new ImportError(`${label} has ${c.length} samples but ${labels[0]} has ${base.length}; files of one shot must share the time base`);
    }
    if (c.time.kind === 'uniform' && base.time.kind === 'uniform') {
      const dDt = Math.abs(c.time.dt - base.time.dt);
      if (dDt * (base.length - 1) > limit) {
        throw new ImportError(`${label} has a sample interval of ${c.time.dt} s but ${labels[0]} has ${base.time.dt} s; they cannot be put on one time base`);
      }
      const dT0 = Math.abs(c.time.t0 - base.time.t0);
      if (dT0 > limit) {
        throw new ImportError(`${label} starts at ${c.time.t0} s but ${labels[0]} starts at ${base.time.t0} s (${(dT0 / dt).toPrecision(3)} samples apart); they cannot be put on one time base`);
      }
    } else {
      const tb = timesOf(base);
      const tc = timesOf(c);
      for (let i = 0; i < base.length; i++) {
        if (Math.abs(tb[i] - tc[i]) > limit) {
          throw new ImportError(`sample ${i + 1} of ${label} is at ${tc[i]} s but the same sample of ${labels[0]} is at ${tb[i]} s; they cannot be put on one time base`);
        }
      }
    }
  });
  const seen = new Map<string, number>();
  const channels: ChannelData[] = [];
  captures.forEach((c, k) => {
    for (const ch of c.channels) {
      // Several files each calling their one channel "CH1" is the usual case; make the names tell them apart.
      const clash = seen.has(ch.name);
      seen.set(ch.name, k);
      channels.push(clash ? { ...ch, name: `${ch.name} (${labels[k]})` } : ch);
    }
  });
  const metadata: Record<string, string> = {};
  captures.forEach((c, k) => {
    for (const [key, value] of Object.entries(c.metadata)) metadata[k === 0 ? key : `${labels[k]}: ${key}`] = value;
  });
  return {
    channels,
    time: base.time,
    length: base.length,
    metadata,
    layout: { combinedFrom: labels, parts: captures.map((c) => c.layout) },
    warnings: captures.flatMap((c, k) => c.warnings.map((w) => `${labels[k]}: ${w}`)),
    timeOrigin: combinedOrigin(captures, labels),
    valueKind: captures.some((c) => c.valueKind === 'codes') ? 'codes' : 'physical',
  };
}

/** One file's rebuilt or assumed time base makes the combined one so: the weakest part decides. */
function combinedOrigin(captures: ImportedCapture[], labels: string[]): TimeBaseOrigin | undefined {
  const origins = captures.map((c) => c.timeOrigin);
  if (origins.every((o) => o === undefined)) return undefined;
  const known = origins.filter((o): o is TimeBaseOrigin => o !== undefined);
  const how = known.find((o) => o.how === 'rebuilt')?.how ?? known.find((o) => o.how === 'given')?.how ?? known[0].how;
  return {
    how,
    source: origins.map((o, k) => `${labels[k]}: ${o?.source ?? 'not recorded'}`).join('; '),
    assumed: known.some((o) => o.assumed),
  };
}

function timesOf(c: ImportedCapture): Float64Array {
  if (c.time.kind === 'explicit') return c.time.t;
  const t = new Float64Array(c.length);
  for (let i = 0; i < c.length; i++) t[i] = c.time.t0 + i * c.time.dt;
  return t;
}
