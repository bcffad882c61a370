import { describeDip } from '../../../shared/analysis/describe-dip.ts';
import { timeTicks } from '../../../shared/units/nice-ticks.ts';
import type { ShotAnalysis } from '../../../shared/analysis/types.ts';
import { Analysis, Campaign, Capture, GateRig, Lab, Projectile, Review, Shot, User } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import type { Deps } from '../../lib/deps.ts';
import { badRequest, notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { channelFilesSchema, type ChannelFiles } from '../../traces/channel-files.ts';
import { readWindow, recordExtent } from '../../traces/read-window.ts';
import { channelFilesWritten, missingAsPending } from '../../traces/channel-files-in-flight.ts';
import { combinedChannelNames } from '../analyses/service.ts';
import { timeBaseStatus } from '../analyses/time-base-status.ts';
import { namesOf } from '../reviews/people.ts';
import { fileSlug } from '../exports/to-csv.ts';
import { labOfShot } from '../shots/routes.ts';
import { fitCampaignLauncher } from '../trends/launcher-fit.ts';
import { campaignTrendPoints } from '../trends/trend-points.ts';
import { buildCampaignReport } from './build-campaign-report.ts';
import { buildShotReport, type ReportTrace } from './build-shot-report.ts';

/** Columns per trace: enough for a sharp print at A4 width without reading every sample. */
const TRACE_POINTS = 600;

/** The time span the report draws: every assigned pulse with room either side, or the whole record. */
function spanOf(results: Partial<ShotAnalysis> | null, files: ChannelFiles[]): { from: number; to: number } | null {
  // Pulses of the gates that fired, and the dips of those that missed (so a missed gate's dip is drawn too).
  const dips = (results?.channels ?? []).flatMap((c) => (c.candidate?.start !== undefined && c.candidate.end !== undefined ? [{ start: c.candidate.start, end: c.candidate.end }] : []));
  const pulses = [...(results?.gates ?? []).flatMap((g) => g.pulses), ...dips.map((d) => ({ ...d, width: d.end - d.start }))];
  if (pulses.length > 0) {
    const first = Math.min(...pulses.map((p) => p.start));
    const last = Math.max(...pulses.map((p) => p.end));
    const widest = Math.max(...pulses.map((p) => p.width));
    const margin = Math.max(0.15 * (last - first), 1.5 * widest);
    return { from: first - margin, to: last + margin };
  }
  const extents = files.map(recordExtent).filter((e): e is { first: number; last: number } => !!e);
  return extents.length ? { from: Math.min(...extents.map((e) => e.first)), to: Math.max(...extents.map((e) => e.last)) } : null;
}

const finite = (x: unknown): boolean => typeof x === 'number' && Number.isFinite(x);

/**
 * Why the traces of a shot cannot be drawn, or null: every number that reaches pdfkit must be finite (it throws on
 * Infinity and NaN). A capture stored before the importer refused out-of-range values (shared/import/value-limits.ts)
 * can still hold samples beyond Float32's range (stored as infinities) or times the analysis turned into nulls.
 */
function undrawable(span: { from: number; to: number } | null, traces: ReportTrace[]): string | null {
  if (span && !(finite(span.from) && finite(span.to) && span.to > span.from && finite(span.to - span.from))) {
    return 'the time span of its pulses is not a finite number of seconds';
  }
  for (const trace of traces) {
    const w = trace.window;
    const values = !w ? [] : w.raw ? [...w.t, ...w.v.filter((v) => v != null)] : [w.t0, w.dt, ...w.min.filter((v) => v != null), ...w.max.filter((v) => v != null)];
    if (!values.every(finite)) return `channel ${trace.channel} holds samples beyond what can be stored as numbers (±3.4e38 V or more)`;
    if (trace.thresholdV !== null && !finite(trace.thresholdV)) return `the crossing level of channel ${trace.channel} is not a finite number`;
    if (!trace.pulses.every((p) => finite(p.start) && finite(p.end) && finite(p.width))) return `a pulse of channel ${trace.channel} has no finite start, end or width`;
  }
  return null;
}

export function reportRoutes(deps: Deps): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/campaigns/:campaignId/report.pdf',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: 'A printable campaign report (PDF): the launcher and its shots, speed against tube vacuum with the zeroth-order line and the fitted launcher model with its k = 2 band, residuals, fitted losses with uncertainties, assumptions and cautions',
      response: { status: 200, description: 'application/pdf, as an attachment' },
      async handler(req, res) {
        const campaign = await Campaign.findOne({ where: { id: req.params.campaignId as string, labId: req.lab!.id } });
        if (!campaign) throw notFound('No such campaign.');
        const [lab, points] = await Promise.all([Lab.findByPk(campaign.labId, { attributes: ['name'] }), campaignTrendPoints(campaign)]);
        const pdf = await buildCampaignReport({
          labName: lab?.name ?? '',
          campaign: { name: campaign.name, description: campaign.description ?? '', startedOn: campaign.startedOn ?? null },
          points, launcherFit: await fitCampaignLauncher(campaign, points), generatedAt: new Date(),
        });
        await recordAudit({ labId: campaign.labId, actorId: req.auth!.userId, action: 'campaign.report', targetType: 'campaign', targetId: campaign.id, details: { shots: points.length, bytes: pdf.length }, ip: clientIp(req) });
        res.attachment(`${fileSlug(campaign.name)}-report.pdf`);
        res.type('application/pdf').send(pdf);
      },
    },
    {
      method: 'get',
      path: '/api/shots/:shotId/report.pdf',
      access: { kind: 'lab', permission: 'lab:read', labOf: labOfShot },
      summary: 'A printable shot report (PDF): conditions, annotated traces, result with U and k, the "check before trusting" box (time-base flag, analysis and file warnings), uncertainty budget, assumptions, analysis version and parameters, review sign-off. 400 when the stored traces or pulses hold numbers out of range (a file read before the importer refused samples at or beyond ±9.9e37 and times beyond ±1e12 s)',
      response: { status: 200, description: 'application/pdf, as an attachment' },
      async handler(req, res) {
        const shot = await Shot.findOne({ where: { id: req.params.shotId as string, labId: req.lab!.id } });
        if (!shot) throw notFound('No such shot.');
        const [lab, campaign, projectile, rig] = await Promise.all([
          Lab.findByPk(shot.labId, { attributes: ['name'] }),
          Campaign.findByPk(shot.campaignId, { attributes: ['name'] }),
          shot.projectileId ? Projectile.findByPk(shot.projectileId) : null,
          shot.gateRigId ? GateRig.findByPk(shot.gateRigId) : null,
        ]);
        const current = shot.currentAnalysisId ? await Analysis.findByPk(shot.currentAnalysisId) : null;
        const analysis = current?.state === 'done' ? current : null;
        const results = (analysis?.results ?? null) as Partial<ShotAnalysis> | null;

        // The captures the analysis read, in its order, and the channel names the engine saw.
        const ids = analysis?.captureIds ?? [];
        const rows = ids.length ? await Capture.findAll({ where: { id: ids, shotId: shot.id, state: 'ready' } }) : [];
        const captures = ids.map((id) => rows.find((r) => r.id === id)).filter((c): c is Capture => !!c);
        for (const capture of captures) await channelFilesWritten(capture.id);
        const files = captures.map((c) => channelFilesSchema.safeParse(c.channels)).map((p) => (p.success ? p.data : null));
        const names = combinedChannelNames(captures);
        const where: { files: ChannelFiles; index: number }[] = [];
        captures.forEach((_, ci) => (files[ci]?.channels ?? []).forEach((__, index) => where.push({ files: files[ci]!, index })));
        const span = spanOf(results, files.filter((f): f is ChannelFiles => !!f));

        const traces: ReportTrace[] = [];
        for (const [i, gate] of (results?.gates ?? []).entries()) {
          const at = where[names.indexOf(gate.channel)];
          const channel = results?.channels?.find((c) => c.name === gate.channel);
          const label = rig?.gates.find((g) => Math.abs(g.position_m - gate.position) < 1e-9)?.label ?? String.fromCharCode(65 + i);
          traces.push({
            gateLabel: label, channel: gate.channel, positionM: gate.position,
            window: at && span ? await readWindow(deps.blobStore, at.files, at.index, span.from, span.to, TRACE_POINTS).catch(missingAsPending) : null,
            thresholdV: channel?.threshold?.level ?? null,
            pulses: gate.pulses,
            note: gate.status === 'missed' ? `missed: ${channel?.reason ?? 'no pulse found'}` : null,
            dip: gate.status === 'missed' && channel && span ? describeDip(channel, timeTicks(span.from, span.to).unit === 'µs' ? 'µs' : 'ms') : null,
          });
        }

        const reason = undrawable(span, traces);
        if (reason) {
          throw badRequest(`The report of shot ${shot.number} cannot be drawn: ${reason}. Its file was read before Gatepost refused samples at or beyond ±9.9e37 and times beyond ±1e12 s: check that file's values and its time column.`);
        }

        // Sign-off: the last approval on record, and whether it is of the version this report shows.
        const approval = shot.approvedAnalysisId
          ? await Review.findOne({ where: { shotId: shot.id, analysisId: shot.approvedAnalysisId, decision: 'approved' }, order: [['createdAt', 'DESC']] })
          : null;
        let signOff = { text: 'Not signed off.', approved: false };
        if (approval) {
          const [reviewer, approvedVersion] = await Promise.all([
            approval.reviewerId ? User.findByPk(approval.reviewerId, { attributes: ['name'] }) : null,
            Analysis.findByPk(approval.analysisId, { attributes: ['version'] }),
          ]);
          const who = `${reviewer?.name ?? 'a former member'} on ${approval.createdAt.toISOString().slice(0, 10)}`;
          signOff = approval.analysisId === analysis?.id
            ? { text: `Signed off by ${who} (analysis version ${approvedVersion?.version}).`, approved: true }
            : { text: `Not signed off: analysis version ${approvedVersion?.version} was signed off by ${who}; the version shown here is newer and has not been reviewed.`, approved: false };
        } else if (shot.status === 'in_review') {
          signOff = { text: 'Not signed off: waiting for review.', approved: false };
        }

        const check = analysis ? timeBaseStatus(analysis, await namesOf([analysis.timeBaseConfirmedBy])) : null;
        const pdf = await buildShotReport({
          labName: lab?.name ?? '', campaignName: campaign?.name ?? '',
          shot: {
            number: shot.number, firedAt: shot.firedAt, status: shot.status, tubePressurePa: shot.tubePressurePa, sealType: shot.sealType,
            ambientTemperatureK: shot.ambientTemperatureK, ambientPressurePa: shot.ambientPressurePa, notes: shot.notes,
          },
          projectile: projectile ? { name: projectile.name, diameterM: projectile.diameterM, massKg: projectile.massKg } : null,
          gateRigName: rig?.name ?? null,
          analysis: analysis ? { version: analysis.version, engineVersion: analysis.engineVersion, completedAt: analysis.completedAt, parameters: analysis.parameters, results } : null,
          span, traces, signOff, generatedAt: new Date(),
          timeBase: check && {
            flagged: check.flagged, reasons: check.reasons,
            confirmation: check.confirmation && { name: check.confirmation.by?.name ?? null, at: check.confirmation.at, note: check.confirmation.note },
          },
          captureWarnings: captures.map((c) => ({ fileName: c.fileName, warnings: c.warnings ?? [] })),
        });
        await recordAudit({ labId: shot.labId, actorId: req.auth!.userId, action: 'shot.report', targetType: 'shot', targetId: shot.id, details: { version: analysis?.version ?? null, bytes: pdf.length }, ip: clientIp(req) });
        res.attachment(`${fileSlug(campaign?.name ?? 'campaign')}-shot-${shot.number}${analysis ? `-v${analysis.version}` : ''}.pdf`);
        res.type('application/pdf').send(pdf);
      },
    },
  ];
}
