/** Display formatting at the edge: SI values in, lab units out (kPa, °C, mm, g). */

/** Tube pressures span decades (100 kPa to 1 kPa), so they keep 3 significant digits; ambient pressure keeps 0.1 kPa. */
export const formatKpa = (pa: number | null | undefined, significant = 3) =>
  pa == null ? '—' : `${(pa / 1000).toLocaleString('en', { maximumSignificantDigits: significant })} kPa`;
export const formatCelsius = (k: number | null | undefined) => (k == null ? '—' : `${(k - 273.15).toFixed(1)} °C`);
export const formatMm = (m: number, digits = 1) => `${(m * 1000).toFixed(digits)} mm`;
export const formatGrams = (kg: number, digits = 2) => `${(kg * 1000).toFixed(digits)} g`;

export function formatDateTime(iso: string | null | undefined): string {
  if (!iso) return '—';
  const d = new Date(iso);
  return d.toLocaleString('en-GB', { year: 'numeric', month: 'short', day: '2-digit', hour: '2-digit', minute: '2-digit' });
}

export function formatDate(iso: string | null | undefined): string {
  if (!iso) return '—';
  return new Date(iso).toLocaleDateString('en-GB', { year: 'numeric', month: 'short', day: '2-digit' });
}

/**
 * A value with its expanded uncertainty, rounded the way a measurement is reported: U to two significant digits,
 * the value to the same decimal place (GUM 7.2.6; "412.37 ± 0.42 m/s", not "412.3712938 ± 0.4213").
 */
export function formatMeasurement(value: number | null | undefined, uncertainty: number | null | undefined, unit = ''): string {
  if (value == null || !Number.isFinite(value)) return '—';
  const suffix = unit ? ` ${unit}` : '';
  if (uncertainty == null || !Number.isFinite(uncertainty) || uncertainty <= 0) {
    return `${value.toPrecision(6).replace(/\.?0+$/, '')}${suffix}`;
  }
  // Decimal place of U's second significant digit; negative means tens, hundreds, … (then round to that place).
  const decimals = 1 - Math.floor(Math.log10(uncertainty));
  const round = (x: number) => (decimals >= 0 ? x.toFixed(decimals) : (Math.round(x / 10 ** -decimals) * 10 ** -decimals).toFixed(0));
  return `${round(value)} ± ${round(uncertainty)}${suffix}`;
}

/** A duration in seconds, in the unit that suits its size (ns, µs, ms, s), 4 significant digits. */
export function formatSeconds(s: number | null | undefined, digits = 4): string {
  if (s == null || !Number.isFinite(s)) return '—';
  const a = Math.abs(s);
  if (a === 0) return '0 s';
  if (a < 1e-6) return `${(s * 1e9).toPrecision(digits)} ns`;
  if (a < 1e-3) return `${(s * 1e6).toPrecision(digits)} µs`;
  if (a < 1) return `${(s * 1e3).toPrecision(digits)} ms`;
  return `${s.toPrecision(digits)} s`;
}
