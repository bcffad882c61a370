import { describe, expect, it } from 'vitest';
import { layoutTimeAxis, layoutTraceLabels, traceTitle, type ReportTrace } from '../../../server/modules/reports/build-shot-report.ts';

// A stand-in for the font's advance widths: 0.55 em per character (IBM Plex Sans averages about that, from memory).
const measure = (text: string, size: number) => text.length * size * 0.55;
const frame = { plotLeft: 92, plotWidth: 453, top: 200, height: 100, from: -1e-4, to: 1.5e-3 };
const within = (l: { x: number; y: number; width: number; size: number }) => {
  expect(l.x).toBeGreaterThanOrEqual(frame.plotLeft);
  expect(l.x + l.width).toBeLessThanOrEqual(frame.plotLeft + frame.plotWidth);
  expect(l.y).toBeGreaterThanOrEqual(frame.top);
  expect(l.y + l.size).toBeLessThanOrEqual(frame.top + frame.height);
};
const trace = (over: Partial<ReportTrace>): ReportTrace => ({
  gateLabel: 'A', channel: 'Gate A', positionM: 0, window: null, thresholdV: 2.5, pulses: [], note: null, ...over,
});

describe('shot report: labels stay inside the plot frame', () => {
  it('pulse labels at the very ends of the span, before it and after it, a long note and dips at either edge all stay inside', () => {
    const cases: ReportTrace[] = [];
    for (const start of [frame.from - 5e-4, frame.from, frame.from + 1e-6, 0.7e-3, frame.to - 1e-6, frame.to, frame.to + 1e-3]) {
      cases.push(trace({ pulses: [{ start, end: start + 1.3e-4, width: 1.3e-4 }] }));
      cases.push(trace({ pulses: [{ start: start - 1.3e-4, end: start, width: 1.3e-4 }] }));
      cases.push(trace({
        pulses: [], thresholdV: null, note: `missed: ${'no transition through the threshold; '.repeat(6)}`,
        dip: { start, end: start + 1.3e-4, level: 3.05, label: 'dip 1.4999–1.6299 ms · 1.75 V deep (38 % of the step)' },
      }));
    }
    for (const t of cases) {
      const labels = layoutTraceLabels(t, frame, measure);
      expect(labels.length).toBeGreaterThan(0);
      labels.forEach(within);
    }
  });

  it('a note too long for the frame is shortened with an ellipsis, not run past it', () => {
    const [note] = layoutTraceLabels(trace({ note: 'x'.repeat(500) }), frame, measure);
    expect(note.text.endsWith('…')).toBe(true);
    expect(note.text.length).toBeLessThan(500);
  });

  it('the time axis has round 1-2-5 ticks in µs for a 1.6 ms span, and every tick label inside the frame width', () => {
    const axis = layoutTimeAxis(frame, 400, measure);
    expect(axis.title).toBe('time (µs)');
    expect(axis.labels.map((l) => l.text)).toEqual(['0', '200', '400', '600', '800', '1000', '1200', '1400']);
    for (const l of axis.labels) {
      expect(l.x).toBeGreaterThanOrEqual(frame.plotLeft);
      expect(l.x + l.width).toBeLessThanOrEqual(frame.plotLeft + frame.plotWidth);
    }
    // Labels that start at the frame's ends: the first and last are pushed in, not cut.
    const edge = layoutTimeAxis({ ...frame, from: 0, to: 1e-3 }, 400, measure);
    expect(edge.labels[0].text).toBe('0');
    expect(edge.labels[0].x).toBe(frame.plotLeft);
    expect(edge.labels.at(-1)!.text).toBe('1000');
    expect(edge.labels.at(-1)!.x + edge.labels.at(-1)!.width).toBeCloseTo(frame.plotLeft + frame.plotWidth, 9);
  });

  it('trace titles do not name a gate twice', () => {
    expect(traceTitle({ gateLabel: 'A', channel: 'Gate A', positionM: 0 })).toBe('Gate A · 0.0 mm');
    expect(traceTitle({ gateLabel: 'B', channel: 'CH2', positionM: 0.15 })).toBe('Gate B · CH2 · 150.0 mm');
  });
});
