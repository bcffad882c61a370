import type { LauncherFitView } from '../../../shared/contracts/launcher-fit.ts';
import type { TrendPoint } from '../trends/trend-points.ts';
import { formatWithUncertainty } from './build-shot-report.ts';
import { createReportDocument, GRID, INK, MUTED, pdfText, SAFETY } from './report-document.ts';

export interface CampaignReportInput {
  labName: string;
  campaign: { name: string; description: string; startedOn: string | null };
  points: TrendPoint[];
  launcherFit: LauncherFitView;
  generatedAt: Date;
}

const POINT = '#244863';
const MODEL = '#c47a12';
const ZEROTH = '#0d2133';
const BAND = '#f3dfc0';

const kPa = (pa: number) => String(Number((pa / 1000).toPrecision(3)));

/**
 * The campaign report as a PDF: the launcher and its shots, speed against tube vacuum with the zeroth-order line and
 * the fitted model's k = 2 prediction band, the residuals, the fitted losses with uncertainties and correlation,
 * χ²/ν and what it says, where the energy goes, the model's assumptions and the cautions.
 */
export async function buildCampaignReport(input: CampaignReportInput): Promise<Buffer> {
  const { doc, left, width, heading, table, finish } = createReportDocument({ title: `${input.campaign.name} - campaign report`, author: input.labName });
  const view = input.launcherFit;
  const fit = view.fit;
  const k = view.coverageFactor;

  doc.font('bold').fontSize(18).fillColor(INK).text(input.campaign.name, left, doc.y);
  doc.font('regular').fontSize(11).fillColor(MUTED).text(`${input.labName}${input.campaign.startedOn ? ` - started ${input.campaign.startedOn}` : ''}`);
  doc.fontSize(8.5).text(`Report generated ${input.generatedAt.toISOString().replace('T', ' ').slice(0, 16)} UTC by Gatepost`);
  if (input.campaign.description) doc.moveDown(0.3).fontSize(9.5).fillColor(INK).text(input.campaign.description, left, doc.y, { width });

  heading('Launcher');
  const l = view.launcher;
  table([
    ['Tube length', l.tubeLengthM == null ? 'not logged' : `${l.tubeLengthM} m`],
    ['Bore', l.boreM == null ? 'not logged' : `${Number((l.boreM * 1000).toPrecision(4))} mm`],
    ['Projectile', l.projectileName ? `${l.projectileName} (${Number(((l.projectileDiameterM ?? 0) * 1000).toPrecision(4))} mm, ${Number(((l.massKg ?? 0) * 1000).toPrecision(4))} g)` : 'not logged'],
    ...(fit ? [['Outside air (median of the shots)', `${(fit.reference.ambientPressure / 1000).toFixed(2)} kPa, ${(fit.reference.ambientTemperature - 273.15).toFixed(1)} °C`] as [string, string]] : []),
  ]);

  heading('Shots');
  const cols = [left, left + 50, left + 130, left + 260, left + 360, left + 440];
  doc.font('bold').fontSize(8.5).fillColor(MUTED);
  let y = doc.y;
  ['Shot', 'Tube (kPa)', `Speed ± U (k = ${k})`, 'Fitted model', 'Residual', 'Residual / u'].forEach((h, i) => doc.text(h, cols[i], y, { lineBreak: false }));
  doc.moveDown(0.9);
  doc.font('regular').fillColor(INK);
  for (const p of input.points) {
    if (doc.y > doc.page.height - 70) doc.addPage();
    const s = fit?.shots.find((x) => x.tubePressure === p.tubePressurePa && x.speed === p.speed);
    y = doc.y;
    const cells = [String(p.number), p.tubePressurePa == null ? '-' : kPa(p.tubePressurePa), formatWithUncertainty(p.speed, p.uncertainty, 'm/s')];
    if (s) cells.push(`${s.fitted.toFixed(1)} m/s`, `${s.residual >= 0 ? '+' : ''}${s.residual.toFixed(2)} m/s`, s.normalizedResidual.toFixed(2));
    else cells.push(`not fitted: ${view.leftOut.find((x) => x.number === p.number)?.reason ?? 'no fit'}`);
    cells.forEach((t, i) => doc.text(t, cols[i], y, { lineBreak: false, width: i === 3 && !s ? width - (cols[3] - left) : undefined }));
    doc.y = y + 11;
  }

  heading('Launcher model fitted to the shots');
  if (!fit) {
    doc.font('regular').fontSize(10).fillColor(INK).text(view.reason ?? 'No fit.', left, doc.y, { width });
  } else {
    drawSpeedPlot(doc, view, left, width);
    const Uf = k * fit.frictionForce.standardUncertainty;
    const Ua = k * fit.leakArea.standardUncertainty;
    table([
      [`Sliding friction (± U, k = ${k})`, formatWithUncertainty(fit.frictionForce.value, Uf, 'N') + (fit.atLowerBound.frictionForce ? ' (at its lower bound)' : '')],
      [`Leak area past the ball (± U, k = ${k})`, formatWithUncertainty(fit.leakArea.value * 1e6, Ua * 1e6, 'mm²') + (fit.atLowerBound.leakArea ? ' (at its lower bound)' : '')],
      ['Correlation of the two', fit.correlation.toFixed(2)],
      ...(view.budget ? [[`Effective driving efficiency at ${kPa(view.budget.tubePressure)} kPa`, `${formatWithUncertainty(view.budget.efficiency.value * 100, k * view.budget.efficiency.standardUncertainty * 100, '%')} of the zeroth-order kinetic energy`] as [string, string]] : []),
      ['chi²/dof', `${fit.reducedChiSquare.toFixed(2)} (chi² = ${fit.chiSquare.toFixed(1)}, ${fit.dof} degrees of freedom, P = ${fit.chiSquareProbability.toPrecision(2)})`],
      ['Runs of residual signs', `${fit.runs.runs} (expected ${fit.runs.expected.toFixed(1)}${fit.runs.probability != null ? `, P = ${fit.runs.probability.toFixed(3)}` : ''})`],
      ['Shots used', `${view.shotsUsed.length}${view.leftOut.length ? `; left out: ${view.leftOut.map((x) => `${x.number} (${x.reason})`).join(', ')}` : ''}`],
    ], 210);
    doc.moveDown(0.3).font('bold').fontSize(9.5).fillColor(fit.describesData ? INK : MODEL).text(fit.describesData ? 'The model describes these shots.' : 'The model does not describe these shots.', left, doc.y, { width });
    doc.font('regular').fontSize(9).fillColor(INK);
    for (const f of fit.findings) doc.text(`- ${pdfText(f)}`, left, doc.y, { width });
    if (view.budget) {
      const b = view.budget;
      heading(`Where the energy goes at ${kPa(b.tubePressure)} kPa (the best vacuum of the campaign)`);
      table([
        ['Zeroth-order model', `${b.zerothOrder.toFixed(1)} m/s`],
        ['with the gas dynamics of the inflow and the air left in the tube', `${b.gasDynamics.toFixed(1)} m/s`],
        ['with the fitted friction as well', `${b.withFriction.toFixed(1)} m/s`],
        ['with the fitted leak as well: the fitted model', `${formatWithUncertainty(b.fitted, k * b.fittedStandardUncertainty, 'm/s')}`],
      ], 300);
      doc.font('regular').fontSize(8.5).fillColor(MUTED).text('Each loss is taken with the ones above it, so the steps depend on their order.', left, doc.y, { width });
    }
  }

  heading('What the model assumes');
  doc.font('regular').fontSize(8.5).fillColor(INK);
  for (const a of view.assumptions) doc.text(`- ${pdfText(a)}`, left, doc.y, { width });
  doc.text('- Sources: Ayars & Buchholtz, Am. J. Phys. 72(7) 961 (2004) (zeroth order); Anderson, Modern Compressible Flow (unsteady expansion, orifice flow); Thuecks & Demas, Am. J. Phys. 87(2) (2019) (intake).', left, doc.y, { width });

  heading('Cautions');
  doc.font('regular').fontSize(8.5).fillColor(INK);
  for (const c of [...view.cautions, ...SAFETY]) doc.text(`- ${pdfText(c)}`, left, doc.y, { width });

  return finish(`${input.labName} - ${input.campaign.name}, campaign report`);
}

