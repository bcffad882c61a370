/**
 * Analysis parameters and results in the lab's own words and units, the way the analyst panel names them:
 * "Threshold level: 50 % → 30 %", "Gate 2 position: 150 mm". One table serves the version diff, the compare page
 * and the PDF report, so a setting has one name everywhere. Values stay SI in storage; these only format them.
 */

export type LabelGroup = 'Settings' | 'Gates' | 'Result' | 'Budget';

export interface LabelledPath {
  group: LabelGroup;
  label: string;
  /** The value as a person reads it, with its unit. */
  format: (value: unknown) => string;
}

/** Context a value's wording depends on: percent or volt thresholds. */
export interface LabelContext {
  thresholdUnit?: 'percent' | 'volts';
}

const num = (x: unknown, digits = 4) => (typeof x === 'number' && Number.isFinite(x) ? String(Number(x.toPrecision(digits))) : raw(x));
/** Any value as plain text, for what no rule names (never a silent blank). */
export function raw(x: unknown): string {
  if (x === undefined) return '—';
  if (x === null) return 'none';
  if (typeof x === 'number') return String(Number(x.toPrecision(8)));
  if (typeof x === 'string') return x;
  return JSON.stringify(x);
}
const unit = (u: string, scale = 1, digits = 4) => (x: unknown) => (typeof x === 'number' ? `${num(x * scale, digits)} ${u}` : raw(x));
const words = (map: Record<string, string>) => (x: unknown) => (typeof x === 'string' ? map[x] ?? x : raw(x));
const mm = unit('mm', 1000);
const us = unit('µs', 1e6, 6);
const percentOf = (x: unknown) => (typeof x === 'number' ? `${num(x * 100, 3)} %` : raw(x));
const gateSpec = (x: unknown) => {
  const g = x as { channel?: string; position?: number } | null;
  return g && typeof g === 'object' ? `${g.channel ?? '?'} at ${mm(g.position)}` : raw(x);
};
const smoothing = (x: unknown) => {
  const s = x as { windowSize?: number; polynomial?: number } | null;
  return s && typeof s === 'object' ? `window ${s.windowSize} samples, order ${s.polynomial}` : 'off (the raw trace)';
};

type Rule = [RegExp, (m: RegExpMatchArray, ctx: LabelContext) => Omit<LabelledPath, 'group'> & { group?: LabelGroup }];

const thresholdValue = (ctx: LabelContext) => (ctx.thresholdUnit === 'volts' ? unit('V') : unit('%', 1, 4));
const nth = (m: RegExpMatchArray, i = 1) => Number(m[i]) + 1;

