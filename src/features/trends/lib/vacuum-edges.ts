/** How the trends page bins tube pressure: per decade (the server's default), 1–2–5 steps, or edges typed in kPa. */
export type VacuumBinning = 'decade' | '1-2-5' | 'custom';

/**
 * Edges at 1, 2 and 5 × 10ⁿ Pa covering the measured pressures (Pa), the usual "preferred number" steps of a log
 * scale (common practice), finer than decades for a sweep that spans only one or two of them. Null when no
 * pressure was logged.
 */
export function oneTwoFiveEdgesPa(pressuresPa: readonly (number | null)[]): number[] | null {
  const xs = pressuresPa.filter((x): x is number => x != null && Number.isFinite(x) && x > 0);
  if (xs.length === 0) return null;
  const lo = Math.min(...xs);
  const hi = Math.max(...xs);
  const steps: number[] = [];
  for (let k = Math.floor(Math.log10(lo)) - 1; k <= Math.ceil(Math.log10(hi)) + 1; k++) {
    for (const m of [1, 2, 5]) steps.push(Number((m * 10 ** k).toPrecision(3)));
  }
  // From the last step at or below the lowest pressure to the first step above the highest.
  const first = steps.filter((e) => e <= lo).length - 1;
  const last = steps.findIndex((e) => e > hi);
  const edges = steps.slice(first, last + 1);
  return edges.length >= 2 ? edges : null;
}

/** Reads edges typed in kPa ("1, 2, 5, 10"; a decimal comma is not accepted here, since the comma separates). */
export function parseEdgesKpa(text: string): { edgesPa: number[] | null; error?: string } {
  const parts = text.split(/[,;\s]+/).map((t) => t.trim()).filter((t) => t !== '');
  if (parts.length < 2) return { edgesPa: null, error: 'Enter at least two edges in kPa, e.g. 1, 2, 5, 10.' };
  if (parts.length > 20) return { edgesPa: null, error: 'At most 20 edges.' };
  const edges: number[] = [];
  for (const t of parts) {
    const x = Number(t);
    if (!Number.isFinite(x) || x <= 0) return { edgesPa: null, error: `“${t}” is not a positive number of kPa.` };
    if (edges.length > 0 && x * 1000 <= edges[edges.length - 1]) return { edgesPa: null, error: `Edges must increase: ${t} kPa comes after ${edges[edges.length - 1] / 1000} kPa.` };
    edges.push(Number((x * 1000).toPrecision(12)));
  }
  return { edgesPa: edges };
}
