import type { AnalysisOptions, AnalysisOptionsInput } from '../../../../shared/contracts/analysis.ts';

/**
 * The analyst panel's fields, in the units people type (mm, g, °C, µs-free percentages and volts); converted to
 * the engine's SI parameter set at the edge.
 */
export interface ParametersForm {
  thresholdMode: 'auto' | 'percent' | 'volts';
  level: string;
  hysteresis: string;
  polarity: 'auto' | 'falling' | 'rising';
  edges: 'both' | 'leading' | 'trailing';
  smoothing: boolean;
  smoothingWindow: string;
  smoothingOrder: string;
  levelsMethod: 'mode' | 'mean';
  gates: { channel: string; positionMm: string }[];
  positionToleranceMm: string;
  lengthMm: string;
  lengthToleranceMm: string;
  massG: string;
  massToleranceG: string;
  temperatureC: string;
  timebasePpm: string;
  monteCarlo: boolean;
}

const num = (s: string) => (s.trim() === '' ? undefined : Number(s.replace(',', '.')));
const str = (n: number | undefined | null, scale = 1, digits = 6) => (n == null ? '' : String(Number((n * scale).toPrecision(digits))));

export function formFromParameters(p: AnalysisOptions): ParametersForm {
  const auto = p.threshold.unit === 'percent' && p.threshold.level === 50 && p.threshold.hysteresis === 40;
  return {
    thresholdMode: auto ? 'auto' : p.threshold.unit,
    level: String(p.threshold.level),
    hysteresis: String(p.threshold.hysteresis),
    polarity: p.polarity,
    edges: p.edges ?? 'both',
    smoothing: p.smoothing != null,
    smoothingWindow: String(p.smoothing?.windowSize ?? 11),
    smoothingOrder: String(p.smoothing?.polynomial ?? 2),
    levelsMethod: p.levels.method,
    gates: (p.gates ?? []).map((g) => ({ channel: g.channel, positionMm: str(g.position, 1000) })),
    positionToleranceMm: str(p.positionTolerance, 1000),
    lengthMm: str(p.projectile.length, 1000),
    lengthToleranceMm: str(p.projectile.lengthTolerance, 1000),
    massG: str(p.projectile.mass, 1000),
    massToleranceG: str(p.projectile.massTolerance, 1000),
    temperatureC: p.ambient.temperature == null ? '' : String(Number((p.ambient.temperature - 273.15).toFixed(2))),
    timebasePpm: String(p.timebaseAccuracyPpm),
    monteCarlo: p.monteCarloDraws > 0,
  };
}

/** Builds the engine's parameters; starts from the version being edited so settings the panel does not show are kept. */
export function parametersFromForm(f: ParametersForm, base: AnalysisOptions): AnalysisOptionsInput {
  const mm = (s: string) => (num(s) === undefined ? undefined : num(s)! / 1000);
  const g = (s: string) => (num(s) === undefined ? undefined : num(s)! / 1000);
  const temperature = num(f.temperatureC);
  return {
    ...base,
    threshold:
      f.thresholdMode === 'auto'
        ? { unit: 'percent', level: 50, hysteresis: 40 }
        : { unit: f.thresholdMode, level: num(f.level) ?? 50, hysteresis: num(f.hysteresis) ?? 0 },
    polarity: f.polarity,
    edges: f.edges,
    smoothing: f.smoothing ? { windowSize: num(f.smoothingWindow) ?? 11, polynomial: num(f.smoothingOrder) ?? 2 } : null,
    levels: { ...base.levels, method: f.levelsMethod },
    gates: f.gates.length > 0 ? f.gates.map((x) => ({ channel: x.channel, position: mm(x.positionMm) ?? 0 })) : undefined,
    positionTolerance: mm(f.positionToleranceMm) ?? 0,
    projectile: {
      length: mm(f.lengthMm),
      lengthTolerance: mm(f.lengthToleranceMm) ?? 0,
      mass: g(f.massG),
      massTolerance: g(f.massToleranceG) ?? 0,
    },
    ambient: { ...base.ambient, temperature: temperature === undefined ? undefined : temperature + 273.15 },
    timebaseAccuracyPpm: num(f.timebasePpm) ?? 0,
    monteCarloDraws: f.monteCarlo ? 200_000 : 0,
  };
}