const PARAMETER_RULES: Rule[] = [
  [/^threshold\.unit$/, () => ({ label: 'Threshold mode', format: words({ percent: '% of the step', volts: 'fixed volts' }) })],
  [/^threshold\.level$/, (_m, c) => ({ label: 'Threshold level', format: thresholdValue(c) })],
  [/^threshold\.hysteresis$/, (_m, c) => ({ label: 'Hysteresis ±', format: thresholdValue(c) })],
  [/^levels\.method$/, () => ({ label: 'State levels', format: words({ mode: 'histogram mode', mean: 'histogram mean' }) })],
  [/^levels\.bins$/, () => ({ label: 'Histogram bins', format: (x) => num(x) })],
  [/^levels\.trimFraction$/, () => ({ label: 'Outlying samples set aside at each end', format: percentOf })],
  [/^edges$/, () => ({ label: 'Edges that time the flight', format: words({ both: 'both edges (pulse mid-times)', leading: 'leading edges', trailing: 'trailing edges' }) })],
  [/^polarity$/, () => ({ label: 'Beam-break pulls', format: words({ auto: 'detect', falling: 'the output low', rising: 'the output high' }) })],
  [/^smoothing$/, () => ({ label: 'Savitzky–Golay smoothing', format: smoothing })],
  [/^smoothing\.windowSize$/, () => ({ label: 'Smoothing window', format: unit('samples') })],
  [/^smoothing\.polynomial$/, () => ({ label: 'Smoothing polynomial order', format: (x) => num(x) })],
  [/^gates$/, () => ({ group: 'Gates', label: 'Gates', format: (x) => (Array.isArray(x) ? x.map(gateSpec).join('; ') : raw(x)) })],
  [/^gates\[(\d+)\]$/, (m) => ({ group: 'Gates', label: `Gate ${nth(m)}`, format: gateSpec })],
  [/^gates\[(\d+)\]\.channel$/, (m) => ({ group: 'Gates', label: `Gate ${nth(m)} channel`, format: raw })],
  [/^gates\[(\d+)\]\.position$/, (m) => ({ group: 'Gates', label: `Gate ${nth(m)} position`, format: mm })],
  [/^spacing$/, () => ({ group: 'Gates', label: 'Gate spacing', format: mm })],
  [/^positionTolerance$/, () => ({ group: 'Gates', label: 'Gate position tolerance ±', format: mm })],
  [/^timebaseAccuracyPpm$/, () => ({ label: 'Time-base accuracy ±', format: unit('ppm') })],
  [/^projectile$/, () => ({ label: 'Projectile', format: raw })],
  [/^projectile\.length$/, () => ({ label: 'Length along the path', format: mm })],
  [/^projectile\.lengthTolerance$/, () => ({ label: 'Length tolerance ±', format: mm })],
  [/^projectile\.mass$/, () => ({ label: 'Mass', format: unit('g', 1000) })],
  [/^projectile\.massTolerance$/, () => ({ label: 'Mass tolerance ±', format: unit('g', 1000) })],
  [/^ambient\.temperature$/, () => ({ label: 'Ambient temperature', format: (x) => (typeof x === 'number' ? `${num(x - 273.15, 4)} °C` : raw(x)) })],
  [/^ambient\.temperatureTolerance$/, () => ({ label: 'Ambient temperature tolerance ±', format: unit('K') })],
  [/^missed\.minSnr$/, () => ({ label: 'Smallest usable step', format: (x) => `${num(x)} × noise SD` })],
  [/^missed\.minStepFraction$/, () => ({ label: 'Step a gate must reach (else missed)', format: percentOf })],
  [/^missed\.expectedStep$/, () => ({ label: 'Expected clear-to-blocked step', format: unit('V') })],
  [/^missed\.minCandidateFraction$/, () => ({ label: 'Shallowest dip reported as a missed gate', format: percentOf })],
  [/^crossCheckCoverage$/, () => ({ label: 'Cross-check coverage factor k', format: (x) => num(x) })],
  [/^monteCarloDraws$/, () => ({ label: 'Monte Carlo check', format: (x) => (x === 0 ? 'off' : `${num(x, 8)} draws`) })],
  [/^seed$/, () => ({ label: 'Monte Carlo seed', format: raw })],
];

const speedWords = words({ flight: 'time of flight', occlusion: 'occlusion (one gate)', fit: 'fit over all gates', pair: 'two gates' });

