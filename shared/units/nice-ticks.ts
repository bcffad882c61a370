export interface NiceTicksOptions {
  /** Most ticks wanted across the range. @default 6 */
  maxTicks?: number;
}

export interface NiceTicks {
  /** Tick values in the range's own unit (seconds for time), ascending, all inside [from, to]. */
  values: number[];
  /** Distance between ticks: 1, 2 or 5 times a power of ten. */
  step: number;
}

/**
 * Round tick values for an axis: a step of 1, 2 or 5 × 10ⁿ (the "1-2-5" series common on oscilloscope graticules
 * and plotting libraries, common practice) chosen so at most `maxTicks` ticks fit, placed at whole multiples of
 * the step. Every gap between ticks and between a tick and an end of the range is at most one step.
 */
export function niceTicks(from: number, to: number, options: NiceTicksOptions = {}): NiceTicks {
  const { maxTicks = 6 } = options;
  if (!(Number.isFinite(from) && Number.isFinite(to) && to > from)) throw new RangeError('the range must be finite with to > from');
  if (!(Number.isInteger(maxTicks) && maxTicks >= 2)) throw new RangeError('maxTicks must be a whole number of at least 2');
  const span = to - from;
  const power = 10 ** Math.floor(Math.log10(span / maxTicks));
  // The smallest 1-2-5 step whose ticks (whole multiples inside the range) number at most maxTicks.
  for (const m of [1, 2, 5, 10, 20]) {
    const step = m * power;
    const first = Math.ceil(from / step - 1e-9);
    const last = Math.floor(to / step + 1e-9);
    if (last - first + 1 > maxTicks) continue;
    const values: number[] = [];
    for (let k = first; k <= last; k++) values.push(Number((k * step).toPrecision(12)));
    return { values, step: Number(step.toPrecision(12)) };
  }
  throw new RangeError('no round step fits the range'); // unreachable: 20·power exceeds span/maxTicks·2
}

export interface TimeTickLabels {
  /** Unit of the labels, with its SI prefix. */
  unit: 'ns' | 'µs' | 'ms' | 's';
  scale: number;
  /** Each tick as text in `unit`, with as many decimals as the step needs (none for a whole step). */
  labels: string[];
  values: number[];
}

/** Round time ticks (seconds in, labels in the SI prefix that suits the range: "0", "200", "400" µs). */
export function timeTicks(from: number, to: number, options: NiceTicksOptions = {}): TimeTickLabels {
  const { values, step } = niceTicks(from, to, options);
  const extent = Math.max(Math.abs(from), Math.abs(to), to - from);
  const [unit, scale] = extent < 2e-6 ? (['ns', 1e9] as const) : extent < 2e-3 ? (['µs', 1e6] as const) : extent < 2 ? (['ms', 1e3] as const) : (['s', 1] as const);
  const decimals = Math.max(0, -Math.floor(Math.log10(step * scale) + 1e-9));
  const labels = values.map((v) => {
    const text = (v * scale).toFixed(decimals);
    return /^-0(\.0*)?$/.test(text) ? text.slice(1) : text;
  });
  return { unit, scale, labels, values };
}
