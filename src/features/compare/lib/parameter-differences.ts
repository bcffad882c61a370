import { labelParameter } from '../../../../shared/contracts/analysis-labels.ts';

/** One analysis parameter across the compared shots. */
export interface ParameterRow {
  /** Dotted path into the parameters ("threshold.level", "gates[1].position"). */
  path: string;
  /** The value per shot as stored, as text ("—" when the shot's analysis does not have it). */
  values: string[];
  /** The parameter as the analyst panel names it ("Threshold level"). */
  label: string;
  /** The value per shot in words and units ("50 %", "150 mm"). */
  shown: string[];
  /** True when not every shot has the same value. */
  differs: boolean;
}

function flatten(value: unknown, path: string, out: Map<string, string>, rawOut: Map<string, unknown>) {
  if (value !== null && typeof value === 'object') {
    const entries = Array.isArray(value) ? value.map((v, i) => [`[${i}]`, v] as const) : Object.entries(value).map(([k, v]) => [path ? `.${k}` : k, v] as const);
    if (entries.length === 0) out.set(path, Array.isArray(value) ? '[]' : '{}');
    for (const [key, v] of entries) flatten(v, `${path}${key}`, out, rawOut);
    return;
  }
  out.set(path, value === undefined ? '—' : JSON.stringify(value));
  rawOut.set(path, value);
}

/**
 * Lines the analysis parameters of several shots up path by path, so a reviewer sees at once which settings
 * differ (a threshold, a smoothing window, a gate position). A missing analysis counts as having no parameters.
 */
export function parameterDifferences(parameters: (Record<string, unknown> | null)[]): ParameterRow[] {
  const rawValues = parameters.map(() => new Map<string, unknown>());
  const flat = parameters.map((p, i) => {
    const m = new Map<string, string>();
    if (p) flatten(p, '', m, rawValues[i]);
    return m;
  });
  const unitOf = (p: Record<string, unknown> | null) => ((p?.threshold as { unit?: string } | undefined)?.unit === 'volts' ? 'volts' : 'percent');
  const paths = [...new Set(flat.flatMap((m) => [...m.keys()]))].sort();
  return paths.map((path) => {
    const values = flat.map((m) => m.get(path) ?? '—');
    const shown = parameters.map((p, i) => (rawValues[i].has(path) ? labelParameter(path, { thresholdUnit: unitOf(p) }).format(rawValues[i].get(path)) : values[i]));
    return { path, label: labelParameter(path).label, values, shown, differs: values.some((v) => v !== values[0]) };
  });
}
