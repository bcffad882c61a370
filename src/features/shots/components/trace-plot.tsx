import { useQuery } from '@tanstack/react-query';
import { useElementWidth } from '../../../lib/use-element-width.ts';
import { useEffect, useRef } from 'react';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import type { ChannelResult, GateResult } from '../../../../shared/analysis/types.ts';
import { describeDip } from '../../../../shared/analysis/describe-dip.ts';
import { formatSeconds } from '../../../lib/format.ts';
import { placeLabel, type Box } from '../../../lib/place-label.ts';
import type { Range } from '../../../lib/range-zoom.ts';
import { levelsRange, PLOT_PADDING_RIGHT, selectToRange, traceAxes, traceWindowQuery, windowColumns } from '../../../lib/trace-plot-setup.ts';
import type { ExpectedWindow } from '../lib/expected-windows.ts';

export interface TracePlotProps {
  captureId: string;
  channelIndex: number;
  title: string;
  range: Range;
  onRange: (range: Range) => void;
  channel: ChannelResult | null;
  gates: GateResult[];
  expected: ExpectedWindow[];
  gateLabel: (position: number) => string;
  /** Whether the annotations come from the browser's preview rather than a stored version. */
  preview: boolean;
  /** Position of this plot in the stack (for tests and keyboard users). */
  ordinal: number;
  height?: number;
}

const TRACE = '#244863';
const BAND = 'rgba(36, 72, 99, 0.18)';
const SIGNAL = '#c47a12';
const SIGNAL_FILL = 'rgba(242, 165, 65, 0.09)';
const EXPECT_FILL = 'rgba(77, 118, 148, 0.12)';
const MISSED = '#b42318';
const DIP_FILL = 'rgba(180, 35, 24, 0.10)';

interface Annotations { channel: ChannelResult | null; gates: GateResult[]; expected: ExpectedWindow[]; gateLabel: (p: number) => string; preview: boolean; title: string }

/** Text shortened with an ellipsis until it fits `max` pixels in the context's current font. */
function fitText(ctx: CanvasRenderingContext2D, text: string, max: number): string {
  if (ctx.measureText(text).width <= max) return text;
  let t = text;
  while (t.length > 1 && ctx.measureText(`${t}…`).width > max) t = t.slice(0, -1);
  return `${t.trimEnd()}…`;
}

/**
 * The vertical extent (canvas px) the drawn trace covers between two canvas x positions: the min and max series
 * of the columns in between (and the ones either side, whose segments cross into the span).
 */
function traceSpanOf(u: uPlot): (x0: number, x1: number) => { top: number; bottom: number } | null {
  const xs = u.data[0] as ArrayLike<number>;
  const lows = u.data[1] as ArrayLike<number | null>;
  const highs = u.data[2] as ArrayLike<number | null>;
  return (cx0, cx1) => {
    if (!xs || xs.length === 0) return null;
    const t0 = u.posToVal(cx0, 'x', true);
    const t1 = u.posToVal(cx1, 'x', true);
    let i0 = Math.max(0, u.valToIdx(Math.min(t0, t1)) - 1);
    const i1 = Math.min(xs.length - 1, u.valToIdx(Math.max(t0, t1)) + 1);
    let lo = Infinity;
    let hi = -Infinity;
    for (; i0 <= i1; i0++) {
      const a = lows[i0];
      const b = highs[i0];
      if (a != null) lo = Math.min(lo, a);
      if (b != null) hi = Math.max(hi, b);
    }
    if (!(hi >= lo)) return null;
    const yTop = u.valToPos(hi, 'y', true);
    const yBottom = u.valToPos(lo, 'y', true);
    return { top: Math.min(yTop, yBottom) - 1, bottom: Math.max(yTop, yBottom) + 1 };
  };
}

