import { useCallback, useMemo, useRef, useState } from 'react';
import type { ShotAnalysis } from '../../../../shared/analysis/types.ts';
import { Button, EmptyState } from '../../../components/ui/primitives.tsx';
import type { CaptureInfo } from '../api/types.ts';
import { captureExtent as extentOf, plottedChannels, type PlottedChannel } from '../../../lib/plotted-channels.ts';
import { clampToRecord, useRangeZoom, type Range } from '../../../lib/range-zoom.ts';
import { expectedWindows } from '../lib/expected-windows.ts';
import { TracePlot } from './trace-plot.tsx';

export { plottedChannels, type PlottedChannel };

/**
 * Every channel on one shared time axis. Drag across a trace to zoom; the mouse wheel zooms around the pointer;
 * with the traces focused, + and − zoom, ← and → pan, 0 or Esc resets. Each zoom fetches finer windows from the
 * server, down to the raw samples.
 */
export function TraceStack({ captures, results, preview, gateLabel, onRangeChange }: {
  captures: CaptureInfo[];
  results: ShotAnalysis | null;
  preview: boolean;
  gateLabel: (position: number) => string;
  onRangeChange?: (range: Range | null) => void;
}) {
  const channels = useMemo(() => plottedChannels(captures), [captures]);
  const extent = useMemo(() => extentOf(captures), [captures]);
  const [range, setRangeState] = useState<Range | null>(null);
  const current = range ?? extent;
  const box = useRef<HTMLDivElement>(null);

  const setRange = useCallback((r: Range | null) => {
    // Never narrower than a few nanoseconds, never wider than the record.
    if (r && extent) r = clampToRecord(r, extent);
    setRangeState(r);
    onRangeChange?.(r);
  }, [extent, onRangeChange]);
  const reset = useCallback(() => setRange(null), [setRange]);
  const { zoom, onKeyDown } = useRangeZoom({ box, current, setRange, reset, record: extent });

  const windows = useMemo(() => expectedWindows(results), [results]);
  if (!current || channels.length === 0) {
    return <EmptyState title="No traces yet">Drop the scope's CSV files above; the traces appear here once they have been read.</EmptyState>;
  }

  return (
    <div
      ref={box}
      tabIndex={0}
      aria-label="Traces. Drag to zoom; + and − zoom; arrow keys pan; 0 resets."
      className="space-y-2 rounded-md outline-none focus-visible:ring-2 focus-visible:ring-signal-400"
      onKeyDown={onKeyDown}
    >
      <div className="flex flex-wrap items-center gap-2 text-xs text-harbour-600">
        <Button variant="secondary" className="!px-2 !py-1 text-xs" onClick={() => zoom(0.5)} aria-label="Zoom in">Zoom in</Button>
        <Button variant="secondary" className="!px-2 !py-1 text-xs" onClick={() => zoom(2)} aria-label="Zoom out">Zoom out</Button>
        <Button variant="secondary" className="!px-2 !py-1 text-xs" onClick={() => setRange(null)} disabled={!range}>Reset</Button>
        <span>Drag across a trace to zoom; wheel zooms; with the traces focused, ← → pan and 0 resets.</span>
      </div>
      {channels.map((ch, ordinal) => {
        const result = results?.channels.find((c) => c.name === ch.name) ?? null;
        return (
          <TracePlot
            key={`${ch.captureId}-${ch.index}`}
            captureId={ch.captureId}
            channelIndex={ch.index}
            title={ch.name}
            range={current}
            onRange={setRange}
            channel={result}
            gates={results?.gates.filter((g) => g.channel === ch.name) ?? []}
            expected={windows.filter((w) => w.channel === ch.name)}
            gateLabel={gateLabel}
            preview={preview}
            ordinal={ordinal}
          />
        );
      })}
    </div>
  );
}
