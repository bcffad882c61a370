import type { Analysis, Capture, Shot } from '../../db/models/index.ts';
import { combinedChannelNames } from '../analyses/service.ts';

/** First and last instant the captures recorded, s (from their stored time bases). */
function recordExtent(captures: Capture[]): { from: number; to: number } | null {
  let from = Infinity;
  let to = -Infinity;
  for (const c of captures) {
    const files = c.channels as { length: number; time: { kind: string; t0?: number; dt?: number; first?: number | null; last?: number | null } } | null;
    if (!files || files.length === 0) continue;
    const [a, b] = files.time.kind === 'uniform'
      ? [files.time.t0!, files.time.t0! + (files.length - 1) * files.time.dt!]
      : [files.time.first ?? Infinity, files.time.last ?? -Infinity];
    from = Math.min(from, a);
    to = Math.max(to, b);
  }
  return to > from ? { from, to } : null;
}

export interface BenchSpeed { value: number; uncertainty: number; method: 'flight' | 'occlusion'; basis: 'fit' | 'pair' | 'occlusion'; coverage: number }

interface StoredResults {
  speed: BenchSpeed | null;
  warnings: string[];
  channels: {
    name: string; status: 'ok' | 'missed'; reason: string | null; threshold: { level: number } | null; levels: { low: number; high: number } | null;
    transitions: { time: number; direction: string }[]; pulses: { start: number; end: number }[]; candidate: { time: number } | null;
  }[];
  gates: { channel: string; position: number; status: 'ok' | 'missed' }[];
  fit: { gates: number } | null;
}

/**
 * The latest shot as the bench display draws it: the current version's speed, method and warnings; each channel of
 * the captures it read with where its trace crossed the threshold (for the small traces); the time window around the
 * pulses; and, while something is still being read or computed, what is happening, or why it failed.
 */
export function benchShotView(shot: Shot, current: Analysis | null, newest: Analysis | null, captures: Capture[]) {
  const results = (current?.state === 'done' ? current.results : null) as StoredResults | null;
  const read = current ? captures.filter((c) => current.captureIds.includes(c.id)) : [];
  const names = combinedChannelNames(read);
  let k = 0;
  const traces = read.flatMap((c) =>
    ((c.channels as { channels?: { index: number; name: string }[] } | null)?.channels ?? []).map((ch) => {
      const name = names[k++];
      const result = results?.channels.find((r) => r.name === name) ?? null;
      const gates = results?.gates.filter((g) => g.channel === name) ?? [];
      return {
        captureId: c.id,
        channelIndex: ch.index,
        name,
        status: result?.status ?? null,
        reason: result?.reason ?? null,
        gatePositions: gates.map((g) => g.position),
        threshold: result?.threshold?.level ?? null,
        /** The channel's two state levels, V: the small traces share one vertical scale, as on a scope screen. */
        levels: result?.levels ? { low: result.levels.low, high: result.levels.high } : null,
        crossings: result?.transitions.map((t) => t.time) ?? [],
      };
    }),
  );
  // The pulses, and where a missed gate came closest to firing, with half their span again on each side (enough
  // clear beam to see each step), within the record.
  const instants = (results?.channels ?? []).flatMap((c) => [...c.pulses.flatMap((p) => [p.start, p.end]), ...(c.candidate ? [c.candidate.time] : [])]);
  let window: { from: number; to: number } | null = null;
  if (instants.length > 0) {
    const from = Math.min(...instants);
    const to = Math.max(...instants);
    const pad = Math.max((to - from) * 0.5, 1e-6);
    const extent = recordExtent(read);
    window = { from: Math.max(from - pad, extent?.from ?? -Infinity), to: Math.min(to + pad, extent?.to ?? Infinity) };
  }
  const busy = captures.some((c) => c.state === 'queued' || c.state === 'reading') || (newest != null && (newest.state === 'queued' || newest.state === 'running'));
  const failures = [
    ...captures.filter((c) => c.state === 'failed').map((c) => `${c.fileName}: ${c.error ?? 'could not be read'}`),
    ...(newest?.state === 'failed' ? [`analysis version ${newest.version}: ${newest.error ?? 'failed'}`] : []),
  ];
  return {
    id: shot.id,
    number: shot.number,
    status: shot.status,
    firedAt: shot.firedAt,
    busy,
    failures,
    analysis: current ? { id: current.id, version: current.version, state: current.state, completedAt: current.completedAt } : null,
    speed: results?.speed ? { value: results.speed.value, uncertainty: results.speed.uncertainty, method: results.speed.method, basis: results.speed.basis, coverage: results.speed.coverage } : null,
    fitGates: results?.fit?.gates ?? null,
    warnings: results?.warnings ?? [],
    traces,
    window,
  };
}
