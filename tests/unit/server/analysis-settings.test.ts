import { describe, expect, it } from 'vitest';
import { analysisSettingsSchema, applySettings, batchRequestBody } from '../../../shared/contracts/analysis-settings.ts';
import { analysisOptionsSchema } from '../../../shared/contracts/analysis.ts';

describe('applySettings', () => {
  it('When settings name a threshold and edges, then those replace the shot’s and its projectile and gates stay', () => {
    const shot = { gates: [{ channel: 'A', position: 0 }, { channel: 'B', position: 0.1 }], projectile: { length: 0.04 }, threshold: { unit: 'percent' as const, level: 50, hysteresis: 40 } };
    const out = applySettings(shot, { threshold: { unit: 'percent', level: 40, hysteresis: 30 }, edges: 'leading' });
    expect(out).toEqual({ ...shot, threshold: { unit: 'percent', level: 40, hysteresis: 30 }, edges: 'leading' });
    expect(analysisOptionsSchema.parse(out).threshold).toEqual({ unit: 'percent', level: 40, hysteresis: 30 });
  });

  it('When smoothing is set to null, then the shot’s smoothing is switched off (null is a setting, undefined is not)', () => {
    expect(applySettings({ smoothing: { windowSize: 11, polynomial: 2 } }, { smoothing: null })).toEqual({ smoothing: null });
    expect(applySettings({ smoothing: { windowSize: 11, polynomial: 2 } }, {})).toEqual({ smoothing: { windowSize: 11, polynomial: 2 } });
  });
});

describe('settings and batch requests', () => {
  it('When a setting is not one a campaign may keep, then it is refused by name', () => {
    const r = analysisSettingsSchema.safeParse({ projectile: { length: 0.04 } });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0].message).toMatch(/projectile/);
  });

  it('When a batch names neither shots nor all, or both, or no setting, then it is refused with the reason', () => {
    const message = (body: unknown) => batchRequestBody.safeParse(body).error?.issues.map((i) => i.message).join('; ');
    expect(message({ settings: { edges: 'leading' } })).toMatch(/choose the shots with shotIds, or send "all": true/);
    expect(message({ settings: { edges: 'leading' }, all: true, shotIds: ['0b6f1e57-5a6e-4c39-9d62-4a4a4f0e9d10'] })).toMatch(/not both/);
    expect(message({ settings: {}, all: true })).toMatch(/at least one setting/);
    expect(batchRequestBody.safeParse({ settings: { polarity: 'falling' }, all: true }).success).toBe(true);
  });
});
