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

/** Rounds |x| half away from zero to `decimals` places (negative: to tens, hundreds…), exactly in decimal. */
function roundDecimal(x: number, decimals: number): number {
  // x · 10^decimals by moving the exponent of x's shortest decimal form, so 412.365 → 41236.5 (not 41236.4999…).
  const [mantissa, exponent] = Math.abs(x).toExponential().split('e');
  const scaled = Math.round(Number(`${mantissa}e${Number(exponent) + decimals}`));
  return Math.sign(x) * Number(`${scaled}e${-decimals}`);
}

function fixed(x: number, decimals: number): string {
  const text = x.toFixed(Math.max(0, decimals));
  // "−0.00" would claim a sign the measurement does not have.
  if (/^-0(\.0*)?$/.test(text)) return text.slice(1);
  return text.replace('-', '−');
}

export interface RoundedMeasurement {
  value: string;
  /** null when no usable uncertainty was given. */
  uncertainty: string | null;
  /** Decimal places both are shown with (negative: rounded to tens, hundreds…). */
  decimals: number;
}

/**
 * Rounds a value and its uncertainty the way results are quoted: the uncertainty to `significant` digits (2 by
 * default, JCGM 100:2008 §7.2.6: "at most two significant digits"), the value to the same decimal place.
 * 412.3712938 ± 0.4213 → "412.37" and "0.42". A missing, zero or negative uncertainty keeps the value at
 * `fallbackSignificant` digits (trailing zeros after the point dropped) and no uncertainty.
 */
export function roundToUncertainty(value: number, uncertainty: number | null | undefined, significant = 2, fallbackSignificant = 6): RoundedMeasurement {
  if (!Number.isFinite(value)) return { value: '—', uncertainty: null, decimals: 0 };
  if (uncertainty == null || !Number.isFinite(uncertainty) || uncertainty <= 0) {
    // Nothing says which digits are meaningful: keep `fallbackSignificant`, without trailing zeros after the point.
    const magnitude = value === 0 ? 0 : Math.floor(Math.log10(Math.abs(value)));
    const decimals = Math.max(0, fallbackSignificant - 1 - magnitude);
    const text = fixed(roundDecimal(value, decimals), decimals);
    return { value: decimals > 0 ? text.replace(/\.?0+$/, '') : text, uncertainty: null, decimals };
  }
  let decimals = significant - 1 - Math.floor(Math.log10(uncertainty));
  let u = roundDecimal(uncertainty, decimals);
  // 0.0996 to two digits is 0.100: one digit too many, so round at the coarser place (0.10).
  if (u >= 10 ** (significant - decimals)) {
    decimals -= 1;
    u = roundDecimal(uncertainty, decimals);
  }
  return { value: fixed(roundDecimal(value, decimals), decimals), uncertainty: fixed(u, decimals), decimals };
}

/**
 * A value with its expanded uncertainty, rounded the way a measurement is reported (GUM 7.2.6, see
 * `roundToUncertainty`): "412.37 ± 0.42 m/s", not "412.3712938 ± 0.4213"; "—" for no value, the bare value when
 * there is no uncertainty.
 */
export function formatMeasurement(value: number | null | undefined, uncertainty: number | null | undefined, unit = ''): string {
  if (value == null || !Number.isFinite(value)) return '—';
  const r = roundToUncertainty(value, uncertainty);
  const suffix = unit ? ` ${unit}` : '';
  return r.uncertainty == null ? `${r.value}${suffix}` : `${r.value} ± ${r.uncertainty}${suffix}`;
}
