/**
 * Text that scope exports write in place of a sample that has no valid value (common practice across exports:
 * NaN and infinities, over/under-range and clip marks, dashes). Compared case-insensitively after trimming.
 */
export const DEFAULT_TEXT_SENTINELS: readonly string[] = [
  'nan', '-nan', '+nan', 'inf', '+inf', '-inf', 'infinity', '+infinity', '-infinity',
  'over', 'overrange', 'over range', 'ovr', 'ofl', 'overflow', 'under', 'underrange', 'ufl', 'clip', 'clipped',
  '---', '--', '***', '####', '?', 'invalid', 'n/a', 'null',
];

/**
 * Numbers that mean "no value" rather than a reading. SCPI-1999 Vol. 1 §7.2.1.4-5 (from memory) reserves
 * 9.91E+37 for NaN and ±9.9E+37 for ±infinity, and instruments that speak SCPI export them as such.
 */
export const DEFAULT_NUMERIC_SENTINELS: readonly number[] = [9.91e37, 9.9e37, -9.9e37];