const RESULT_RULES: Rule[] = [
  [/^speed$/, () => ({ group: 'Result', label: 'Speed', format: (x) => (x && typeof x === 'object' ? unit('m/s')((x as { value: number }).value) : 'none') })],
  [/^speed\.value$/, () => ({ group: 'Result', label: 'Speed', format: unit('m/s', 1, 6) })],
  [/^speed\.uncertainty$/, () => ({ group: 'Result', label: 'Expanded uncertainty U (k = 2)', format: unit('m/s', 1, 3) })],
  [/^speed\.standardUncertainty$/, () => ({ group: 'Result', label: 'Standard uncertainty u_c', format: unit('m/s', 1, 3) })],
  [/^speed\.method$/, () => ({ group: 'Result', label: 'Speed from', format: speedWords })],
  [/^speed\.basis$/, () => ({ group: 'Result', label: 'Speed basis', format: speedWords })],
  [/^speed\.budget\[(\d+)\]\.contribution$/, (m) => ({ group: 'Budget', label: `Budget line ${nth(m)}: contribution to u`, format: unit('m/s', 1, 3) })],
  [/^speed\.budget\[(\d+)\]\.share$/, (m) => ({ group: 'Budget', label: `Budget line ${nth(m)}: share of variance`, format: percentOf })],
  [/^speed\.budget\[(\d+)\]\.group$/, (m) => ({ group: 'Budget', label: `Budget line ${nth(m)}: source`, format: raw })],
  [/^speed\.budget/, () => ({ group: 'Budget', label: 'Budget line', format: raw })],
  [/^speed\.monteCarlo\.(\w+)$/, (m) => ({ group: 'Budget', label: `Monte Carlo ${({ draws: 'draws', mean: 'mean', standardDeviation: 'SD', intervalLow: '95 % interval, low end', intervalHigh: '95 % interval, high end' } as Record<string, string>)[m[1]] ?? m[1]}`, format: m[1] === 'draws' ? (x) => num(x, 8) : unit('m/s', 1, 6) })],
  [/^fit\.speed$/, () => ({ group: 'Result', label: 'Fit: speed at the first gate', format: unit('m/s', 1, 6) })],
  [/^fit\.speedUncertainty$/, () => ({ group: 'Result', label: 'Fit: speed uncertainty', format: unit('m/s', 1, 3) })],
  [/^fit\.deceleration$/, () => ({ group: 'Result', label: 'Fit: deceleration', format: unit('m/s²', 1, 4) })],
  [/^fit\.decelerationUncertainty$/, () => ({ group: 'Result', label: 'Fit: deceleration uncertainty', format: unit('m/s²', 1, 3) })],
  [/^derived\.(\w+)\.(value|uncertainty)$/, (m) => ({
    group: 'Result',
    label: `${({ speedOfSound: 'Speed of sound', mach: 'Mach number', kineticEnergy: 'Kinetic energy', momentum: 'Momentum' } as Record<string, string>)[m[1]] ?? m[1]}${m[2] === 'uncertainty' ? ' uncertainty' : ''}`,
    format: m[1] === 'mach' ? (x) => num(x) : m[1] === 'kineticEnergy' ? unit('J') : m[1] === 'momentum' ? unit('kg·m/s') : unit('m/s'),
  })],
  [/^flight\[(\d+)\]\.(speed|uncertainty|leadingEdgeSpeed|trailingEdgeSpeed)$/, (m) => ({
    group: 'Result',
    label: `Gate pair ${nth(m)}: ${({ speed: 'speed', uncertainty: 'uncertainty', leadingEdgeSpeed: 'speed from leading edges', trailingEdgeSpeed: 'speed from trailing edges' } as Record<string, string>)[m[2]]}`,
    // An uncertainty to two significant digits (GUM JCGM 100:2008 §7.2.6), a speed to six.
    format: unit('m/s', 1, m[2] === 'uncertainty' ? 2 : 6),
  })],
  [/^occlusion\[(\d+)\]\.(speed|uncertainty)$/, (m) => ({ group: 'Result', label: `Occlusion ${nth(m)}: ${m[2]}`, format: unit('m/s', 1, m[2] === 'uncertainty' ? 2 : 6) })],
  [/^occlusion\[(\d+)\]\.width$/, (m) => ({ group: 'Result', label: `Occlusion ${nth(m)}: beam blocked for`, format: us })],
  [/^gates\[(\d+)\]\.status$/, (m) => ({ group: 'Gates', label: `Gate ${nth(m)}`, format: words({ ok: 'fired', missed: 'missed' }) })],
  [/^gates\[(\d+)\]\.pulses\[(\d+)\]\.(start|end|width)$/, (m) => ({
    group: 'Gates',
    label: `Gate ${nth(m)}, pulse ${nth(m, 2)}: ${({ start: 'entry', end: 'exit', width: 'width' } as Record<string, string>)[m[3]]}`,
    format: us,
  })],
  [/^channels\[(\d+)\]\.transitions\[(\d+)\]\.time$/, (m) => ({ group: 'Gates', label: `Channel ${nth(m)}, crossing ${nth(m, 2)}: time`, format: us })],
  [/^channels\[(\d+)\]\.transitions\[(\d+)\]\.(\w+)$/, (m) => ({ group: 'Gates', label: `Channel ${nth(m)}, crossing ${nth(m, 2)}: ${m[3]}`, format: (x) => num(x) })],
  [/^channels\[(\d+)\]\.levels\.(low|high|amplitude)$/, (m) => ({ group: 'Gates', label: `Channel ${nth(m)}: ${m[2] === 'amplitude' ? 'step' : `${m[2]} state level`}`, format: unit('V') })],
  [/^channels\[(\d+)\]\.threshold\.(level|lowArm|highArm)$/, (m) => ({ group: 'Gates', label: `Channel ${nth(m)}: threshold ${({ level: 'level', lowArm: 'lower band edge', highArm: 'upper band edge' } as Record<string, string>)[m[2]]}`, format: unit('V') })],
  [/^channels\[(\d+)\]\.snr$/, (m) => ({ group: 'Gates', label: `Channel ${nth(m)}: step / noise`, format: (x) => num(x, 3) })],
  [/^channels\[(\d+)\]\.(\w+)/, (m) => ({ group: 'Gates', label: `Channel ${nth(m)}: ${m[2]}`, format: raw })],
  [/^gates\[(\d+)\]/, (m) => ({ group: 'Gates', label: `Gate ${nth(m)}`, format: raw })],
  [/^warnings/, () => ({ group: 'Result', label: 'Warnings', format: raw })],
];

