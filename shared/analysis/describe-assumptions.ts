import type { AnalysisAssumptions } from './types.ts';

/** One stated assumption: what it is about and what was assumed, in words. */
export interface AssumptionLine {
  label: string;
  text: string;
}

const num = (x: number, digits = 4): string => String(Number(x.toPrecision(digits)));
const mm = (m: number): string => `${num(m * 1e3)} mm`;
function seconds(t: number): string {
  if (t >= 1) return `${num(t)} s`;
  if (t >= 1e-3) return `${num(t * 1e3)} ms`;
  if (t >= 1e-6) return `${num(t * 1e6)} µs`;
  return `${num(t * 1e9)} ns`;
}
const EDGES = {
  both: 'pulse mid-times (leading and trailing edges averaged)',
  leading: 'leading edges only',
  trailing: 'trailing edges only',
} as const;
const HOW = {
  'time-column': 'read from the time column',
  metadata: 'built from the start and interval the file states',
  rebuilt: 'rebuilt from the interval the file states (the printed times were too coarse)',
  given: 'given by the user',
} as const;

/**
 * The assumptions behind a result as lines of text, the same on the shot page, in the report and in the CLI:
 * gate-position tolerance, time-base accuracy, projectile length and tolerance, threshold, hysteresis, edges,
 * the sample interval and where it came from, and whether the values are volts. Only Latin-1 and General
 * Punctuation characters, so the PDF's embedded font can print them.
 */
export function describeAssumptions(a: AnalysisAssumptions): AssumptionLine[] {
  const t = a.threshold;
  const unit = t.unit === 'percent' ? ' % of each channel’s step' : ' V';
  const lines: AssumptionLine[] = [
    { label: 'Gate positions', text: `± ${mm(a.positionTolerance)} each (rectangular)` },
    { label: 'Time-base accuracy', text: `± ${num(a.timebaseAccuracyPpm)} ppm (rectangular)` },
    {
      label: 'Projectile length',
      text: a.projectile.length === null
        ? 'not given (no occlusion speed or length check)'
        : `${mm(a.projectile.length)} ± ${mm(a.projectile.lengthTolerance)} (rectangular)`,
    },
    { label: 'Threshold', text: `${num(t.level)}${unit}, hysteresis ± ${num(t.hysteresis)}${t.unit === 'percent' ? ' %' : ' V'}` },
    { label: 'Edges', text: EDGES[a.edges] },
  ];
  const origin = a.timeBase;
  lines.push({
    label: 'Sample interval',
    text: origin === null
      ? seconds(a.sampleInterval)
      : `${seconds(a.sampleInterval)}, ${HOW[origin.how]}${origin.source ? ` (${origin.source})` : ''}${origin.assumed ? '; partly assumed' : ''}`,
  });
  lines.push({
    label: 'Values',
    text: a.values === 'codes' ? 'raw converter codes, not volts (levels are in codes; timing does not need volts)' : 'volts (or the unit the file states)',
  });
  return lines;
}
