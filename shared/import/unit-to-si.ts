export interface SiUnit {
  /** The SI unit the value is converted to: "s", "V", "A", "W" or "Hz". */
  si: string;
  /** Multiply a value written in the source unit by this to get the SI unit. */
  factor: number;
}

// SI prefixes (BIPM, The International System of Units, 9th ed. 2019, Table 7). "u" stands in for µ in ASCII
// exports; both the micro sign U+00B5 and Greek mu U+03BC occur in the wild.
const PREFIXES: Record<string, number> = {
  p: 1e-12, n: 1e-9, u: 1e-6, '\u00b5': 1e-6, '\u03bc': 1e-6, m: 1e-3, '': 1, k: 1e3, M: 1e6, G: 1e9,
};

const BASES: Record<string, string> = {
  s: 's', sec: 's', secs: 's', V: 'V', A: 'A', W: 'W', Hz: 'Hz', 'S/s': 'Hz', 'Sa/s': 'Hz', sps: 'Hz',
};

const WORDS: Record<string, SiUnit> = {
  second: { si: 's', factor: 1 }, seconds: { si: 's', factor: 1 },
  volt: { si: 'V', factor: 1 }, volts: { si: 'V', factor: 1 },
  millivolt: { si: 'V', factor: 1e-3 }, millivolts: { si: 'V', factor: 1e-3 },
  amp: { si: 'A', factor: 1 }, amps: { si: 'A', factor: 1 }, ampere: { si: 'A', factor: 1 }, amperes: { si: 'A', factor: 1 },
};

/**
 * Reads a unit as scope exports write it ("ms", "µs", "us", "mV", "kV", "MS/s") and returns its SI unit and the
 * factor to it, or null for a unit it does not know (the caller keeps such values as written and says so).
 * Prefix factors are exact powers of ten from the SI brochure (BIPM 2019, Table 7).
 */
export function unitToSi(unit: string): SiUnit | null {
  if (typeof unit !== 'string') throw new TypeError('unit must be a string');
  const u = unit.trim();
  if (u === '') return null;
  const word = WORDS[u.toLowerCase()];
  if (word) return { ...word };
  for (const [base, si] of Object.entries(BASES)) {
    if (!u.endsWith(base)) continue;
    const prefix = u.slice(0, u.length - base.length);
    const factor = PREFIXES[prefix];
    if (factor !== undefined) return { si, factor };
  }
  return null;
}
