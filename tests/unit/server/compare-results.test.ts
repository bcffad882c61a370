import { describe, expect, it } from 'vitest';
import { compareOutcomes, gateName, outcomeOf } from '../../../server/modules/batches/compare-results.ts';

const result = (value: number, uncertainty: number, basis: string, gates: [string, number, 'ok' | 'missed'][]) => ({
  speed: { value, uncertainty, method: basis === 'occlusion' ? 'occlusion' : 'flight', basis },
  gates: gates.map(([channel, position, status]) => ({ channel, position, status, pulses: [] })),
  warnings: [],
});

describe('compareOutcomes', () => {
  it('When the speed moves by half of the earlier U, then the change is +0.5 U and nothing else changed', () => {
    const before = outcomeOf(result(300, 2, 'fit', [['A', 0, 'ok'], ['B', 0.15, 'ok'], ['C', 0.3, 'ok']]));
    const after = outcomeOf(result(301, 1.5, 'fit', [['A', 0, 'ok'], ['B', 0.15, 'ok'], ['C', 0.3, 'ok']]));
    expect(compareOutcomes(before, after)).toEqual({ delta: 1, deltaInU: 0.5, methodChanged: false, gatesGained: [], gatesLost: [] });
  });

  it('When a lower threshold brings back a missed gate, then the gate is gained and the method goes from a pair to a fit', () => {
    const before = outcomeOf(result(290, 1.6, 'pair', [['A', 0, 'ok'], ['B', 0.15, 'ok'], ['C', 0.3, 'missed']]));
    const after = outcomeOf(result(290.4, 2.9, 'fit', [['A', 0, 'ok'], ['B', 0.15, 'ok'], ['C', 0.3, 'ok']]));
    const change = compareOutcomes(before, after);
    expect(change).toMatchObject({ methodChanged: true, gatesGained: ['gate at 300 mm (C)'], gatesLost: [] });
    expect(change.deltaInU).toBeCloseTo(0.4 / 1.6, 12);
  });

  it('When the new version has no speed, then there is no change in U but the method changed', () => {
    const before = outcomeOf(result(290, 1.6, 'pair', [['A', 0, 'ok'], ['B', 0.1, 'ok']]));
    const after = outcomeOf({ speed: null, gates: [{ channel: 'A', position: 0, status: 'missed' }, { channel: 'B', position: 0.1, status: 'missed' }], warnings: [] });
    expect(compareOutcomes(before, after)).toEqual({ delta: null, deltaInU: null, methodChanged: true, gatesGained: [], gatesLost: ['gate at 0 mm (A)', 'gate at 100 mm (B)'] });
  });

  it('When results are missing or malformed, then the outcome is empty rather than a wrong number', () => {
    expect(outcomeOf(null)).toEqual({ speed: null, gates: [], warnings: [] });
    expect(outcomeOf({ speed: { value: 'fast', uncertainty: 1 }, gates: [{ channel: 3 }] })).toEqual({ speed: null, gates: [], warnings: [] });
    expect(gateName({ channel: 'CH2', position: 0.1505 })).toBe('gate at 150.5 mm (CH2)');
  });
});
