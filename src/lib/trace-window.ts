import { api } from './api-client.ts';

/**
 * One channel's samples over a time range as the server answers them: min/max per column while the range holds
 * more samples than columns (each column draws one vertical segment), the raw samples once it does not.
 */
export type TraceWindow =
  | { raw: false; t0: number; dt: number; min: (number | null)[]; max: (number | null)[]; channel: { name: string; unit: string } }
  | { raw: true; t: number[]; v: (number | null)[]; channel: { name: string; unit: string } };

/** GET /api/captures/:captureId/window: shared by the shot workspace and the comparison of shots. */
export function fetchWindow(captureId: string, channel: number, from: number, to: number, points: number): Promise<TraceWindow> {
  const q = new URLSearchParams({ channel: String(channel), from: String(from), to: String(to), points: String(Math.round(points)) });
  return api.get<TraceWindow>(`/api/captures/${captureId}/window?${q}`);
}

/** Query key of a window, so two views of the same capture share the cache. */
export const traceWindowKey = (captureId: string, channel: number, from: number, to: number, points: number) =>
  ['captures', captureId, 'window', channel, from, to, points] as const;
