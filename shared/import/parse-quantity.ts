import { unitToSi } from './unit-to-si.ts';

/**
 * Reads a metadata value with an optional unit ("4e-07", "0.4 us", "400ns", "2,5 MS/s" with a decimal comma) and
 * returns it in SI, or null when it is not a number. `defaultUnit` applies when the value carries no unit (e.g. the
 * key said "Sample interval (us)").
 */
export function parseQuantity(text: string, defaultUnit = '', decimalComma = false): { value: number; si: string } | null {
  let t = text.trim();
  if (decimalComma) t = t.replace(',', '.');
  const match = /^([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*([^\d\s].*)?$/.exec(t);
  if (!match) return null;
  const value = parseFloat(match[1]);
  const unitText = (match[2] ?? defaultUnit).trim();
  if (unitText === '') return Number.isFinite(value) ? { value, si: '' } : null;
  const unit = unitToSi(unitText);
  if (unit === null) return null;
  const si = value * unit.factor;
  return Number.isFinite(si) ? { value: si, si: unit.si } : null;
}
