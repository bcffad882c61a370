import { unitToSi } from './unit-to-si.ts';

export interface UnitLabel {
  /** The label without its unit ("Time (ms)" → "Time"). */
  name: string;
  /** The unit as written ("ms"), or "" when the label carries none that is known. */
  sourceUnit: string;
}

/**
 * Splits a column label into name and unit for the suffix forms scope exports use: "Time (ms)", "CH1 [mV]",
 * "t/us", "C1 in V", "in s" (a unit with no name). The unit is split off only when it is a known unit, so
 * "Gate (north)", "CH1/CH2" or "Gate in front" stay whole names.
 */
export function parseUnitLabel(label: string): UnitLabel {
  if (typeof label !== 'string') throw new TypeError('label must be a string');
  const text = label.trim();
  const forms = [/^(.*?)\s*\(\s*([^()]*?)\s*\)$/, /^(.*?)\s*\[\s*([^[\]]*?)\s*\]$/, /^(.*?)\s*\/\s*([^/\s]+)$/, /^(.*?)\s*\bin\s+(\S+)$/];
  for (const form of forms) {
    const match = form.exec(text);
    if (match && unitToSi(match[2]) !== null) return { name: match[1].trim(), sourceUnit: match[2] };
  }
  return { name: text, sourceUnit: '' };
}