/** Draws levels, threshold band, crossings, pulse brackets, gate labels, expected windows and missed-gate notes. */
function drawAnnotations(u: uPlot, a: Annotations) {
  const ctx = u.ctx;
  const { left, top, width, height } = u.bbox;
  const px = (t: number) => u.valToPos(t, 'x', true);
  const py = (v: number) => u.valToPos(v, 'y', true);
  const dpr = devicePixelRatio || 1;
  let fontPx = 10 * dpr;
  const font = (size: number, weight = 400) => {
    fontPx = Math.round(size * dpr);
    return `${weight} ${fontPx}px "IBM Plex Sans", sans-serif`;
  };
  // Every label drawn inside the frame, so the ones placed last (expected windows) keep clear of them.
  const drawn: Box[] = [];
  const fillLabel = (text: string, x: number, baseline: number) => {
    ctx.fillText(text, x, baseline);
    drawn.push({ x, y: baseline - fontPx, w: ctx.measureText(text).width, h: fontPx * 1.25 });
  };
  ctx.save();
  // uPlot leaves its axis text alignment on the context.
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  ctx.beginPath();
  ctx.rect(left, top, width, height);
  ctx.clip();

  const expectedShown: { w: ExpectedWindow; x0: number; x1: number }[] = [];
  for (const w of a.expected) {
    const x0 = Math.max(left, px(w.early));
    const x1 = Math.min(left + width, px(w.late));
    if (x1 > x0) {
      ctx.fillStyle = EXPECT_FILL;
      ctx.fillRect(x0, top, Math.max(1, x1 - x0), height);
      expectedShown.push({ w, x0, x1 });
    }
  }

  const ch = a.channel;
  if (ch) {
    const dashed = (y: number, color: string, label: string) => {
      ctx.strokeStyle = color;
      ctx.setLineDash([4 * dpr, 4 * dpr]);
      ctx.lineWidth = dpr;
      ctx.beginPath();
      ctx.moveTo(left, py(y));
      ctx.lineTo(left + width, py(y));
      ctx.stroke();
      ctx.setLineDash([]);
      // A label struck through by a level line is as hard to read as one on the trace.
      drawn.push({ x: left, y: py(y) - dpr, w: width, h: 2 * dpr });
      ctx.fillStyle = color;
      ctx.font = font(10);
      fillLabel(label, left + width - ctx.measureText(label).width - 4 * dpr, py(y) - 3 * dpr);
    };
    const blockedHigh = ch.polarity === 'rising';
    dashed(ch.levels.high, '#4d7694', `${blockedHigh ? 'blocked' : 'clear'} ${ch.levels.high.toFixed(3)} V`);
    dashed(ch.levels.low, '#4d7694', `${blockedHigh ? 'clear' : 'blocked'} ${ch.levels.low.toFixed(3)} V`);
    if (ch.threshold) {
      const yTop = py(Math.max(ch.threshold.highArm, ch.threshold.lowArm));
      const yBottom = py(Math.min(ch.threshold.highArm, ch.threshold.lowArm));
      ctx.fillStyle = SIGNAL_FILL;
      ctx.fillRect(left, yTop, width, Math.max(1, yBottom - yTop));
      ctx.strokeStyle = SIGNAL;
      ctx.lineWidth = 1.5 * dpr;
      ctx.beginPath();
      ctx.moveTo(left, py(ch.threshold.level));
      ctx.lineTo(left + width, py(ch.threshold.level));
      ctx.stroke();
      drawn.push({ x: left, y: py(ch.threshold.level) - dpr, w: width, h: 2 * dpr });
      ctx.fillStyle = SIGNAL;
      ctx.font = font(10, 500);
      fillLabel(`threshold ${ch.threshold.level.toFixed(3)} V`, left + 4 * dpr, py(ch.threshold.level) - 4 * dpr);
    }
    for (const tr of ch.transitions) {
      const x = px(tr.time);
      if (x < left || x > left + width) continue;
      ctx.strokeStyle = SIGNAL;
      ctx.lineWidth = dpr;
      ctx.beginPath();
      ctx.moveTo(x, top);
      ctx.lineTo(x, top + height);
      ctx.stroke();
      if (ch.threshold) {
        ctx.fillStyle = SIGNAL;
        ctx.beginPath();
        ctx.arc(x, py(ch.threshold.level), 3.5 * dpr, 0, 2 * Math.PI);
        ctx.fill();
      }
      ctx.fillStyle = '#7a4a06';
      ctx.font = font(10);
      const label = formatSeconds(tr.time, 5);
      fillLabel(label, x + 3 * dpr, top + height - (tr.direction === 'falling' ? 20 : 32) * dpr);
    }
    const bracketY = top + 6 * dpr;
    for (const p of ch.pulses) {
      const x0 = px(p.start);
      const x1 = px(p.end);
      if (x1 < left || x0 > left + width) continue;
      ctx.strokeStyle = '#16324a';
      ctx.lineWidth = 1.5 * dpr;
      ctx.beginPath();
      ctx.moveTo(x0, bracketY + 5 * dpr);
      ctx.lineTo(x0, bracketY);
      ctx.lineTo(x1, bracketY);
      ctx.lineTo(x1, bracketY + 5 * dpr);
      ctx.stroke();
      ctx.fillStyle = '#16324a';
      ctx.font = font(11, 500);
      const label = `width ${formatSeconds(p.width, 4)}`;
      const tw = ctx.measureText(label).width;
      fillLabel(label, Math.max(left + 2 * dpr, (x0 + x1) / 2 - tw / 2), bracketY + 17 * dpr);
    }
    if (ch.status === 'missed') {
      // The note and the dip's label sit in the middle band, between the clear level and the dip's floor, where
      // the trace only passes on the dip's edges; each is shortened to fit the plot's width.
      const dip = describeDip(ch);
      const idle = ch.polarity === 'falling' ? ch.levels.high : ch.levels.low;
      const middle = py(dip ? (idle + dip.level) / 2 : (ch.levels.high + ch.levels.low) / 2);
      const yMid = Number.isFinite(middle) ? Math.min(top + height - 24 * dpr, Math.max(top + 30 * dpr, middle)) : top + height / 2;
      const room = width - 16 * dpr;
      if (dip) {
        const x0 = Math.max(left, px(dip.start));
        const x1 = Math.min(left + width, px(dip.end));
        if (x1 > x0) {
          ctx.fillStyle = DIP_FILL;
          ctx.fillRect(x0, top, Math.max(1, x1 - x0), height);
          ctx.strokeStyle = MISSED;
          ctx.lineWidth = 1.5 * dpr;
          ctx.setLineDash([5 * dpr, 3 * dpr]);
          ctx.beginPath();
          ctx.moveTo(x0, py(dip.level));
          ctx.lineTo(x1, py(dip.level));
          ctx.stroke();
          ctx.setLineDash([]);
        }
        ctx.fillStyle = MISSED;
        ctx.font = font(11, 500);
        const label = fitText(ctx, dip.label, room);
        const tw = ctx.measureText(label).width;
        // Right of the span when it fits, else left of it, always inside the frame.
        const right = x1 + 6 * dpr;
        const lx = right + tw <= left + width - 8 * dpr ? right : Math.max(left + 8 * dpr, Math.min(x0 - 6 * dpr - tw, left + width - 8 * dpr - tw));
        fillLabel(label, lx, yMid + 12 * dpr);
      }
      ctx.fillStyle = MISSED;
      ctx.font = font(12, 600);
      fillLabel(fitText(ctx, `Missed: ${ch.reason ?? 'no pulse found'}`, room), left + 8 * dpr, yMid - 4 * dpr);
      if (!dip && ch.candidate) {
        const x = px(ch.candidate.time);
        ctx.strokeStyle = MISSED;
        ctx.lineWidth = 1.5 * dpr;
        ctx.beginPath();
        ctx.arc(x, yMid + 18 * dpr, 6 * dpr, 0, 2 * Math.PI);
        ctx.stroke();
        ctx.font = font(11);
        const text = fitText(ctx, ch.candidate.message, room);
        fillLabel(text, Math.max(left + 8 * dpr, Math.min(x + 10 * dpr, left + width - 8 * dpr - ctx.measureText(text).width)), yMid + 22 * dpr);
      }
    }
  }

  // "expected at Gate C (v ± U)" last, placed where it covers neither the trace (a missed gate's dip runs through the
  // window it labels) nor the labels above: inside its window first, then beside it; rows from the bottom up.
  const expectedLabels: { text: string; box: Box; clear: boolean }[] = [];
  ctx.fillStyle = '#365d7a';
  ctx.font = font(10);
  const frame: Box = { x: left + 2 * dpr, y: top + 2 * dpr, w: width - 4 * dpr, h: height - 4 * dpr };
  const span = traceSpanOf(u);
  for (const { w, x0, x1 } of expectedShown) {
    const text = fitText(ctx, `expected at ${a.gateLabel(w.position)} (v ± U)`, frame.w);
    const size = { w: ctx.measureText(text).width, h: fontPx * 1.25 };
    const rows = [0.97, 0.8, 0.62, 0.44, 0.26, 0.12].map((f) => top + f * height - size.h);
    const columns = [x0 + 3 * dpr, x1 + 4 * dpr, x0 - 4 * dpr - size.w];
    const placed = placeLabel({ size, frame, obstacles: drawn, traceSpan: span, candidates: columns.flatMap((x) => rows.map((y) => ({ x, y }))) });
    ctx.fillText(text, placed.box.x, placed.box.y + fontPx);
    drawn.push(placed.box);
    expectedLabels.push({ text, ...placed });
  }
  // For the browser tests: where each expected-window label went and whether it is clear of the trace and labels.
  u.root.dataset.expectedLabels = JSON.stringify(expectedLabels.map((l) => ({
    text: l.text, clear: l.clear,
    inside: l.box.x >= left && l.box.y >= top && l.box.x + l.box.w <= left + width && l.box.y + l.box.h <= top + height,
  })));
  ctx.restore();

  // Gate labels sit outside the clip, over the plot's top-left corner.
  ctx.save();
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  // A gate named like its channel ("Gate A" on channel "Gate A") is not named twice: "Gate A · 0.0 mm".
  const labels = a.gates.map((g) => {
    const name = a.gateLabel(g.position);
    const where = `${(g.position * 1000).toFixed(1)} mm${g.status === 'missed' ? ' · missed' : ''}`;
    return name === a.title ? where : `${name} · ${where}`;
  });
  ctx.fillStyle = '#0d2133';
  ctx.font = font(12, 600);
  ctx.fillText(labels.length > 0 ? `${a.title} · ${labels.join('   ')}` : a.title, left + 6 * dpr, top - 8 * dpr);
  if (a.preview) {
    ctx.fillStyle = SIGNAL;
    ctx.font = font(11, 600);
    const t = 'PREVIEW';
    ctx.fillText(t, left + width - ctx.measureText(t).width - 4 * dpr, top - 8 * dpr);
  }
  ctx.restore();
}

