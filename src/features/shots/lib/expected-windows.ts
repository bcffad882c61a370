import type { ShotAnalysis } from '../../../../shared/analysis/types.ts';

export interface ExpectedWindow { position: number; channel: string; early: number; late: number }

/**
 * Where each later gate should fire given the first fired gate's entry and the speed v ± U, assuming constant speed
 * over the span (a decelerating projectile arrives a little later than the window's centre):
 * t = t₁ + Δx / v, bounded by Δx / (v + U) and Δx / (v − U).
 */
export function expectedWindows(results: ShotAnalysis | null): ExpectedWindow[] {
  if (!results?.speed) return [];
  const fired = results.gates.filter((g) => g.status === 'ok' && g.pulses.length > 0).sort((a, b) => a.position - b.position);
  if (fired.length === 0) return [];
  const first = fired[0];
  const t1 = first.pulses[0].start;
  const { value: v, uncertainty: U } = results.speed;
  if (!(v > 0)) return [];
  return results.gates
    .filter((g) => g.position !== first.position)
    .map((g) => {
      const dx = g.position - first.position;
      const fast = dx / (v + U);
      const slow = U < v ? dx / (v - U) : Number.POSITIVE_INFINITY;
      return { position: g.position, channel: g.channel, early: t1 + Math.min(fast, slow), late: t1 + Math.max(fast, slow) };
    });
}
