import { useEffect, useRef } from 'react';
import { useElementWidth } from '../../../lib/use-element-width.ts';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';

export interface TrendSeries {
  label: string;
  colour: string;
  /** x in display units (kPa or shot number), y in m/s, u = expanded uncertainty in m/s (null: no bar). */
  points: { x: number; y: number; u: number | null }[];
}

export interface ReferenceLine { y: number; label: string; colour: string }

export interface TrendPlotProps {
  xLabel: string;
  /** Logarithmic x axis (decades of tube pressure). */
  logX?: boolean;
  /** Whole-number x axis (shot numbers): integer ticks and half a step of room at either end. */
  integerX?: boolean;
  series: TrendSeries[];
  /** A model curve drawn as a line, in the same units. */
  curve?: { label: string; colour: string; x: number[]; y: number[] } | null;
  references?: ReferenceLine[];
  height?: number;
  testId?: string;
}

/**
 * Measured speeds as points with ±U error bars, one colour per group, and optionally a model curve and horizontal
 * reference lines (speed of sound). Reference lines outside the data's range are listed under the plot instead of
 * stretching it (the gas-dynamic limit is several times any measured speed).
 */
export function TrendPlot({ xLabel, logX = false, integerX = false, series, curve = null, references = [], height = 300, testId }: TrendPlotProps) {
  const [box, width] = useElementWidth();
  const latest = useRef({ series, curve, references });
  latest.current = { series, curve, references };


  useEffect(() => {
    if (!box.current || width === 0) return;
    // One aligned table: each group's points and the curve on the union of their x values (empty groups left out).
    const shown = series.filter((s) => s.points.length > 0);
    const line = curve && curve.x.length > 0 ? curve : null;
    const tables: uPlot.AlignedData[] = shown.map((s) => {
      const sorted = [...s.points].sort((a, b) => a.x - b.x);
      return [sorted.map((p) => p.x), sorted.map((p) => p.y)] as uPlot.AlignedData;
    });
    if (line) tables.push([line.x, line.y] as uPlot.AlignedData);
    if (tables.length === 0) return;
    const data = tables.length === 1 ? tables[0] : uPlot.join(tables);

    let lo = Infinity;
    let hi = -Infinity;
    for (const s of series) {
      for (const p of s.points) {
        lo = Math.min(lo, p.y - (p.u ?? 0));
        hi = Math.max(hi, p.y + (p.u ?? 0));
      }
    }
    if (line) for (const y of line.y) if (Number.isFinite(y)) { lo = Math.min(lo, y); hi = Math.max(hi, y); }
    if (!Number.isFinite(lo)) { lo = 0; hi = 400; }
    // Reference lines join the range only when they are near the data (within 30 %).
    for (const r of references) if (r.y <= hi * 1.3) hi = Math.max(hi, r.y);
    const pad = (hi - lo) * 0.08 || 10;

    const opts: uPlot.Options = {
      width,
      height,
      legend: { show: false },
      cursor: { points: { size: 8 } },
      scales: {
        x: logX
          ? { time: false, distr: 3, log: 10 }
          : integerX ? { time: false, range: (_u, min, max) => [Math.floor(min) - 0.5, Math.ceil(max) + 0.5] } : { time: false },
        y: { range: () => [Math.max(0, lo - pad), hi + pad] },
      },
      axes: [
        {
          stroke: '#365d7a', grid: { stroke: '#e2ebf2' }, label: xLabel, labelSize: 22,
          ...(integerX ? { incrs: [1, 2, 5, 10, 20, 50, 100, 200, 500, 1000], values: (_u: uPlot, splits: number[]) => splits.map((v) => (Number.isInteger(v) ? String(v) : '')) } : {}),
        },
        { stroke: '#365d7a', grid: { stroke: '#e2ebf2' }, size: 56, label: 'speed (m/s)', labelSize: 22 },
      ],
      series: [
        {},
        ...shown.map((s) => ({ label: s.label, stroke: s.colour, fill: s.colour, paths: () => null, points: { show: true, size: 7, fill: s.colour, stroke: s.colour } })),
        ...(line ? [{ label: line.label, stroke: line.colour, width: 2, dash: [6, 4], spanGaps: true, points: { show: false } }] : []),
      ],
      hooks: {
        draw: [
          (u) => {
            const ctx = u.ctx;
            const dpr = devicePixelRatio || 1;
            const { left, top, width: w, height: h } = u.bbox;
            ctx.save();
            ctx.beginPath();
            ctx.rect(left, top, w, h);
            ctx.clip();
            for (const s of latest.current.series) {
              ctx.strokeStyle = s.colour;
              ctx.lineWidth = 1.25 * dpr;
              for (const p of s.points) {
                if (p.u == null || !(p.u > 0)) continue;
                const x = u.valToPos(p.x, 'x', true);
                const y0 = u.valToPos(p.y - p.u, 'y', true);
                const y1 = u.valToPos(p.y + p.u, 'y', true);
                ctx.beginPath();
                ctx.moveTo(x, y0);
                ctx.lineTo(x, y1);
                ctx.moveTo(x - 3 * dpr, y0);
                ctx.lineTo(x + 3 * dpr, y0);
                ctx.moveTo(x - 3 * dpr, y1);
                ctx.lineTo(x + 3 * dpr, y1);
                ctx.stroke();
              }
            }
            ctx.textAlign = 'left';
            ctx.textBaseline = 'alphabetic';
            ctx.font = `500 ${Math.round(11 * dpr)}px "IBM Plex Sans", sans-serif`;
            for (const r of latest.current.references) {
              const y = u.valToPos(r.y, 'y', true);
              if (y < top || y > top + h) continue;
              ctx.strokeStyle = r.colour;
              ctx.setLineDash([2 * dpr, 3 * dpr]);
              ctx.lineWidth = 1.5 * dpr;
              ctx.beginPath();
              ctx.moveTo(left, y);
              ctx.lineTo(left + w, y);
              ctx.stroke();
              ctx.setLineDash([]);
              ctx.fillStyle = r.colour;
              ctx.fillText(r.label, left + 6 * dpr, y - 4 * dpr);
            }
            ctx.restore();
          },
        ],
      },
    };
    const u = new uPlot(opts, data, box.current);
    return () => u.destroy();
  }, [box, width, height, logX, integerX, xLabel, series, curve, references]);

  const empty = series.every((s) => s.points.length === 0) && !(curve && curve.x.length > 0);
  return (
    <div className="relative">
      <div ref={box} className="w-full" data-testid={testId} style={{ minHeight: height }} />
      {empty && <p className="absolute inset-0 flex items-center justify-center text-sm text-harbour-500">No analysed shots to plot.</p>}
    </div>
  );
}
