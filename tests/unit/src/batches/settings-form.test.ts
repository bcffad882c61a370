import { describe, expect, it } from 'vitest';
import { analysisSettingsSchema } from '../../../../shared/contracts/analysis-settings.ts';
import { describeSettings, EMPTY_SETTINGS_FORM, formFromSettings, settingsFromForm } from '../../../../src/features/batches/lib/settings-form.ts';

describe('settings form', () => {
  it('When everything is left as each shot has it, then the settings are empty', () => {
    expect(settingsFromForm(EMPTY_SETTINGS_FORM)).toEqual({});
  });

  it('When a person types a threshold, edges, smoothing and gates in mm, then the settings are in SI and round-trip', () => {
    const form = { ...EMPTY_SETTINGS_FORM, threshold: 'percent' as const, level: '40', hysteresis: '30', edges: 'leading' as const, smoothing: 'on' as const, smoothingWindow: '9', smoothingOrder: '2', gates: [{ channel: 'Gate A', positionMm: '0' }, { channel: 'Gate B', positionMm: '150,5' }] };
    const settings = settingsFromForm(form);
    expect(settings).toEqual({ threshold: { unit: 'percent', level: 40, hysteresis: 30 }, edges: 'leading', smoothing: { windowSize: 9, polynomial: 2 }, gates: [{ channel: 'Gate A', position: 0 }, { channel: 'Gate B', position: 0.1505 }] });
    expect(analysisSettingsSchema.safeParse(settings).success).toBe(true);
    expect(settingsFromForm(formFromSettings(settings))).toEqual(settings);
    expect(describeSettings(settings)).toBe('threshold 40 % ± 30 %, leading edges, smoothing 9 points, order 2, gates Gate A at 0 mm, Gate B at 150.5 mm');
  });

  it('When a field is left empty, then the schema refuses it instead of a silent default', () => {
    const settings = settingsFromForm({ ...EMPTY_SETTINGS_FORM, threshold: 'volts', level: '', hysteresis: '0.2' });
    const r = analysisSettingsSchema.safeParse(settings);
    expect(r.success).toBe(false);
    expect(r.error!.issues[0].path).toEqual(['threshold', 'level']);
  });
});
