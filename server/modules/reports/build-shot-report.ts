import { describeAssumptions } from '../../../shared/analysis/describe-assumptions.ts';
import { budgetSourceLabel, labelParameter } from '../../../shared/contracts/analysis-labels.ts';
import { shotStatusLabel } from '../../../shared/contracts/shot-status.ts';
import type { DipMark } from '../../../shared/analysis/describe-dip.ts';
import type { ShotAnalysis } from '../../../shared/analysis/types.ts';
import { timeTicks } from '../../../shared/units/nice-ticks.ts';
import type { TraceWindow } from '../../traces/read-window.ts';
import { createReportDocument, GRID, INK, MUTED, SAFETY } from './report-document.ts';

/** One gate's trace as drawn: the window read from the stored channel files and the current analysis's marks. */
export interface ReportTrace {
  gateLabel: string;
  channel: string;
  positionM: number;
  window: TraceWindow | null;
  /** Crossing level used by the analysis, V (null when the channel was missed). */
  thresholdV: number | null;
  pulses: { start: number; end: number; width: number }[];
  note: string | null;
  /** A missed gate's sub-threshold dip: span, floor level (V) and its label. */
  dip?: DipMark | null;
}

/** "Gate A · 150.0 mm", or "Gate A · Start sensor · 0.0 mm" when the channel has a name of its own: a gate named
 * like its channel is not named twice (as on the shot page). */
export function traceTitle(trace: Pick<ReportTrace, 'gateLabel' | 'channel' | 'positionM'>): string {
  const gate = /^gate\b/i.test(trace.gateLabel) ? trace.gateLabel : `Gate ${trace.gateLabel}`;
  const where = `${(trace.positionM * 1000).toFixed(1)} mm`;
  return gate.toLowerCase() === trace.channel.toLowerCase() ? `${gate} · ${where}` : `${gate} · ${trace.channel} · ${where}`;
}

/** A piece of text placed on a trace panel: its left edge, baseline-top, box width and font size (pt). */
export interface PlacedLabel {
  text: string;
  x: number;
  y: number;
  width: number;
  size: number;
  color: 'mark' | 'muted';
  align?: 'left' | 'right';
}

export interface PanelFrame {
  plotLeft: number;
  plotWidth: number;
  top: number;
  height: number;
  from: number;
  to: number;
}

/** Text shortened with an ellipsis until `measure` says it fits `max` points. */
function fitText(text: string, max: number, measure: (text: string) => number): string {
  if (measure(text) <= max) return text;
  let t = text;
  while (t.length > 1 && measure(`${t}…`) > max) t = t.slice(0, -1);
  return `${t.trimEnd()}…`;
}

/** A box of width w as near x as the frame allows. */
const inside = (x: number, w: number, lo: number, hi: number) => Math.max(lo, Math.min(x, hi - w));

/**
 * Where a trace panel's labels go: pulse widths, leading-edge times, the missed note and the dip's label. Every box
 * lies inside the plot frame whatever the values (a pulse at the edge or outside the span, a long note), so no text
 * runs past the frame; text too long for the frame is shortened with an ellipsis.
 */
