import { unitToSi } from './unit-to-si.ts';

export interface ParseQuantityOptions {
  /** Unit of a value written without one (e.g. the key said "Sample interval (us)"). @default "" */
  defaultUnit?: string;
  /** Numbers are written with a decimal comma. @default false */
  decimalComma?: boolean;
  /**
   * The value is a time: "uS", "mS", "nS" (upper-case S, as many scope front panels print seconds) are read as
   * seconds. Outside a time context "S" would be siemens, so it is not taken there. @default false
   */
  time?: boolean;
}

/**
 * Reads a metadata value with an optional unit and returns it in SI, or null when it is not a number:
 * "4e-07", "0.4 us", "400ns", "2,5 MS/s" (decimal comma), "2e-9(s)", "0.08uS" (time), "CH1:0.000002" (a channel
 * prefix), "F=1.00000kHz" (a readout name), " 00.0200" (padding). A value with a unit it does not know, or
 * a scale per division ("500mV/div", "1us/div"), is not a quantity of its own and gives null.
 */
export function parseQuantity(text: string, defaultUnitOrOptions: string | ParseQuantityOptions = '', decimalCommaArg = false): { value: number; si: string } | null {
  const options = typeof defaultUnitOrOptions === 'string' ? { defaultUnit: defaultUnitOrOptions, decimalComma: decimalCommaArg } : defaultUnitOrOptions;
  const { defaultUnit = '', decimalComma = false, time = false } = options;
  let t = stripValuePrefix(text);
  if (decimalComma) t = t.replace(',', '.');
  const match = /^([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*([^\d\s].*)?$/.exec(t);
  if (!match) return null;
  const value = parseFloat(match[1]);
  const unitText = (match[2] ?? '').trim().replace(/^[([{]\s*|\s*[)\]}]$/g, '').trim() || defaultUnit.trim();
  if (unitText === '') return Number.isFinite(value) ? { value, si: '' } : null;
  const unit = unitToSi(unitText) ?? (time ? timeUnitToSi(unitText) : null);
  if (unit === null) return null;
  const si = value * unit.factor;
  return Number.isFinite(si) ? { value: si, si: unit.si } : null;
}

/** "uS", "mS", "US" as seconds: only where the value is known to be a time. */
export function timeUnitToSi(unit: string): { si: string; factor: number } | null {
  const u = unit.trim();
  const m = /^([pnuUµμmM]?)(S|s|sec|Sec|SEC)$/.exec(u);
  if (!m) return null;
  const prefix = m[1] === 'U' ? 'u' : m[1] === 'M' ? '' : m[1];
  // "MS" for milliseconds is ambiguous with mega; no scope prints mega-seconds, but refuse rather than guess.
  if (m[1] === 'M') return null;
  return unitToSi(`${prefix}s`);
}

/** Strips what scope preambles put before a value: a channel or readout prefix ("CH1:", "Analog:", "F=") and padding. */
export function stripValuePrefix(text: string): string {
  let t = text.trim();
  const prefixed = /^[A-Za-z][A-Za-z0-9 _]{0,15}\s*[:=]\s*(.*)$/.exec(t);
  if (prefixed && /^[-+.\d]/.test(prefixed[1].trim())) t = prefixed[1].trim();
  return t;
}
