/** The part of a capture (GET /api/shots/:shotId) that says which channels it holds and over what time. */
export interface CaptureChannels {
  id: string;
  fileName: string;
  state: string;
  channels: {
    length: number;
    time: { kind: 'uniform'; t0: number; dt: number; jitter: number } | { kind: 'explicit'; first: number | null; last: number | null };
    channels: { index: number; name: string }[];
  } | null;
}

export interface PlottedChannel { captureId: string; index: number; name: string }

/**
 * Channel names as the analysis sees them once one-file-per-channel captures are combined (same rule as the
 * server): a name seen in an earlier file gets the file's name added. Shared by the shot workspace and the comparison.
 */
export function plottedChannels(captures: CaptureChannels[]): PlottedChannel[] {
  const seen = new Set<string>();
  const out: PlottedChannel[] = [];
  for (const c of captures) {
    if (c.state !== 'ready' || !c.channels) continue;
    for (const ch of c.channels.channels) {
      out.push({ captureId: c.id, index: ch.index, name: seen.has(ch.name) ? `${ch.name} (${c.fileName})` : ch.name });
      seen.add(ch.name);
    }
  }
  return out;
}

/** First and last instant recorded by the ready captures, s; null when none is ready. */
export function captureExtent(captures: CaptureChannels[]): { from: number; to: number } | null {
  let from = Infinity;
  let to = -Infinity;
  for (const c of captures) {
    const files = c.channels;
    if (c.state !== 'ready' || !files || files.length === 0) continue;
    const [a, b] = files.time.kind === 'uniform'
      ? [files.time.t0, files.time.t0 + (files.length - 1) * files.time.dt]
      : [files.time.first ?? 0, files.time.last ?? 0];
    from = Math.min(from, a);
    to = Math.max(to, b);
  }
  return Number.isFinite(from) && to > from ? { from, to } : null;
}
