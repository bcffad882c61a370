import { useQueries } from '@tanstack/react-query';
import { useElementWidth } from '../../../lib/use-element-width.ts';
import { useEffect, useMemo, useRef } from 'react';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import type { Range } from '../../../lib/range-zoom.ts';
import { levelsRange, PLOT_PADDING_RIGHT, selectToRange, traceAxes, traceWindowQuery, windowColumns } from '../../../lib/trace-plot-setup.ts';

/** One trace on a comparison plot: a capture's channel, shifted so its shot's alignment instant is t = 0. */
export interface CompareSource {
  key: string;
  captureId: string;
  channelIndex: number;
  /** The shot's alignment instant, s: the plot shows t − offset. */
  offset: number;
  colour: string;
  label: string;
  /** The channel's state levels from its analysis, V: the vertical range follows them, so a flat stretch shows flat. */
  levels?: { low: number; high: number } | null;
}

/**
 * Several traces on one relative time axis (each shot's alignment instant at 0), each drawn as its min/max band in
 * its own colour. All plots of the comparison share `range`; dragging across one zooms them all.
 */
export function ComparePlot({ title, sources, range, onRange, height = 170 }: {
  title: string;
  sources: CompareSource[];
  range: Range;
  onRange: (r: Range) => void;
  height?: number;
}) {
  const [box, width] = useElementWidth();
  const plot = useRef<uPlot | null>(null);
  const onRangeRef = useRef(onRange);
  onRangeRef.current = onRange;
  const sourcesRef = useRef(sources);
  sourcesRef.current = sources;
  const titleRef = useRef(title);
  titleRef.current = title;
  // Each trace over the same relative range: points per window ≈ pixel columns.
  const points = Math.max(100, Math.min(3000, Math.round(width)));
  const windows = useQueries({
    queries: sources.map((s) => {
      const from = range.from + s.offset;
      const to = range.to + s.offset;
      return traceWindowQuery(s.captureId, s.channelIndex, from, to, points, width > 0);
    }),
  });


  const seriesKey = sources.map((s) => `${s.key}:${s.colour}`).join('|');
  useEffect(() => {
    if (!box.current || width === 0) return;
    const series: uPlot.Series[] = [{}];
    const bands: uPlot.Band[] = [];
    sources.forEach((s, i) => {
      series.push({ label: `${s.label} min`, stroke: s.colour, width: 1, spanGaps: true });
      series.push({ label: `${s.label} max`, stroke: s.colour, width: 1, spanGaps: true });
      bands.push({ series: [2 * i + 2, 2 * i + 1], fill: `${s.colour}33` });
    });
    const opts: uPlot.Options = {
      width,
      height,
      padding: [22, PLOT_PADDING_RIGHT, 0, 0],
      legend: { show: false },
      cursor: { drag: { x: true, y: false, setScale: false }, points: { show: false } },
      scales: {
        x: { time: false },
        y: {
          range: (_u, dataMin, dataMax) => {
            // Every trace's levels together: the lowest low and the highest high.
            const known = sourcesRef.current.map((x) => x.levels).filter((l): l is { low: number; high: number } => l != null && l.high > l.low);
            const levels = known.length > 0 ? { low: Math.min(...known.map((l) => l.low)), high: Math.max(...known.map((l) => l.high)) } : null;
            return levelsRange(levels, dataMin, dataMax);
          },
        },
      },
      axes: traceAxes(60),
      series,
      bands,
      hooks: {
        draw: [
          (u) => {
            const ctx = u.ctx;
            const dpr = devicePixelRatio || 1;
            ctx.save();
            ctx.textAlign = 'left';
            ctx.textBaseline = 'alphabetic';
            ctx.fillStyle = '#0d2133';
            ctx.font = `600 ${Math.round(12 * dpr)}px "IBM Plex Sans", sans-serif`;
            ctx.fillText(titleRef.current, u.bbox.left + 4 * dpr, u.bbox.top - 7 * dpr);
            // The alignment instant.
            const x0 = u.valToPos(0, 'x', true);
            if (x0 >= u.bbox.left && x0 <= u.bbox.left + u.bbox.width) {
              ctx.strokeStyle = '#c47a12';
              ctx.setLineDash([3 * dpr, 3 * dpr]);
              ctx.lineWidth = dpr;
              ctx.beginPath();
              ctx.moveTo(x0, u.bbox.top);
              ctx.lineTo(x0, u.bbox.top + u.bbox.height);
              ctx.stroke();
            }
            ctx.restore();
          },
        ],
        setSelect: [selectToRange(onRangeRef)],
      },
    };
    const empty: uPlot.AlignedData = [[], ...sources.flatMap(() => [[], []])] as unknown as uPlot.AlignedData;
    const u = new uPlot(opts, empty, box.current);
    plot.current = u;
    return () => {
      u.destroy();
      plot.current = null;
    };
    // The series are rebuilt when the set of traces changes, not on every render.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [width, height, seriesKey]);

  const datas = windows.map((w) => w.data);
  const data = useMemo(() => {
    if (datas.some((d) => !d)) return null;
    const tables = datas.map((d, i) => windowColumns(d!, sources[i].offset));
    return tables.length === 1 ? tables[0] : uPlot.join(tables);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [...datas, seriesKey]);

  useEffect(() => {
    const u = plot.current;
    if (!u || !data) return;
    u.setData(data, true);
    u.setScale('x', { min: range.from, max: range.to });
  }, [data, range.from, range.to, width, seriesKey]);

  const error = windows.find((w) => w.isError)?.error;
  return (
    <div className="relative">
      <div ref={box} className="w-full" data-testid="compare-plot" />
      <p className="absolute right-2 top-0 text-[10px] text-harbour-500">
        {error ? `could not load: ${(error as Error).message}` : windows.some((w) => w.isFetching) ? 'refining…' : ''}
      </p>
    </div>
  );
}
