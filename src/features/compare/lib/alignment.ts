import type { ShotAnalysis } from '../../../../shared/analysis/types.ts';

/** "first": each shot's first gate that fired; a number: the gate at that position, m. */
export type AlignAt = 'first' | number;

export interface Alignment {
  /** The instant that becomes t = 0 for this shot, s (0 when nothing fired). */
  instant: number;
  /** The gate position actually used, m; null when no gate fired. */
  position: number | null;
  /** Set when the chosen gate did not fire on this shot and its first gate stood in. */
  fallback: boolean;
}

/** Where a shot's traces are pinned: the entry crossing (pulse start) of the chosen gate. */
export function alignmentOf(results: ShotAnalysis | null, at: AlignAt): Alignment {
  const fired = (results?.gates ?? []).filter((g) => g.status === 'ok' && g.pulses.length > 0).sort((a, b) => a.pulses[0].start - b.pulses[0].start);
  if (fired.length === 0) return { instant: 0, position: null, fallback: at !== 'first' };
  if (at !== 'first') {
    const gate = fired.find((g) => Math.abs(g.position - at) < 1e-6);
    if (gate) return { instant: gate.pulses[0].start, position: gate.position, fallback: false };
  }
  return { instant: fired[0].pulses[0].start, position: fired[0].position, fallback: at !== 'first' };
}
