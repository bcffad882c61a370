import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { TraceWindow } from '../../../lib/trace-window.ts';
import { labKeys } from '../../labs/api/members.ts';

export interface BenchSpeed { value: number; uncertainty: number; method: 'flight' | 'occlusion'; basis: 'fit' | 'pair' | 'occlusion' }

export interface BenchTrace {
  captureId: string;
  channelIndex: number;
  name: string;
  status: 'ok' | 'missed' | null;
  reason: string | null;
  gatePositions: number[];
  /** Crossing level, V. */
  threshold: number | null;
  /** The channel's two state levels, V. */
  levels: { low: number; high: number } | null;
  /** Threshold crossings (transition instants), s. */
  crossings: number[];
}

export interface BenchLatest {
  id: string;
  number: number;
  status: string;
  firedAt: string | null;
  busy: boolean;
  failures: string[];
  analysis: { id: string; version: number; state: string; completedAt: string | null } | null;
  speed: (BenchSpeed & { coverage: number }) | null;
  fitGates: number | null;
  warnings: string[];
  traces: BenchTrace[];
  window: { from: number; to: number } | null;
}

export interface BenchFeed {
  campaign: { id: string; name: string };
  latest: BenchLatest | null;
  recent: { id: string; number: number; status: string; firedAt: string | null; speed: BenchSpeed | null }[];
}

/**
 * How often the display asks for news. A result stored on the server shows within this long (plus the request).
 * When the lab's live event stream is available, a `shot` event for this campaign invalidates `benchKeys.feed`
 * at once and this interval becomes the fallback.
 */
export const BENCH_POLL_MS = 1000;

export const benchKeys = {
  feed: (labId: string, campaignId: string) => [...labKeys.campaign(labId, campaignId), 'bench'] as const,
  trace: (captureId: string, channel: number, from: number | null, to: number | null) => ['captures', captureId, 'bench-trace', channel, from, to] as const,
};

export const benchFeedQueryOptions = (labId: string, campaignId: string) =>
  queryOptions({
    queryKey: benchKeys.feed(labId, campaignId),
    queryFn: () => api.get<BenchFeed>(`/api/labs/${labId}/campaigns/${campaignId}/bench`),
    refetchInterval: BENCH_POLL_MS,
    // The screen beside the launcher is rarely the focused window.
    refetchIntervalInBackground: true,
    // A failed poll (server restarting) is simply tried again at the next tick.
    retry: false,
  });

export const useBenchFeed = (labId: string, campaignId: string) => useQuery(benchFeedQueryOptions(labId, campaignId));

/** Columns of one channel for a small trace: the window around the pulses, or the whole record when there is none. */
export function useBenchTrace(trace: BenchTrace, window: BenchLatest['window'], points: number) {
  const from = window?.from ?? null;
  const to = window?.to ?? null;
  return useQuery({
    queryKey: [...benchKeys.trace(trace.captureId, trace.channelIndex, from, to), points],
    queryFn: () => {
      const q = new URLSearchParams({ channel: String(trace.channelIndex), points: String(points) });
      if (from != null && to != null) {
        q.set('from', String(from));
        q.set('to', String(to));
      }
      return api.get<TraceWindow & { from: number; to: number }>(`/api/captures/${trace.captureId}/window?${q}`);
    },
    staleTime: Infinity,
    // Earlier shots' traces are let go soon after they leave the screen: the display runs for days.
    gcTime: 10_000,
  });
}
