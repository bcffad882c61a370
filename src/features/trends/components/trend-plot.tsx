import { useEffect, useRef } from 'react';
import { useElementWidth } from '../../../lib/use-element-width.ts';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';

export interface TrendSeries {
  label: string;
  colour: string;
  /**
   * x in display units (kPa or shot number), y in m/s, u = expanded uncertainty in m/s (null: no bar); `signedOff`
   * true draws a filled marker, false a hollow one (undefined: filled, as for residuals).
   */
  points: { x: number; y: number; u: number | null; signedOff?: boolean }[];
}

export interface ReferenceLine { y: number; label: string; colour: string }

/** A model curve drawn as a line, in the plot's units (dashed when `dash` is given). */
export interface TrendCurve { label: string; colour: string; x: number[]; y: number[]; dash?: number[] }

/** A shaded band between two curves on the same x (a model's k = 2 band). */
export interface TrendBand { x: number[]; lo: number[]; hi: number[]; colour: string }

export interface TrendPlotProps {
  xLabel: string;
  /** Logarithmic x axis (decades of tube pressure). */
  logX?: boolean;
  /** Whole-number x axis (shot numbers): integer ticks and half a step of room at either end. */
  integerX?: boolean;
  series: TrendSeries[];
  /** Model curves drawn as lines, in the same units. */
  curves?: TrendCurve[];
  /** A shaded band drawn under everything else. */
  band?: TrendBand | null;
  references?: ReferenceLine[];
  height?: number;
  testId?: string;
  /** @default 'speed (m/s)' */
  yLabel?: string;
  /**
   * Lowest value the y axis may start at (null: none, for residuals that go below zero).
   * @default 0
   */
  yFloor?: number | null;
}

/**
 * Measured speeds as points with ±U error bars, one colour per group, and optionally a model curve and horizontal
 * reference lines (speed of sound). Reference lines outside the data's range are listed under the plot instead of
 * stretching it (the gas-dynamic limit is several times any measured speed).
 */
const NO_CURVES: TrendCurve[] = [];
const NO_REFERENCES: ReferenceLine[] = [];

export function TrendPlot({ xLabel, logX = false, integerX = false, series, curves = NO_CURVES, band = null, references = NO_REFERENCES, height = 300, testId, yLabel = 'speed (m/s)', yFloor = 0 }: TrendPlotProps) {
  const [box, width] = useElementWidth();
  const latest = useRef({ series, references, band });
  latest.current = { series, references, band };


  useEffect(() => {
    if (!box.current || width === 0) return;
    // One aligned table: each group's points and the curve on the union of their x values (empty groups left out).
    // A group whose points say whether they are signed off is drawn as two marker sets: filled (signed off) and hollow.
    const shown = series.flatMap((s) => {
      if (!s.points.some((p) => p.signedOff === false)) return [{ ...s, hollow: false }];
      return [
        { ...s, points: s.points.filter((p) => p.signedOff !== false), hollow: false },
        { ...s, points: s.points.filter((p) => p.signedOff === false), hollow: true },
      ];
    }).filter((s) => s.points.length > 0);
    const lines = curves.filter((c) => c.x.length > 0);
    const tables: uPlot.AlignedData[] = shown.map((s) => {
      const sorted = [...s.points].sort((a, b) => a.x - b.x);
      return [sorted.map((p) => p.x), sorted.map((p) => p.y)] as uPlot.AlignedData;
    });
    for (const line of lines) tables.push([line.x, line.y] as uPlot.AlignedData);
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
    for (const line of lines) for (const y of line.y) if (Number.isFinite(y)) { lo = Math.min(lo, y); hi = Math.max(hi, y); }
    if (band) for (let i = 0; i < band.x.length; i++) { lo = Math.min(lo, band.lo[i]); hi = Math.max(hi, band.hi[i]); }
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
          ? { time: false, distr: 3, log: 10, range: (_u, min, max) => [min / 1.4, max * 1.4] }
          : integerX ? { time: false, range: (_u, min, max) => [Math.floor(min) - 0.5, Math.ceil(max) + 0.5] } : { time: false },
        y: { range: () => [yFloor == null ? lo - pad : Math.max(yFloor, lo - pad), hi + pad] },
      },
      axes: [
        {
          stroke: '#365d7a', grid: { stroke: '#e2ebf2' }, label: xLabel, labelSize: 22,
          ...(integerX ? { incrs: [1, 2, 5, 10, 20, 50, 100, 200, 500, 1000], values: (_u: uPlot, splits: number[]) => splits.map((v) => (Number.isInteger(v) ? String(v) : '')) } : {}),
        },
        { stroke: '#365d7a', grid: { stroke: '#e2ebf2' }, size: 56, label: yLabel, labelSize: 22 },
      ],
      series: [
        {},
        ...shown.map((s) => ({
          label: s.label, stroke: s.colour, fill: s.colour, paths: () => null,
          points: s.hollow ? { show: true, size: 8, width: 1.5, fill: '#ffffff', stroke: s.colour } : { show: true, size: 7, fill: s.colour, stroke: s.colour },
        })),
        ...lines.map((line) => ({ label: line.label, stroke: line.colour, width: 2, dash: line.dash, spanGaps: true, points: { show: false } })),
      ],
      hooks: {
        // The band goes under the grid, points and lines: drawn right after the canvas is cleared.
        drawClear: [
          (u) => {
            const b = latest.current.band;
            if (!b || b.x.length < 2) return;
            const ctx = u.ctx;
            ctx.save();
            ctx.beginPath();
            ctx.rect(u.bbox.left, u.bbox.top, u.bbox.width, u.bbox.height);
            ctx.clip();
            ctx.beginPath();
            b.x.forEach((x, i) => (i === 0 ? ctx.moveTo : ctx.lineTo).call(ctx, u.valToPos(x, 'x', true), u.valToPos(b.hi[i], 'y', true)));
            for (let i = b.x.length - 1; i >= 0; i--) ctx.lineTo(u.valToPos(b.x[i], 'x', true), u.valToPos(b.lo[i], 'y', true));
            ctx.closePath();
            ctx.fillStyle = b.colour;
            ctx.fill();
            ctx.restore();
          },
        ],
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
  }, [box, width, height, logX, integerX, xLabel, yLabel, yFloor, series, curves, band, references]);

  const empty = series.every((s) => s.points.length === 0) && !curves.some((c) => c.x.length > 0);
  return (
    <div className="relative">
      <div ref={box} className="w-full" data-testid={testId} style={{ minHeight: height }} />
      {empty && <p className="absolute inset-0 flex items-center justify-center text-sm text-harbour-500">No analysed shots to plot.</p>}
    </div>
  );
}