/** One channel's trace from min/max windows of the server, refined as the range narrows, down to raw samples. */
export function TracePlot(props: TracePlotProps) {
  const { captureId, channelIndex, range, onRange, height = 190 } = props;
  const [box, width] = useElementWidth();
  const plot = useRef<uPlot | null>(null);
  const annotations = useRef<Annotations>({ channel: null, gates: [], expected: [], gateLabel: String, preview: false, title: '' });
  annotations.current = { channel: props.channel, gates: props.gates, expected: props.expected, gateLabel: props.gateLabel, preview: props.preview, title: props.title };
  const onRangeRef = useRef(onRange);
  onRangeRef.current = onRange;

  const points = Math.max(100, Math.min(4000, Math.round(width)));
  const windowQuery = useQuery(traceWindowQuery(captureId, channelIndex, range.from, range.to, points, width > 0));


  useEffect(() => {
    if (!box.current || width === 0) return;
    const opts: uPlot.Options = {
      width,
      height,
      padding: [26, PLOT_PADDING_RIGHT, 0, 0],
      legend: { show: false },
      cursor: { drag: { x: true, y: false, setScale: false }, points: { show: false } },
      // The vertical range follows the channel's state levels, so zooming into a flat stretch does not blow the
      // noise up to full height; without levels it follows the data.
      scales: {
        x: { time: false },
        y: {
          range: (_u, dataMin, dataMax) => {
            const ch = annotations.current.channel;
            return levelsRange(ch && ch.levels.amplitude > 0 ? ch.levels : null, dataMin, dataMax);
          },
        },
      },
      axes: traceAxes(56),
      series: [{}, { stroke: TRACE, width: 1 }, { stroke: TRACE, width: 1 }],
      bands: [{ series: [2, 1], fill: BAND }],
      hooks: {
        draw: [(u) => drawAnnotations(u, annotations.current)],
        setSelect: [selectToRange(onRangeRef)],
      },
    };
    const u = new uPlot(opts, [[], [], []], box.current);
    plot.current = u;
    return () => {
      u.destroy();
      plot.current = null;
    };
  }, [box, width, height]);

  const data = windowQuery.data;
  useEffect(() => {
    const u = plot.current;
    if (!u || !data) return;
    u.setData(windowColumns(data), true);
    u.setScale('x', { min: range.from, max: range.to });
  }, [data, range.from, range.to, width]);

  useEffect(() => {
    plot.current?.redraw(false);
  }, [props.channel, props.gates, props.expected, props.preview]);

  const raw = data?.raw === true;
  return (
    <div className="relative">
      <div ref={box} className="w-full" data-testid={`trace-${props.ordinal}`} data-raw={raw ? 'true' : 'false'} />
      <p className="absolute right-2 top-0 text-[10px] text-harbour-500">
        {windowQuery.isFetching ? 'refining…' : raw ? 'raw samples' : 'min/max per column'}
      </p>
    </div>
  );
}
