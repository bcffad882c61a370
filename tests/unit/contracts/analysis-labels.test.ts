// Analysis parameters and results in the lab's words and units (shared/contracts/analysis-labels.ts). Expected
// wording follows the analyst panel; conversions are exact SI prefixes and 0 °C = 273.15 K (SI Brochure, 9th ed.).
import { describe, expect, it } from 'vitest';
import { budgetChanges, labelParameter, labelResult } from '../../../shared/contracts/analysis-labels.ts';

const say = (l: { label: string; format: (v: unknown) => string }, from: unknown, to: unknown) => `${l.label}: ${l.format(from)} → ${l.format(to)}`;

describe('labelParameter', () => {
  it('When settings change, then each reads as the panel names it, with its unit', () => {
    expect(say(labelParameter('threshold.level'), 50, 30)).toBe('Threshold level: 50 % → 30 %');
    expect(say(labelParameter('threshold.level', { thresholdUnit: 'volts' }), 2.5, 2)).toBe('Threshold level: 2.5 V → 2 V');
    expect(say(labelParameter('gates[1].position'), 0.15, 0.1)).toBe('Gate 2 position: 150 mm → 100 mm');
    expect(say(labelParameter('projectile.mass'), 0.0027, 0.00275)).toBe('Mass: 2.7 g → 2.75 g');
    expect(say(labelParameter('ambient.temperature'), 293.15, 294.65)).toBe('Ambient temperature: 20 °C → 21.5 °C');
    expect(say(labelParameter('levels.trimFraction'), 0.01, 0)).toBe('Outlying samples set aside at each end: 1 % → 0 %');
    expect(say(labelParameter('smoothing'), null, { windowSize: 11, polynomial: 2 })).toBe('Savitzky–Golay smoothing: off (the raw trace) → window 11 samples, order 2');
    expect(say(labelParameter('monteCarloDraws'), 0, 200000)).toBe('Monte Carlo check: off → 200000 draws');
  });

  it('When a gate pair or an occlusion result changes, then its uncertainty reads to two significant digits (GUM JCGM 100:2008 §7.2.6) and its speed to six', () => {
    expect(say(labelResult('flight[0].uncertainty'), 0.717514, 1.2849)).toBe('Gate pair 1: uncertainty: 0.72 m/s → 1.3 m/s');
    expect(say(labelResult('occlusion[1].uncertainty'), 2.4517, 2.4499)).toBe('Occlusion 2: uncertainty: 2.5 m/s → 2.4 m/s');
    expect(say(labelResult('flight[0].speed'), 312.0217, 468.03)).toBe('Gate pair 1: speed: 312.022 m/s → 468.03 m/s');
  });

  it('When a path has no rule, then it is shown as it is stored, never blank', () => {
    expect(say(labelParameter('somethingNew.inFuture'), 1, 2)).toBe('somethingNew.inFuture: 1 → 2');
  });

  it('When settings are grouped, then gates apart from the other settings', () => {
    expect(labelParameter('gates[0].channel').group).toBe('Gates');
    expect(labelParameter('threshold.hysteresis').group).toBe('Settings');
  });
});

describe('labelResult', () => {
  it('When results change, then speed, budget and crossings read in words and units, grouped', () => {
    expect(say(labelResult('speed.value'), 287.3, 290.4)).toBe('Speed: 287.3 m/s → 290.4 m/s');
    expect(labelResult('speed.budget[0].share')).toMatchObject({ group: 'Budget', label: 'Budget line 1: share of variance' });
    expect(labelResult('speed.budget[0].share').format(0.255)).toBe('25.5 %');
    expect(labelResult('gates[2].pulses[0].start')).toMatchObject({ group: 'Gates', label: 'Gate 3, pulse 1: entry' });
    expect(labelResult('gates[2].pulses[0].start').format(0.000123456)).toBe('123.456 µs');
    expect(labelResult('derived.mach.value')).toMatchObject({ group: 'Result', label: 'Mach number' });
  });
});

describe('budgetChanges', () => {
  it('When the budget changes, then each row is named by its source as the result panel names it, matched by source not position', () => {
    const from = [
      { group: 'gate positions', contribution: 0.817, share: 0.9 },
      { group: 'time-base accuracy', contribution: 0.0087, share: 0.1 },
    ];
    // Same sources in another order, one changed, one new.
    const to = [
      { group: 'time-base accuracy', contribution: 0.0087, share: 0.1 },
      { group: 'gate positions', contribution: 0.9, share: 0.85 },
      { group: 'noise jitter', contribution: 0.0049, share: 0.05 },
    ];
    const rows = budgetChanges(from, to);
    expect(rows).toEqual([
      { label: 'Gate positions', from: '0.817 m/s (90 % of the variance)', to: '0.9 m/s (85 % of the variance)' },
      { label: 'Noise jitter', from: 'not in the budget', to: '0.0049 m/s (5 % of the variance)' },
    ]);
    // A change below the digits shown is not a change.
    expect(budgetChanges(from, [{ ...from[0], contribution: 0.81700001 }, from[1]])).toEqual([]);
    expect(rows.some((r) => /Budget line/.test(r.label))).toBe(false);
    expect(budgetChanges(from, from)).toEqual([]);
    expect(budgetChanges(null, null)).toEqual([]);
  });
});
