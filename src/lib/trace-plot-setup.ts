import { keepPreviousData } from '@tanstack/react-query';
import type uPlot from 'uplot';
import type { Range } from './range-zoom.ts';
import { timeTicks } from './time-axis.ts';
import { fetchWindow, traceWindowKey, type TraceWindow } from './trace-window.ts';

/**
 * What the shot's trace plots and the comparison's plots set up alike: the window query, the vertical range, the
 * axes, the drag-to-zoom hook and the window's columns.
 */

/**
 * Query options of one channel's window over [from, to]. A stored capture never changes, so a window never goes
 * stale; the last window stays on screen while the next one loads.
 */
export function traceWindowQuery(captureId: string, channel: number, from: number, to: number, points: number, enabled: boolean) {
  return {
    queryKey: traceWindowKey(captureId, channel, from, to, points),
    queryFn: () => fetchWindow(captureId, channel, from, to, points),
    enabled,
    placeholderData: keepPreviousData,
    staleTime: Infinity,
  };
}

/**
 * The vertical range: it follows the state levels, padded by 12 % of the step, so zooming into a flat stretch does
 * not blow the noise up to full height; without levels it follows the data, padded by 8 %.
 */
export function levelsRange(levels: { low: number; high: number } | null, dataMin: number, dataMax: number): uPlot.Range.MinMax {
  if (levels && levels.high > levels.low) {
    const pad = 0.12 * (levels.high - levels.low);
    return [Math.min(levels.low - pad, dataMin), Math.max(levels.high + pad, dataMax)];
  }
  const pad = (dataMax - dataMin) * 0.08 || 0.1;
  return [dataMin - pad, dataMax + pad];
}

/**
 * Room right of the plot area, px: a time label is centred on its tick, so the last one (up to "−1234.56 µs", about
 * 70 px in the axis font) needs half its width beyond the plot's right edge, or the canvas cuts it off.
 */
export const PLOT_PADDING_RIGHT = 36;

/** The time axis (ticks in s, ms, µs or ns to suit the span) and the volt axis, `voltAxisSize` pixels wide. */
export function traceAxes(voltAxisSize: number): uPlot.Axis[] {
  return [
    { stroke: '#365d7a', grid: { stroke: '#e2ebf2' }, values: (u, splits) => timeTicks(splits, (u.scales.x.max ?? 1) - (u.scales.x.min ?? 0)) },
    { stroke: '#365d7a', grid: { stroke: '#e2ebf2' }, size: voltAxisSize, values: (_u, splits) => splits.map((v) => `${v.toFixed(2)} V`) },
  ];
}

/** A setSelect hook: a drag of 4 px or more across the plot becomes the new range (read from the ref when it fires). */
export function selectToRange(onRange: { current: (range: Range) => void }): (u: uPlot) => void {
  return (u) => {
    if (u.select.width < 4) return;
    const from = u.posToVal(u.select.left, 'x');
    const to = u.posToVal(u.select.left + u.select.width, 'x');
    u.setSelect({ left: 0, top: 0, width: 0, height: 0 }, false);
    onRange.current({ from, to });
  };
}

/** A window as [x, min, max] columns, x at each column's middle, shifted by −`offset`; raw samples twice. */
export function windowColumns(w: TraceWindow, offset = 0): uPlot.AlignedData {
  if (w.raw) return [offset === 0 ? w.t : w.t.map((t) => t - offset), w.v, w.v];
  const xs = new Array<number>(w.min.length);
  for (let j = 0; j < xs.length; j++) xs[j] = w.t0 + (j + 0.5) * w.dt - offset;
  return [xs, w.min, w.max];
}
