import { useQueries } from '@tanstack/react-query';
import { useEffect, useMemo, useState } from 'react';
import type { ShotAnalysis } from '../../../../shared/analysis/types.ts';
import type { AnalysisOptionsInput } from '../../../../shared/contracts/analysis.ts';
import type { ImportedCapture } from '../../../../shared/contracts/capture.ts';
import { PREVIEW_MEMORY_BYTES, previewBytes } from '../../../../shared/traces/preview-budget.ts';
import type { CaptureInfo } from './types.ts';
import { fetchSamples, fetchTimes } from './captures.ts';
import { shotKeys } from './shot.ts';


/**
 * The browser's live preview: the same engine as the worker (shared/analysis, loaded on demand) run on the
 * captures' stored samples with the panel's parameters. Samples come as Float32, the server's display copy, so a
 * preview can differ from the stored version in the last digits; "Recompute" gives the result of record.
 */
export function usePreview(captures: CaptureInfo[], parameters: AnalysisOptionsInput | null) {
  const ready = captures.filter((c) => c.state === 'ready' && c.channels);
  // The captures of a shot are previewed together: their samples must fit the tab's memory budget together.
  const neededBytes = ready.reduce((sum, c) => sum + previewBytes(c.channels!.length, c.channels!.channels.length, c.channels!.time.kind === 'explicit'), 0);
  const tooBig = neededBytes > PREVIEW_MEMORY_BYTES;
  const enabled = parameters != null && !tooBig && ready.length > 0;
  const sampleQueries = useQueries({
    queries: ready.flatMap((c) => [
      ...c.channels!.channels.map((ch) => ({
        queryKey: shotKeys.samples(c.id, String(ch.index)),
        queryFn: () => fetchSamples(c.id, ch.index),
        enabled,
        staleTime: Infinity,
      })),
      ...(c.channels!.time.kind === 'explicit'
        ? [{ queryKey: shotKeys.samples(c.id, 'time'), queryFn: () => fetchTimes(c.id) as Promise<Float32Array | Float64Array>, enabled, staleTime: Infinity }]
        : []),
    ]),
  });
  const loaded = sampleQueries.every((q) => q.data);
  const loadError = sampleQueries.find((q) => q.error)?.error ?? null;

  const capture = useMemo<Promise<ImportedCapture> | null>(() => {
    if (!enabled || !loaded) return null;
    let k = 0;
    const parts: ImportedCapture[] = ready.map((c) => {
      const files = c.channels!;
      const channels = files.channels.map((ch) => ({
        name: ch.name, unit: ch.unit, sourceUnit: ch.sourceUnit, invalidCount: ch.invalidCount, values: sampleQueries[k++].data as Float32Array,
      }));
      const time = files.time.kind === 'uniform'
        ? { kind: 'uniform' as const, t0: files.time.t0, dt: files.time.dt, jitter: files.time.jitter }
        : { kind: 'explicit' as const, t: sampleQueries[k++].data as unknown as Float64Array };
      // How the time base was found travels with the samples, so the preview flags a rebuilt or assumed one too.
      const origin = (c.layout?.timeOrigin ?? undefined) as ImportedCapture['timeOrigin'];
      return { channels, time, length: files.length, metadata: {}, layout: {}, warnings: [], timeOrigin: origin, valueKind: c.layout?.valueKind === 'codes' ? 'codes' as const : 'physical' as const };
    });
    if (parts.length === 1) return Promise.resolve(parts[0]);
    return import('../../../../shared/import/combine-captures.ts').then((m) => m.combineCaptures(parts, { labels: ready.map((c) => c.fileName) }));
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [enabled, loaded, ready.map((c) => c.id).join(',')]);

  const [state, setState] = useState<{ results: ShotAnalysis | null; error: string | null; ms: number | null }>({ results: null, error: null, ms: null });
  const key = JSON.stringify(parameters);
  useEffect(() => {
    if (!capture || !parameters) {
      setState({ results: null, error: null, ms: null });
      return;
    }
    let cancelled = false;
    // Let typing settle before running the engine.
    const timer = setTimeout(() => {
      Promise.all([capture, import('../../../../shared/analysis/analyze-shot.ts')])
        .then(([c, engine]) => {
          const started = performance.now();
          const results = engine.analyzeShot(c, parameters);
          if (!cancelled) setState({ results, error: null, ms: performance.now() - started });
        })
        .catch((err: Error) => {
          if (!cancelled) setState({ results: null, error: err.message, ms: null });
        });
    }, 250);
    return () => {
      cancelled = true;
      clearTimeout(timer);
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [capture, key]);

  return { ...state, loading: enabled && !loaded && !loadError, loadError: loadError as Error | null, tooBig, neededBytes };
}
