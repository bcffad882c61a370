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

// Measurement rounding lives in shared/ so the command-line uploader prints speeds exactly as the pages show them.
export { formatMeasurement, roundToUncertainty, type RoundedMeasurement } from '../../shared/units/format-measurement.ts';
