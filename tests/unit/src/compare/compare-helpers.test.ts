// The compare view's two pure helpers: where each shot's traces are pinned (alignmentOf) and which analysis
// parameters differ between shots (parameterDifferences). Inputs are small hand-written results; the expected values
// are read off them by hand (the entry crossing of a gate is its first pulse's start).
import { describe, expect, it } from 'vitest';
import type { ShotAnalysis } from '../../../../shared/analysis/types.ts';
import { alignmentOf } from '../../../../src/features/compare/lib/alignment.ts';
import { parameterDifferences } from '../../../../src/features/compare/lib/parameter-differences.ts';

type GateLike = { position: number; status: 'ok' | 'missed'; pulses: { start: number; end: number }[] };
const results = (gates: GateLike[]) => ({ gates }) as unknown as ShotAnalysis;

// Gates listed out of order on purpose: B at 0.1 m fired first in time only if the rig is listed backwards.
const threeGates = results([
  { position: 0.2, status: 'ok', pulses: [{ start: 0.00131, end: 0.00144 }] },
  { position: 0, status: 'ok', pulses: [{ start: 0.00066, end: 0.00079 }, { start: 0.004, end: 0.0041 }] },
  { position: 0.1, status: 'missed', pulses: [] },
]);

describe('alignmentOf', () => {
  it('When aligned at the first gate, then the earliest entry crossing of any fired gate is t = 0, whatever the order of the list', () => {
    expect(alignmentOf(threeGates, 'first')).toEqual({ instant: 0.00066, position: 0, fallback: false });
  });

  it('When aligned at a chosen gate that fired, then its first pulse start is t = 0 (a later second pulse is not used)', () => {
    expect(alignmentOf(threeGates, 0.2)).toEqual({ instant: 0.00131, position: 0.2, fallback: false });
    expect(alignmentOf(threeGates, 0)).toEqual({ instant: 0.00066, position: 0, fallback: false });
  });

  it('When the chosen gate missed on this shot, then the first gate stands in and the fallback is flagged', () => {
    expect(alignmentOf(threeGates, 0.1)).toEqual({ instant: 0.00066, position: 0, fallback: true });
    expect(alignmentOf(threeGates, 0.35)).toEqual({ instant: 0.00066, position: 0, fallback: true });
  });

  it('When a position differs from the gate by float noise (0.1 + 0.2 vs 0.3), then it still matches that gate', () => {
    const r = results([{ position: 0.3, status: 'ok', pulses: [{ start: 2e-3, end: 2.1e-3 }] }, { position: 0, status: 'ok', pulses: [{ start: 1e-3, end: 1.1e-3 }] }]);
    expect(alignmentOf(r, 0.1 + 0.2)).toEqual({ instant: 2e-3, position: 0.3, fallback: false });
  });

  it('When no gate fired or there is no analysis, then nothing moves (t = 0 stays) and no position is claimed', () => {
    expect(alignmentOf(results([{ position: 0, status: 'missed', pulses: [] }]), 'first')).toEqual({ instant: 0, position: null, fallback: false });
    expect(alignmentOf(null, 'first')).toEqual({ instant: 0, position: null, fallback: false });
    expect(alignmentOf(null, 0.1)).toEqual({ instant: 0, position: null, fallback: true });
  });
});

describe('parameterDifferences', () => {
  const a = { threshold: { unit: 'percent', level: 50, hysteresis: 10 }, smoothing: null, gates: [{ channel: 'CH1', position: 0 }, { channel: 'CH2', position: 0.1 }] };
  const b = { threshold: { unit: 'percent', level: 45, hysteresis: 10 }, smoothing: null, gates: [{ channel: 'CH1', position: 0 }, { channel: 'CH2', position: 0.15 }] };

  it('When two shots differ in the threshold level and one gate position, then exactly those rows are marked as differing', () => {
    const rows = parameterDifferences([a, b]);
    expect(rows.filter((r) => r.differs).map((r) => r.path)).toEqual(['gates[1].position', 'threshold.level']);
    expect(rows.find((r) => r.path === 'threshold.level')!.values).toEqual(['50', '45']);
    expect(rows.find((r) => r.path === 'threshold.hysteresis')).toEqual({ path: 'threshold.hysteresis', label: 'Hysteresis ±', values: ['10', '10'], shown: ['10 %', '10 %'], differs: false });
    expect(rows.find((r) => r.path === 'smoothing')).toEqual({ path: 'smoothing', label: 'Savitzky–Golay smoothing', values: ['null', 'null'], shown: ['off (the raw trace)', 'off (the raw trace)'], differs: false });
    // In the analyst panel's words and units (metres shown as millimetres).
    expect(rows.find((r) => r.path === 'gates[1].position')).toMatchObject({ label: 'Gate 2 position', shown: ['100 mm', '150 mm'] });
  });

  it('When rows are listed, then each path appears once and in sorted order, so the table reads the same every time', () => {
    const paths = parameterDifferences([a, b, a]).map((r) => r.path);
    expect(paths).toEqual([...paths].sort());
    expect(new Set(paths).size).toBe(paths.length);
    expect(paths).toEqual(['gates[0].channel', 'gates[0].position', 'gates[1].channel', 'gates[1].position', 'smoothing', 'threshold.hysteresis', 'threshold.level', 'threshold.unit']);
  });

  it('When one shot has a setting the other lacks (a third gate, no analysis at all), then the gap shows as "—" and differs', () => {
    const c = { ...a, gates: [...a.gates, { channel: 'CH3', position: 0.2 }] };
    const rows = parameterDifferences([a, c, null]);
    expect(rows.find((r) => r.path === 'gates[2].channel')).toEqual({ path: 'gates[2].channel', label: 'Gate 3 channel', values: ['—', '"CH3"', '—'], shown: ['—', 'CH3', '—'], differs: true });
    expect(rows.find((r) => r.path === 'threshold.unit')!.values).toEqual(['"percent"', '"percent"', '—']);
    expect(rows.every((r) => r.differs)).toBe(true);
  });

  it('When a value is an empty list or object, then it still gets a row, so "no gates" differs from "two gates"', () => {
    const rows = parameterDifferences([{ gates: [] }, { gates: [{ channel: 'CH1' }] }]);
    expect(rows).toEqual([
      { path: 'gates', label: 'Gates', values: ['[]', '—'], shown: ['[]', '—'], differs: true },
      { path: 'gates[0].channel', label: 'Gate 1 channel', values: ['—', '"CH1"'], shown: ['—', 'CH1'], differs: true },
    ]);
  });
});