/** A budget source as the result panel names it: "gate positions" → "Gate positions". */
export const budgetSourceLabel = (group: string) => group.charAt(0).toUpperCase() + group.slice(1);

export interface BudgetLineValues {
  group: string;
  contribution: number;
  share: number;
}

/**
 * The budget rows that changed between two versions, one per source, matched by source (not by position: the lines
 * may come in a different order) and named as the result panel names them: "Gate positions: 0.816 m/s (100 % of the
 * variance) → 1.47 m/s (100 % of the variance)". A line whose rounded values read the same is not a change.
 */
export function budgetChanges(from: BudgetLineValues[] | null, to: BudgetLineValues[] | null): { label: string; from: string; to: string }[] {
  const groups = [...new Set([...(from ?? []), ...(to ?? [])].map((l) => l.group))];
  const contribution = unit('m/s', 1, 3);
  const out: { label: string; from: string; to: string }[] = [];
  for (const g of groups) {
    const a = from?.find((l) => l.group === g);
    const b = to?.find((l) => l.group === g);
    const say = (l: BudgetLineValues | undefined) => (l ? `${contribution(l.contribution)} (${percentOf(l.share)} of the variance)` : 'not in the budget');
    if (say(a) !== say(b)) out.push({ label: budgetSourceLabel(g), from: say(a), to: say(b) });
  }
  return out;
}

function apply(rules: Rule[], path: string, ctx: LabelContext, fallback: LabelGroup): LabelledPath {
  for (const [re, make] of rules) {
    const m = path.match(re);
    if (m) {
      const r = make(m, ctx);
      return { group: r.group ?? fallback, label: r.label, format: r.format };
    }
  }
  return { group: fallback, label: path, format: raw };
}

/** An analysis parameter ("threshold.level", "gates[1].position") in words, with a formatter for its values. */
export const labelParameter = (path: string, ctx: LabelContext = {}) => apply(PARAMETER_RULES, path, ctx, 'Settings');

/** A result path ("speed.value", "gates[0].pulses[0].start") in words, with a formatter for its values. */
export const labelResult = (path: string) => apply(RESULT_RULES, path, {}, 'Result');
