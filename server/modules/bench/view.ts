import type { Analysis, Capture, Shot } from '../../db/models/index.ts';
import { combinedChannelNames } from '../analyses/service.ts';

export interface BenchSpeed { value: number; uncertainty: number; method: 'flight' | 'occlusion'; basis: 'fit' | 'pair' | 'occlusion'; coverage: number }

interface StoredResults {
  speed: BenchSpeed | null;
  warnings: string[];
  channels: { name: string; status: 'ok' | 'missed'; reason: string | null; threshold: { level: number } | null; transitions: { time: number; direction: string }[]; pulses: { start: number; end: number }[] }[];
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
        crossings: result?.transitions.map((t) => t.time) ?? [],
      };
    }),
  );
  const pulses = results?.channels.flatMap((c) => c.pulses) ?? [];
  let window: { from: number; to: number } | null = null;
  if (pulses.length > 0) {
    const from = Math.min(...pulses.map((p) => p.start));
    const to = Math.max(...pulses.map((p) => p.end));
    // The pulses with half their span again on each side: enough clear beam to see each step.
    const pad = Math.max((to - from) * 0.5, 1e-6);
    window = { from: from - pad, to: to + pad };
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
