/** One bin of tube pressure: the statistics group a shot falls in when grouped by vacuum level. */
export interface VacuumBin {
  key: string;
  label: string;
  /** Pa, inclusive; null: open below. */
  lowPa: number | null;
  /** Pa, exclusive; null: open above. */
  highPa: number | null;
  /** For sorting bins from best vacuum (lowest pressure) up. */
  order: number;
}

/** A pressure in kPa for a label, without float noise (0.1 kPa, 1 kPa, 12.5 kPa). */
const kpa = (pa: number) => String(Number((pa / 1000).toPrecision(6)));

export const NO_PRESSURE_BIN: VacuumBin = { key: 'no-pressure', label: '(no tube pressure logged)', lowPa: null, highPa: null, order: Number.POSITIVE_INFINITY };

/**
 * The tube-pressure bin of a shot. Without edges, one bin per decade of pressure ([1, 10) kPa, [10, 100) kPa, …), the
 * natural step for a vacuum sweep whose pressures span decades; with edges (Pa, increasing), the bins between them
 * plus an open bin below the first and above the last. Labels are in kPa, the unit the lab logs, low end inclusive.
 */
export function vacuumBinOf(pressurePa: number | null | undefined, edgesPa?: readonly number[]): VacuumBin {
  if (pressurePa == null || !Number.isFinite(pressurePa) || pressurePa <= 0) return NO_PRESSURE_BIN;
  if (!edgesPa) {
    // Decade index from the exact power of ten at or below: log10 alone can land just under an integer (log10(1000) is exact,
    // but guard against 999.9999 rounding the other way).
    let k = Math.floor(Math.log10(pressurePa));
    if (10 ** (k + 1) <= pressurePa) k += 1;
    if (10 ** k > pressurePa) k -= 1;
    const lowPa = 10 ** k;
    const highPa = 10 ** (k + 1);
    return { key: `decade:${k}`, label: `${kpa(lowPa)} – ${kpa(highPa)} kPa`, lowPa, highPa, order: k };
  }
  if (edgesPa.length < 2) throw new RangeError('edgesPa needs at least 2 edges');
  if (pressurePa < edgesPa[0]) return { key: 'below', label: `below ${kpa(edgesPa[0])} kPa`, lowPa: null, highPa: edgesPa[0], order: -1 };
  for (let i = 1; i < edgesPa.length; i++) {
    if (pressurePa < edgesPa[i]) {
      return { key: `bin:${i}`, label: `${kpa(edgesPa[i - 1])} – ${kpa(edgesPa[i])} kPa`, lowPa: edgesPa[i - 1], highPa: edgesPa[i], order: i };
    }
  }
  const last = edgesPa[edgesPa.length - 1];
  return { key: 'above', label: `${kpa(last)} kPa and above`, lowPa: last, highPa: null, order: edgesPa.length };
}
