/**
 * Where to put a label on a plot so that it neither covers the trace nor another label and stays inside the frame:
 * the first candidate position (in the caller's order of preference) that is clear, else the one that covers least.
 * Canvas pixels, y downwards; a box is its top-left corner and size.
 */
export interface Box { x: number; y: number; w: number; h: number }

export interface PlaceLabelOptions {
  /** The label's size. */
  size: { w: number; h: number };
  /** Top-left corners to try, most preferred first; each is moved inside the frame before it is tried. */
  candidates: { x: number; y: number }[];
  /** The plotting area: the label stays inside it. */
  frame: Box;
  /** Labels already drawn. */
  obstacles: Box[];
  /** The vertical extent the trace covers between two x positions (top ≤ bottom), or null where nothing is drawn. */
  traceSpan: (x0: number, x1: number) => { top: number; bottom: number } | null;
  /**
   * Clearance kept around the label, px.
   * @default 2
   */
  gap?: number;
}

export interface PlacedLabel {
  box: Box;
  /** True when the label touches neither the trace nor another label. */
  clear: boolean;
}

const overlap1d = (a0: number, a1: number, b0: number, b1: number) => Math.max(0, Math.min(a1, b1) - Math.max(a0, b0));

/** Moves a box inside the frame (a box wider than the frame starts at its left edge). */
export function insideFrame(b: Box, frame: Box): Box {
  const x = Math.max(frame.x, Math.min(b.x, frame.x + frame.w - b.w));
  const y = Math.max(frame.y, Math.min(b.y, frame.y + frame.h - b.h));
  return { ...b, x, y };
}

/** How much of the box (with its gap) the trace and the other labels cover, in px². */
export function coverage(b: Box, o: Pick<PlaceLabelOptions, 'obstacles' | 'traceSpan' | 'gap'>): number {
  const g = o.gap ?? 2;
  const x0 = b.x - g;
  const x1 = b.x + b.w + g;
  const y0 = b.y - g;
  const y1 = b.y + b.h + g;
  let covered = 0;
  // The trace column by column (4 px strips), so a label beside a steep edge is not charged for the whole edge.
  const step = 4;
  for (let x = x0; x < x1; x += step) {
    const span = o.traceSpan(x, Math.min(x + step, x1));
    if (span) covered += overlap1d(y0, y1, span.top, span.bottom) * (Math.min(x + step, x1) - x);
  }
  for (const ob of o.obstacles) covered += overlap1d(x0, x1, ob.x, ob.x + ob.w) * overlap1d(y0, y1, ob.y, ob.y + ob.h);
  return covered;
}

export function placeLabel(o: PlaceLabelOptions): PlacedLabel {
  let best: PlacedLabel | null = null;
  let bestCover = Infinity;
  for (const c of o.candidates) {
    const box = insideFrame({ x: c.x, y: c.y, w: o.size.w, h: o.size.h }, o.frame);
    const cover = coverage(box, o);
    if (cover === 0) return { box, clear: true };
    if (cover < bestCover) {
      bestCover = cover;
      best = { box, clear: false };
    }
  }
  return best ?? { box: insideFrame({ x: o.frame.x, y: o.frame.y, ...o.size }, o.frame), clear: false };
}