export function layoutTraceLabels(trace: ReportTrace, f: PanelFrame, measure: (text: string, size: number) => number): PlacedLabel[] {
  const tu = timeUnit(f.from, f.to);
  const lo = f.plotLeft + 2;
  const hi = f.plotLeft + f.plotWidth - 2;
  const xOf = (t: number) => f.plotLeft + ((t - f.from) / (f.to - f.from)) * f.plotWidth;
  const out: PlacedLabel[] = [];
  const put = (text: string, x: number, y: number, size: number, color: PlacedLabel['color']) => {
    const fitted = fitText(text, hi - lo, (t) => measure(t, size));
    const w = measure(fitted, size);
    out.push({ text: fitted, x: inside(x, w, lo, hi), y: Math.max(f.top + 1, Math.min(y, f.top + f.height - size - 1)), width: w, size, color });
  };
  for (const p of trace.pulses) {
    put(`width ${fmt(p.width * tu.scale)} ${tu.unit}`, xOf(p.end) + 3, f.top + 10, 7.5, 'mark');
    const start = `${fmt(p.start * tu.scale, 6)} ${tu.unit}`;
    put(start, xOf(p.start) - 2 - measure(start, 7.5), f.top + f.height - 10, 7.5, 'mark');
  }
  // The missed note and the dip's label sit in the middle band, between the clear and blocked levels, where the
  // trace only passes on its edges.
  if (trace.note) put(trace.note, f.plotLeft + 4, f.top + f.height / 2 - 10, 7.5, 'muted');
  if (trace.dip) {
    const x1 = xOf(trace.dip.end);
    const w = measure(trace.dip.label, 7.5);
    // Right of the span when it fits, else left of it.
    const x = x1 + 4 + w <= hi ? x1 + 4 : xOf(trace.dip.start) - 4 - w;
    put(trace.dip.label, x, f.top + f.height / 2 + 1, 7.5, 'mark');
  }
  return out;
}

/** The shared time axis: round ticks (1-2-5 steps) and their labels, each label inside the frame's width. */
export function layoutTimeAxis(f: Pick<PanelFrame, 'plotLeft' | 'plotWidth' | 'from' | 'to'>, y: number, measure: (text: string, size: number) => number) {
  const ticks = timeTicks(f.from, f.to, { maxTicks: 9 });
  const xOf = (t: number) => f.plotLeft + ((t - f.from) / (f.to - f.from)) * f.plotWidth;
  const labels: PlacedLabel[] = ticks.values.map((t, i) => {
    const w = measure(ticks.labels[i], 7.5);
    return { text: ticks.labels[i], x: inside(xOf(t) - w / 2, w, f.plotLeft, f.plotLeft + f.plotWidth), y, width: w, size: 7.5, color: 'muted' };
  });
  return { ticks: ticks.values.map(xOf), labels, title: `time (${ticks.unit})` };
}

export interface ShotReportInput {
  labName: string;
  campaignName: string;
  shot: {
    number: number;
    firedAt: Date | null;
    status: string;
    tubePressurePa: number | null;
    sealType: string;
    ambientTemperatureK: number | null;
    ambientPressurePa: number | null;
    notes: string;
  };
  projectile: { name: string; diameterM: number; massKg: number } | null;
  gateRigName: string | null;
  analysis: { version: number; engineVersion: string; completedAt: Date | null; parameters: unknown; results: Partial<ShotAnalysis> | null } | null;
  /** The time span drawn, s (same for every trace so they line up). */
  span: { from: number; to: number } | null;
  traces: ReportTrace[];
  signOff: { text: string; approved: boolean };
  /** "Check the time base" on the version shown: its reasons, and the analyst's confirmation when there is one. */
  timeBase: { flagged: boolean; reasons: { message: string }[]; confirmation: { name: string | null; at: Date; note: string } | null } | null;
  /** Warnings the importer stored with each file the analysis read. */
  captureWarnings: { fileName: string; warnings: string[] }[];
  generatedAt: Date;
}

const TRACE = '#1d4ed8';
const MARK = '#c2410c';
const CHECK_FILL = '#fdf1dc';
const CHECK_EDGE = '#e0a43b';

/** Rounds U to two significant digits and the value to the same place (GUM, JCGM 100:2008, 7.2.6). */
export function formatWithUncertainty(value: number | null | undefined, u: number | null | undefined, unit: string): string {
  if (value == null || !Number.isFinite(value)) return '-';
  if (u == null || !Number.isFinite(u) || u <= 0) return `${Number(value.toPrecision(6))} ${unit}`.trim();
  const decimals = 1 - Math.floor(Math.log10(u));
  if (decimals >= 0) return `${value.toFixed(decimals)} ± ${u.toFixed(decimals)} ${unit}`.trim();
  // U of 100 or more: round both to U's second significant digit (5657 → 5700), not to the unit.
  const step = 10 ** -decimals;
  return `${Math.round(value / step) * step} ± ${Math.round(u / step) * step} ${unit}`.trim();
}

