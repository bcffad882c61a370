/** A measured value with its uncertainty, rounded and written the way results are quoted. */

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
