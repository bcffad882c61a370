/**
 * An SI value shown in a lab unit for editing: 0.0001 m × 1000 → "0.1" (not "0.09999999999999999"); "" when absent.
 * Twelve significant digits hide binary noise and keep every digit a person typed.
 */
export function fromSi(si: number | null | undefined, factor: number): string {
  if (si == null || !Number.isFinite(si)) return '';
  return String(Number((si * factor).toPrecision(12)));
}