const fmt = (x: number | null | undefined, digits = 4) => (x == null || !Number.isFinite(x) ? '-' : String(Number(x.toPrecision(digits))));

/** Time in the SI prefix the time axis uses, so labels inside the panels and the axis agree. */
function timeUnit(from: number, to: number): { scale: number; unit: string } {
  const { scale, unit } = timeTicks(from, to, { maxTicks: 7 });
  return { scale, unit };
}

/** Leaf settings of the parameters, path → stored value (lists of plain values stay whole). */
function flatten(value: unknown, prefix = '', out: [string, unknown][] = []): [string, unknown][] {
  if (value && typeof value === 'object' && !Array.isArray(value)) {
    for (const [k, v] of Object.entries(value as Record<string, unknown>)) flatten(v, prefix ? `${prefix}.${k}` : k, out);
  } else if (Array.isArray(value) && value.some((v) => v && typeof v === 'object')) {
    value.forEach((v, i) => flatten(v, `${prefix}[${i}]`, out));
  } else {
    out.push([prefix, value]);
  }
  return out;
}

/** The analysis settings in the analyst panel's words and units ("Threshold level 50 %", "Gate 2 position 150 mm"). */
function settingsInWords(parameters: unknown): [string, string][] {
  const thresholdUnit = (parameters as { threshold?: { unit?: string } } | null)?.threshold?.unit === 'volts' ? 'volts' : 'percent';
  return flatten(parameters).map(([path, value]) => {
    const l = labelParameter(path, { thresholdUnit });
    return [l.label, l.format(value)];
  });
}

/**
 * The printable shot report as a PDF: conditions, result with U and k, uncertainty budget, the annotated traces
 * drawn as vector paths, the analysis version and its parameters, the review sign-off and the launcher safety note.
 */
