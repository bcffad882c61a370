/** Units people type at the bench, converted to SI at the edge of the form (the API and the database hold SI). */

/**
 * Pascals per unit. bar = 10⁵ Pa exactly, so mbar = 100 Pa; the torr is 1/760 of the standard atmosphere
 * (101 325 Pa, ISO 2533), 133.322 368… Pa (NIST SP 811 Appendix B lists 1.333 224 E+02).
 */
export const PRESSURE_UNITS = { kPa: 1000, mbar: 100, Pa: 1, Torr: 101_325 / 760 } as const;
export type PressureUnit = keyof typeof PRESSURE_UNITS;

export const toPascal = (value: number, unit: PressureUnit) => value * PRESSURE_UNITS[unit];
export const fromPascal = (pa: number, unit: PressureUnit) => pa / PRESSURE_UNITS[unit];

/** mm → m, to 12 significant digits, so a typed 40.6 mm is stored as 0.0406 m and not 0.040600000000000004. */
export const millimetresToMetres = (mm: number) => Number((mm / 1000).toPrecision(12));

/** 0 °C = 273.15 K exactly (SI Brochure, 9th edition). */
export const celsiusToKelvin = (c: number) => c + 273.15;
export const kelvinToCelsius = (k: number) => k - 273.15;

/**
 * A number typed in a form field: blank is "not given" (null), anything else must be a plain decimal number.
 * A decimal comma is accepted, as many lab notebooks use one. Returns NaN for text that is not a number.
 */
export function parseLabNumber(text: string | undefined): number | null {
  const t = (text ?? '').trim().replace(/\s+/g, '');
  if (t === '') return null;
  const normalized = /^[-+]?\d+,\d+$/.test(t) ? t.replace(',', '.') : t;
  return /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(normalized) ? Number(normalized) : Number.NaN;
}