/** Speed against tube pressure (log axis): points ± U, the zeroth-order line, the fitted model with its k = 2 band, and the residuals under it. */
function drawSpeedPlot(doc: PDFKit.PDFDocument, view: LauncherFitView, left: number, width: number) {
  const curve = view.curve;
  const fit = view.fit!;
  // The shots the model was fitted to (other projectiles and unlogged pressures are not its to describe).
  const plotted = fit.shots.filter((s) => s.tubePressure > 0);
  const xs = [...curve.map((c) => c.tubePressurePa), ...plotted.map((p) => p.tubePressure)];
  const ys = [...curve.flatMap((c) => [c.speed - c.predictionExpandedUncertainty, c.speed + c.predictionExpandedUncertainty]), ...plotted.flatMap((p) => [p.speed - p.expandedUncertainty, p.speed + p.expandedUncertainty])];
  const zeroth = curve.map((c) => c.zerothOrder);
  const [x0, x1] = [Math.log10(Math.min(...xs)), Math.log10(Math.max(...xs))];
  let [y0, y1] = [Math.min(...ys), Math.max(...ys, ...zeroth)];
  const pad = (y1 - y0) * 0.06 || 10;
  [y0, y1] = [Math.max(0, y0 - pad), y1 + pad];
  if (doc.y > doc.page.height - 330) doc.addPage();
  const plotLeft = left + 40;
  const plotWidth = width - 40;
  const top = doc.y + 6;
  const h = 190;
  const xOf = (pa: number) => plotLeft + ((Math.log10(pa) - x0) / (x1 - x0)) * plotWidth;
  const yOf = (v: number) => top + h - ((v - y0) / (y1 - y0)) * h;
  doc.rect(plotLeft, top, plotWidth, h).lineWidth(0.5).strokeColor(GRID).stroke();
  doc.font('regular').fontSize(7).fillColor(MUTED);
  for (let i = 0; i <= 4; i++) {
    const v = y0 + ((y1 - y0) * i) / 4;
    doc.text(v.toFixed(0), left, yOf(v) - 3, { width: 36, align: 'right', lineBreak: false });
  }
  for (let e = Math.ceil(x0 * 2) / 2; e <= x1; e += 0.5) {
    const pa = 10 ** e;
    doc.moveTo(xOf(pa), top).lineTo(xOf(pa), top + h).lineWidth(0.3).strokeColor(GRID).stroke();
    doc.text(kPa(pa), xOf(pa) - 20, top + h + 3, { width: 40, align: 'center', lineBreak: false });
  }
  doc.text('tube pressure before the shot (kPa, log scale); speed (m/s)', plotLeft, top + h + 13, { width: plotWidth, align: 'center', lineBreak: false });
  doc.save().rect(plotLeft, top, plotWidth, h).clip();
  // k = 2 prediction band, then the fitted line, then the zeroth-order line.
  curve.forEach((c, i) => (i === 0 ? doc.moveTo(xOf(c.tubePressurePa), yOf(c.speed + c.predictionExpandedUncertainty)) : doc.lineTo(xOf(c.tubePressurePa), yOf(c.speed + c.predictionExpandedUncertainty))));
  [...curve].reverse().forEach((c) => doc.lineTo(xOf(c.tubePressurePa), yOf(c.speed - c.predictionExpandedUncertainty)));
  doc.closePath().fillColor(BAND).fill();
  curve.forEach((c, i) => (i === 0 ? doc.moveTo(xOf(c.tubePressurePa), yOf(c.speed)) : doc.lineTo(xOf(c.tubePressurePa), yOf(c.speed))));
  doc.lineWidth(1.2).strokeColor(MODEL).stroke();
  curve.forEach((c, i) => (i === 0 ? doc.moveTo(xOf(c.tubePressurePa), yOf(c.zerothOrder)) : doc.lineTo(xOf(c.tubePressurePa), yOf(c.zerothOrder))));
  doc.dash(4, { space: 3 }).lineWidth(1).strokeColor(ZEROTH).stroke().undash();
  for (const p of plotted) {
    const x = xOf(p.tubePressure);
    doc.moveTo(x, yOf(p.speed - p.expandedUncertainty)).lineTo(x, yOf(p.speed + p.expandedUncertainty)).lineWidth(0.8).strokeColor(POINT).stroke();
    doc.circle(x, yOf(p.speed), 2.2).fillColor(POINT).fill();
  }
  doc.restore();
  doc.font('regular').fontSize(7.5);
  const ly = top + h + 24;
  doc.fillColor(POINT).text('measured ± U (dots)', plotLeft, ly, { lineBreak: false });
  doc.fillColor(MODEL).text(`fitted model, shaded: k = ${view.coverageFactor} band for a new shot`, plotLeft + 100, ly, { lineBreak: false });
  doc.fillColor(ZEROTH).text('zeroth order (dashed)', plotLeft + 320, ly, { lineBreak: false });

  // Residuals in units of each shot's standard uncertainty.
  const rTop = top + h + 44;
  const rh = 70;
  const rMax = Math.max(3, ...fit.shots.map((s) => Math.abs(s.normalizedResidual))) * 1.1;
  const ry = (r: number) => rTop + rh / 2 - (r / rMax) * (rh / 2);
  doc.rect(plotLeft, rTop, plotWidth, rh).lineWidth(0.5).strokeColor(GRID).stroke();
  doc.moveTo(plotLeft, ry(0)).lineTo(plotLeft + plotWidth, ry(0)).lineWidth(0.6).strokeColor(MUTED).stroke();
  for (const r of [-2, 2]) doc.moveTo(plotLeft, ry(r)).lineTo(plotLeft + plotWidth, ry(r)).dash(2, { space: 2 }).lineWidth(0.4).strokeColor(MUTED).stroke().undash();
  for (const s of fit.shots) doc.circle(xOf(s.tubePressure), ry(s.normalizedResidual), 2.2).fillColor(POINT).fill();
  doc.font('regular').fontSize(7).fillColor(MUTED);
  doc.text('residual / u', left, ry(0) - 3, { width: 38, align: 'right', lineBreak: false });
  doc.text('+2', left, ry(2) - 3, { width: 36, align: 'right', lineBreak: false });
  doc.text('-2', left, ry(-2) - 3, { width: 36, align: 'right', lineBreak: false });
  doc.y = rTop + rh + 10;
  doc.x = left;
}
