// The version diff lists a change where it shows in the digits displayed (issue 11 review: "Fit: speed uncertainty
// 1.28 m/s → 1.28 m/s" was listed as changed); the rest are counted and shown with the raw values.
import { describe, expect, it } from 'vitest';
import { splitShownChanges } from '../../../src/features/shots/components/version-history.tsx';

describe('splitShownChanges', () => {
  it('When a value changed only beyond the digits shown, then it is set apart from the visible changes', () => {
    const rows = [
      { label: 'Threshold level', from: '50 %', to: '35 %' },
      { label: 'Fit: speed uncertainty', from: '1.28 m/s', to: '1.28 m/s' },
      { label: 'Fit: speed at the first gate', from: '133.256 m/s', to: '133.261 m/s' },
    ];
    const { shown, beyondDigits } = splitShownChanges(rows);
    expect(shown.map((r) => r.label)).toEqual(['Threshold level', 'Fit: speed at the first gate']);
    expect(beyondDigits.map((r) => r.label)).toEqual(['Fit: speed uncertainty']);
  });
});
