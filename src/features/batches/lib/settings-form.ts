import type { AnalysisSettings } from '../../../../shared/contracts/analysis-settings.ts';

/**
 * The batch form's fields, as people type them (percent or volts, mm); "keep" leaves each shot's own value alone.
 * Converted to the API's settings object (SI) at the edge.
 */
export interface SettingsForm {
  threshold: 'keep' | 'auto' | 'percent' | 'volts';
  level: string;
  hysteresis: string;
  polarity: 'keep' | 'auto' | 'falling' | 'rising';
  edges: 'keep' | 'both' | 'leading' | 'trailing';
  smoothing: 'keep' | 'off' | 'on';
  smoothingWindow: string;
  smoothingOrder: string;
  /** Empty: keep each shot's gate mapping. */
  gates: { channel: string; positionMm: string }[];
}

export const EMPTY_SETTINGS_FORM: SettingsForm = {
  threshold: 'keep', level: '50', hysteresis: '40', polarity: 'keep', edges: 'keep', smoothing: 'keep', smoothingWindow: '11', smoothingOrder: '2', gates: [],
};

const num = (s: string) => (s.trim() === '' ? Number.NaN : Number(s.trim().replace(',', '.')));

export function settingsFromForm(f: SettingsForm): AnalysisSettings {
  const out: AnalysisSettings = {};
  if (f.threshold === 'auto') out.threshold = { unit: 'percent', level: 50, hysteresis: 40 };
  else if (f.threshold !== 'keep') out.threshold = { unit: f.threshold, level: num(f.level), hysteresis: num(f.hysteresis) };
  if (f.polarity !== 'keep') out.polarity = f.polarity;
  if (f.edges !== 'keep') out.edges = f.edges;
  if (f.smoothing === 'off') out.smoothing = null;
  else if (f.smoothing === 'on') out.smoothing = { windowSize: num(f.smoothingWindow), polynomial: num(f.smoothingOrder) };
  if (f.gates.length > 0) out.gates = f.gates.map((g) => ({ channel: g.channel.trim(), position: num(g.positionMm) / 1000 }));
  return out;
}

export function formFromSettings(s: AnalysisSettings | null | undefined): SettingsForm {
  if (!s) return EMPTY_SETTINGS_FORM;
  const t = s.threshold;
  const auto = t && t.unit === 'percent' && t.level === 50 && t.hysteresis === 40;
  return {
    threshold: !t ? 'keep' : auto ? 'auto' : (t.unit ?? 'percent'),
    level: String(t?.level ?? 50),
    hysteresis: String(t?.hysteresis ?? 40),
    polarity: s.polarity ?? 'keep',
    edges: s.edges ?? 'keep',
    smoothing: s.smoothing === undefined ? 'keep' : s.smoothing === null ? 'off' : 'on',
    smoothingWindow: String(s.smoothing?.windowSize ?? 11),
    smoothingOrder: String(s.smoothing?.polynomial ?? 2),
    gates: (s.gates ?? []).map((g) => ({ channel: g.channel, positionMm: String(Number((g.position * 1000).toPrecision(6))) })),
  };
}

/** The settings in a few words, for lists and headings: "threshold 40 % ± 30 %, leading edges". */
export function describeSettings(s: AnalysisSettings): string {
  const parts: string[] = [];
  if (s.threshold) {
    const u = s.threshold.unit === 'volts' ? ' V' : ' %';
    parts.push(`threshold ${s.threshold.level}${u} ± ${s.threshold.hysteresis}${u}`);
  }
  if (s.polarity) parts.push(s.polarity === 'auto' ? 'polarity detected' : `beam-break pulls ${s.polarity === 'falling' ? 'low' : 'high'}`);
  if (s.edges) parts.push(s.edges === 'both' ? 'both edges' : `${s.edges} edges`);
  if (s.smoothing === null) parts.push('no smoothing');
  else if (s.smoothing) parts.push(`smoothing ${s.smoothing.windowSize} points, order ${s.smoothing.polynomial}`);
  if (s.gates) parts.push(`gates ${s.gates.map((g) => `${g.channel} at ${Number((g.position * 1000).toPrecision(6))} mm`).join(', ')}`);
  return parts.join(', ') || 'no change';
}
