// Placing a plot label clear of the trace and of other labels (issue 11 review, gap c: "expected at Gate C (v ± U)"
// was drawn over a missed gate's dip). A synthetic dip: the trace runs flat near the top and drops to the bottom
// between x = 200 and 260 px; the blocked level's dashed line runs along the bottom.
import { describe, expect, it } from 'vitest';
import { coverage, placeLabel, type Box } from '../../../src/lib/place-label.ts';

const frame: Box = { x: 0, y: 0, w: 400, h: 100 };
const dipTrace = (x0: number, x1: number) => (x1 < 198 || x0 > 262 ? { top: 8, bottom: 12 } : { top: 8, bottom: 92 });
const levelLine: Box = { x: 0, y: 89, w: 400, h: 2 };
const size = { w: 100, h: 12 };

describe('placeLabel', () => {
  it('When the preferred spot (bottom of the expected window) lies on the dip, then the label moves to a spot clear of trace and lines, inside the frame', () => {
    const oldSpot = { x: 193, y: 100 - 6 - 12 };
    expect(coverage({ ...oldSpot, ...size }, { obstacles: [levelLine], traceSpan: dipTrace })).toBeGreaterThan(0);
    const rows = [0.97, 0.8, 0.62].map((f) => f * 100 - size.h);
    const placed = placeLabel({ size, frame, obstacles: [levelLine], traceSpan: dipTrace, candidates: [190 + 3, 270 + 4, 190 - 4 - size.w].flatMap((x) => rows.map((y) => ({ x, y }))) });
    expect(placed.clear).toBe(true);
    expect(coverage(placed.box, { obstacles: [levelLine], traceSpan: dipTrace })).toBe(0);
    expect(placed.box.x).toBeGreaterThanOrEqual(frame.x);
    expect(placed.box.x + placed.box.w).toBeLessThanOrEqual(frame.x + frame.w);
    // Right of the window, one row up from the dashed line: the first clear candidate in the caller's order.
    expect(placed.box).toEqual({ x: 274, y: 80 - 12, w: 100, h: 12 });
  });

  it('When a candidate runs past the frame, then it is moved inside before it is judged', () => {
    const placed = placeLabel({ size, frame, obstacles: [], traceSpan: () => null, candidates: [{ x: 380, y: 95 }] });
    expect(placed.box).toEqual({ x: 300, y: 88, w: 100, h: 12 });
  });

  it('When no candidate is clear, then the one covering least is taken and said not to be clear', () => {
    const full = () => ({ top: 0, bottom: 100 });
    const placed = placeLabel({ size, frame, obstacles: [{ x: 0, y: 0, w: 150, h: 100 }], traceSpan: (x0) => (x0 > 250 ? full() : null), candidates: [{ x: 0, y: 40 }, { x: 150, y: 40 }] });
    expect(placed.clear).toBe(false);
    expect(placed.box.x).toBe(150);
  });
});
