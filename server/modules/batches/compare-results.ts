/**
 * Before and after of one shot in a batch recompute: the speed of each version, the change in units of the earlier
 * version's expanded uncertainty, and whether the method changed or a gate was gained or lost. Pure: reads the stored
 * results (shared/analysis/types.ts) as plain JSON.
 */

export interface VersionOutcome {
  speed: { value: number; uncertainty: number; method: string; basis: string } | null;
  /** Gates by position (m) and channel, with whether each gave a pulse. */
  gates: { channel: string; position: number; status: 'ok' | 'missed' }[];
  warnings: string[];
}

export interface ResultChange {
  /** after − before, m/s; null when either has no speed. */
  delta: number | null;
  /** (after − before) / U(before), with U(before) the earlier version's expanded uncertainty (k = 2). */
  deltaInU: number | null;
  methodChanged: boolean;
  /** Gates that fired after but not before ("gained"), and the other way round ("lost"). */
  gatesGained: string[];
  gatesLost: string[];
}

const finite = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

/** What the table needs from a stored analysis result; null results (queued, failed) give no speed and no gates. */
export function outcomeOf(results: unknown): VersionOutcome {
  const r = (results ?? {}) as { speed?: Record<string, unknown> | null; gates?: unknown[]; warnings?: unknown[] };
  const s = r.speed;
  const speed = s && finite(s.value) && finite(s.uncertainty)
    ? { value: s.value, uncertainty: s.uncertainty, method: String(s.method ?? ''), basis: String(s.basis ?? '') }
    : null;
  const gates = (Array.isArray(r.gates) ? r.gates : []).flatMap((g) => {
    const gate = g as { channel?: unknown; position?: unknown; status?: unknown };
    return typeof gate.channel === 'string' && finite(gate.position)
      ? [{ channel: gate.channel, position: gate.position, status: gate.status === 'ok' ? 'ok' as const : 'missed' as const }]
      : [];
  });
  const warnings = (Array.isArray(r.warnings) ? r.warnings : []).filter((w): w is string => typeof w === 'string');
  return { speed, gates, warnings };
}

/** "gate at 150 mm (CH2)": gates are told apart by position, the channel named for the reader. */
export const gateName = (g: { channel: string; position: number }) => `gate at ${Number((g.position * 1000).toFixed(1))} mm (${g.channel})`;

const methodOf = (o: VersionOutcome) => (o.speed ? `${o.speed.method}/${o.speed.basis}` : 'none');

export function compareOutcomes(before: VersionOutcome, after: VersionOutcome): ResultChange {
  const delta = before.speed && after.speed ? after.speed.value - before.speed.value : null;
  const deltaInU = delta != null && before.speed!.uncertainty > 0 ? delta / before.speed!.uncertainty : null;
  const firing = (o: VersionOutcome) => new Map(o.gates.filter((g) => g.status === 'ok').map((g) => [g.position.toFixed(6), g]));
  const was = firing(before);
  const now = firing(after);
  return {
    delta,
    deltaInU,
    methodChanged: methodOf(before) !== methodOf(after),
    gatesGained: [...now].filter(([k]) => !was.has(k)).map(([, g]) => gateName(g)),
    gatesLost: [...was].filter(([k]) => !now.has(k)).map(([, g]) => gateName(g)),
  };
}