export async function buildShotReport(input: ShotReportInput): Promise<Buffer> {
  const { doc, left, width, heading, table, finish } = createReportDocument({ title: `Shot ${input.shot.number}, ${input.campaignName}`, author: input.labName });

  /** The "Check before trusting" box: the time-base flag, the analysis's warnings and the files' warnings. */
  const checkBeforeTrusting = () => {
    const lines: { text: string; bold?: boolean }[] = [];
    const tb = input.timeBase;
    if (tb?.flagged) {
      const c = tb.confirmation;
      lines.push({
        text: c
          ? `Check the time base: confirmed by ${c.name ?? 'a former member'} on ${c.at.toISOString().slice(0, 10)} ("${c.note}").`
          : 'Check the time base: this result is not a measurement until an analyst confirms the read or a new version fixes it.',
        bold: true,
      });
      for (const r of tb.reasons) lines.push({ text: `- ${r.message}` });
    }
    for (const w of results?.warnings ?? []) lines.push({ text: `- ${w}` });
    for (const f of input.captureWarnings) for (const w of f.warnings) lines.push({ text: `- ${f.fileName}: ${w}` });
    if (lines.length === 0) return;
    const pad = 8;
    const inner = width - 2 * pad;
    doc.fontSize(9);
    const title = 'Check before trusting this result';
    const height = 2 * pad + doc.font('bold').heightOfString(title, { width: inner }) + 3 +
      lines.reduce((sum, l) => sum + doc.font(l.bold ? 'bold' : 'regular').heightOfString(l.text, { width: inner }) + 1, 0);
    doc.moveDown(0.5);
    if (doc.y + height > doc.page.height - 60) doc.addPage();
    const top = doc.y;
    doc.rect(left, top, width, height).fillAndStroke(CHECK_FILL, CHECK_EDGE);
    doc.font('bold').fillColor(INK).text(title, left + pad, top + pad, { width: inner });
    doc.y += 3;
    for (const l of lines) {
      doc.font(l.bold ? 'bold' : 'regular').fillColor(INK).text(l.text, left + pad, doc.y, { width: inner });
      doc.y += 1;
    }
    doc.y = top + height + 4;
  };

  // Title block.
  doc.font('bold').fontSize(18).fillColor(INK).text(`Shot ${input.shot.number}`, left, doc.y);
  doc.font('regular').fontSize(11).fillColor(MUTED).text(`${input.campaignName} - ${input.labName}`);
  doc.fontSize(8.5).text(`Report generated ${input.generatedAt.toISOString().replace('T', ' ').slice(0, 16)} UTC by Gatepost`);

  const s = input.shot;
  heading('Conditions');
  table([
    ['Fired at', s.firedAt ? `${s.firedAt.toISOString().replace('T', ' ').slice(0, 19)} UTC` : 'not logged'],
    ['Status', shotStatusLabel(s.status)],
    ['Tube pressure', s.tubePressurePa == null ? 'not logged' : `${fmt(s.tubePressurePa / 1000)} kPa`],
    ['Seal', s.sealType || 'not logged'],
    ['Ambient temperature', s.ambientTemperatureK == null ? 'not logged' : `${(s.ambientTemperatureK - 273.15).toFixed(1)} °C`],
    ['Ambient pressure', s.ambientPressurePa == null ? 'not logged' : `${(s.ambientPressurePa / 1000).toFixed(1)} kPa`],
    ['Projectile', input.projectile ? `${input.projectile.name} (${fmt(input.projectile.diameterM * 1000)} mm, ${fmt(input.projectile.massKg * 1000)} g)` : 'not logged'],
    ['Gate rig', input.gateRigName ?? 'not logged'],
    ...(s.notes ? [['Notes', s.notes] as [string, string]] : []),
  ]);

  const results = input.analysis?.results ?? null;
  const speed = results?.speed ?? null;
  const unchecked = input.timeBase?.flagged === true && input.timeBase.confirmation === null;
  heading('Result');
  if (!speed) {
    doc.font('regular').fontSize(10).fillColor(INK).text(input.analysis ? 'No speed was measured in the current analysis.' : 'This shot has no finished analysis.');
  } else {
    doc.font('bold').fontSize(16).fillColor(unchecked ? MUTED : INK).text(formatWithUncertainty(speed.value, speed.uncertainty, 'm/s'));
    if (unchecked) {
      doc.font('bold').fontSize(9.5).fillColor(MARK).text(
        `Not a measurement until the time base is checked: ${input.timeBase!.reasons[0]?.message ?? 'see below'}.`, left, doc.y, { width },
      );
    }
    doc.font('regular').fontSize(9).fillColor(MUTED).text(`Expanded uncertainty U = k·u_c with coverage factor k = ${speed.coverage ?? '-'} (about 95 %); u_c = ${fmt(speed.standardUncertainty, 3)} m/s.`);
    doc.moveDown(0.3);
    const derived = results?.derived;
    table([
      ['Method', `${speed.method === 'flight' ? 'time of flight' : 'occlusion'} (${speed.basis === 'fit' ? 'constant-deceleration fit' : speed.basis === 'pair' ? 'one gate pair' : 'one gate'})`],
      ...(results?.fit ? [['Deceleration', formatWithUncertainty(results.fit.deceleration, results.fit.decelerationUncertainty, 'm/s²')] as [string, string]] : []),
      ['Mach number', derived?.mach ? formatWithUncertainty(derived.mach.value, derived.mach.uncertainty, '') : '-'],
      ['Kinetic energy', derived?.kineticEnergy ? formatWithUncertainty(derived.kineticEnergy.value, derived.kineticEnergy.uncertainty, 'J') : '-'],
      ...(results?.flight ?? []).map((f) => [`Flight ${f.from.channel} to ${f.to.channel}`, formatWithUncertainty(f.speed, f.uncertainty, 'm/s')] as [string, string]),
    ]);
    checkBeforeTrusting();
    heading('Uncertainty budget');
    const cols = [left, left + 250, left + 380];
    doc.font('bold').fontSize(9).fillColor(MUTED);
    const hy = doc.y;
    doc.text('Source', cols[0], hy).text('Contribution to u_c (m/s)', cols[1], hy).text('Share of variance', cols[2], hy);
    doc.font('regular').fillColor(INK);
    for (const line of speed.budget ?? []) {
      const y = doc.y + 2;
      doc.text(budgetSourceLabel(line.group), cols[0], y, { width: 240 });
      doc.text(fmt(line.contribution, 3), cols[1], y).text(`${(line.share * 100).toFixed(1)} %`, cols[2], y);
    }
  }

  if (!speed) checkBeforeTrusting();
  if (results?.assumptions) {
    heading('Assumptions behind the result');
    table(describeAssumptions(results.assumptions).map((l) => [l.label, l.text]));
  }

  heading('Review sign-off');
  doc.font(input.signOff.approved ? 'bold' : 'regular').fontSize(10.5).fillColor(input.signOff.approved ? '#166534' : INK).text(input.signOff.text, left, doc.y, { width });

  // Traces: one panel per gate on a shared time axis, so the crossings line up from gate to gate.
  doc.addPage();
  heading('Annotated traces');
  if (!input.span || input.traces.length === 0) {
    doc.font('regular').fontSize(10).fillColor(INK).text('No traces to draw: the shot has no analysed capture.');
  } else {
    const { from, to } = input.span;
    const tu = timeUnit(from, to);
    doc.font('regular').fontSize(8.5).fillColor(MUTED).text(
      `Signal in volts against time in ${tu.unit}. Dashed: the crossing level of the analysis. Orange: the beam blocked (leading edge) and clear again (trailing edge), with the pulse width. Shaded: a missed gate's dip below the threshold, from where it leaves the noise to where it returns, with its depth.`,
      left, doc.y, { width },
    );
    doc.moveDown(0.5);
    const plotLeft = left + 42;
    const plotWidth = width - 42;
    const panelHeight = Math.min(110, (doc.page.height - doc.y - 110) / input.traces.length - 26);
    const xOf = (t: number) => plotLeft + ((t - from) / (to - from)) * plotWidth;
    const measure = (text: string, size: number) => doc.font('regular').fontSize(size).widthOfString(text);
    for (const trace of input.traces) {
      const top = doc.y + 14;
      doc.font('bold').fontSize(9).fillColor(INK).text(traceTitle(trace), left, doc.y);
      const values: number[] = [];
      const w = trace.window;
      if (w?.raw) for (const v of w.v) if (v != null) values.push(v);
      if (w && !w.raw) for (let j = 0; j < w.min.length; j++) if (w.min[j] != null) values.push(w.min[j]!, w.max[j]!);
      let lo = Math.min(...values, trace.thresholdV ?? Infinity);
      let hi = Math.max(...values, trace.thresholdV ?? -Infinity);
      if (!Number.isFinite(lo) || !Number.isFinite(hi)) [lo, hi] = [0, 1];
      if (hi - lo < 1e-9) [lo, hi] = [lo - 0.5, hi + 0.5];
      const pad = (hi - lo) * 0.1;
      [lo, hi] = [lo - pad, hi + pad];
      const yOf = (v: number) => top + panelHeight - ((v - lo) / (hi - lo)) * panelHeight;
      doc.rect(plotLeft, top, plotWidth, panelHeight).lineWidth(0.5).strokeColor(GRID).stroke();
      doc.font('regular').fontSize(7).fillColor(MUTED);
      for (const v of [lo + pad, hi - pad]) {
        doc.text(`${fmt(v, 3)} V`, left, yOf(v) - 3, { width: 40, align: 'right' });
        doc.moveTo(plotLeft, yOf(v)).lineTo(plotLeft + plotWidth, yOf(v)).lineWidth(0.3).strokeColor(GRID).stroke();
      }
      doc.save().rect(plotLeft, top, plotWidth, panelHeight).clip();
      if (w?.raw) {
        let pen = false;
        for (let i = 0; i < w.t.length; i++) {
          const v = w.v[i];
          if (v == null) {
            pen = false;
            continue;
          }
          if (pen) doc.lineTo(xOf(w.t[i]), yOf(v));
          else doc.moveTo(xOf(w.t[i]), yOf(v));
          pen = true;
        }
        doc.lineWidth(0.8).strokeColor(TRACE).stroke();
      } else if (w) {
        // Min/max columns: each drawn as a vertical stroke from min to max, joined to the next column, so a fast
        // edge inside one column still shows its full swing.
        let pen = false;
        for (let j = 0; j < w.min.length; j++) {
          const mn = w.min[j];
          const mx = w.max[j];
          if (mn == null || mx == null) {
            pen = false;
            continue;
          }
          const x = xOf(w.t0 + (j + 0.5) * w.dt);
          if (pen) doc.lineTo(x, yOf(mx));
          else doc.moveTo(x, yOf(mx));
          doc.lineTo(x, yOf(mn));
          pen = true;
        }
        doc.lineWidth(0.8).strokeColor(TRACE).stroke();
      }
      if (trace.thresholdV != null) {
        doc.moveTo(plotLeft, yOf(trace.thresholdV)).lineTo(plotLeft + plotWidth, yOf(trace.thresholdV)).dash(3, { space: 2 }).lineWidth(0.6).strokeColor(MUTED).stroke().undash();
      }
      for (const p of trace.pulses) {
        for (const t of [p.start, p.end]) doc.moveTo(xOf(t), top).lineTo(xOf(t), top + panelHeight).lineWidth(0.8).strokeColor(MARK).stroke();
        const yb = top + 6;
        doc.moveTo(xOf(p.start), yb).lineTo(xOf(p.end), yb).lineWidth(0.8).strokeColor(MARK).stroke();
      }
      if (trace.dip) {
        // The missed gate's dip: its span shaded and its floor dashed.
        const x0 = xOf(trace.dip.start);
        const x1 = xOf(trace.dip.end);
        doc.rect(x0, top, Math.max(0.5, x1 - x0), panelHeight).fillOpacity(0.12).fill(MARK).fillOpacity(1);
        doc.moveTo(x0, yOf(trace.dip.level)).lineTo(x1, yOf(trace.dip.level)).dash(2, { space: 1.5 }).lineWidth(0.8).strokeColor(MARK).stroke().undash();
      }
      doc.restore();
      const frame = { plotLeft, plotWidth, top, height: panelHeight, from, to };
      for (const l of layoutTraceLabels(trace, frame, measure)) {
        doc.font('regular').fontSize(l.size).fillColor(l.color === 'mark' ? MARK : MUTED).text(l.text, l.x, l.y, { lineBreak: false });
      }
      doc.y = top + panelHeight + 12;
    }
    // Shared time axis under the last panel: round ticks, labels kept inside the frame's width.
    const ay = doc.y - 8;
    const axis = layoutTimeAxis({ plotLeft, plotWidth, from, to }, ay, measure);
    for (const x of axis.ticks) doc.moveTo(x, ay - 4).lineTo(x, ay - 1).lineWidth(0.5).strokeColor(MUTED).stroke();
    doc.font('regular').fontSize(7.5).fillColor(MUTED);
    for (const l of axis.labels) doc.text(l.text, l.x, l.y, { lineBreak: false });
    doc.text(axis.title, plotLeft, ay + 10, { width: plotWidth, align: 'center' });
  }

  heading('Analysis');
  if (!input.analysis) {
    doc.font('regular').fontSize(10).fillColor(INK).text('No finished analysis.');
  } else {
    const a = input.analysis;
    table([
      ['Version', String(a.version)],
      ['Engine', a.engineVersion],
      ['Completed', a.completedAt ? `${a.completedAt.toISOString().replace('T', ' ').slice(0, 19)} UTC` : '-'],
    ]);
    doc.moveDown(0.3).font('bold').fontSize(9).fillColor(MUTED).text('Analysis settings', left, doc.y);
    const params = settingsInWords(a.parameters);
    table(params.length > 0 ? params : [['(none)', 'engine defaults']], 200);
  }

  heading('Launcher safety');
  doc.font('regular').fontSize(8.5).fillColor(INK);
  for (const line of SAFETY) doc.text(`- ${line}`, left, doc.y, { width });

  return finish(`${input.labName} - ${input.campaignName}, shot ${input.shot.number}`);
}
