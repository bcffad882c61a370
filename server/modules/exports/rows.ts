import type { ShotAnalysis } from '../../../shared/analysis/types.ts';
import { Analysis, Campaign, Projectile, Review, Shot } from '../../db/models/index.ts';
import { TIME_BASE_ATTRIBUTES, timeBaseState } from '../analyses/time-base-status.ts';
import type { ShotSelection } from '../../../shared/contracts/review.ts';
import { roundedPair, tidy, type CsvValue } from './to-csv.ts';

/**
 * What an export holds: every shot or the signed-off ones (`shots`), and numbers as computed (`full`, JSON and the
 * CSV on request) or rounded to their uncertainty (`rounded`, the CSV's default; see roundedPair).
 */
export interface ExportOptions { shots?: ShotSelection; precision?: 'rounded' | 'full' }

/** 0 °C in kelvin (exact by definition, SI Brochure 9th ed., 2.3.1). */
const ZERO_CELSIUS_K = 273.15;
const kPa = (pa: number | null) => (pa == null ? null : tidy(pa / 1000));

export const CAMPAIGN_COLUMNS = [
  ['number', 'Shot'], ['firedAt', 'Fired at (UTC)'], ['tubePressureKpa', 'Tube pressure (kPa)'], ['sealType', 'Seal'],
  ['ambientTemperatureC', 'Ambient temperature (°C)'], ['ambientPressureKpa', 'Ambient pressure (kPa)'], ['projectile', 'Projectile'],
  ['speedMps', 'Speed (m/s)'], ['uncertaintyMps', 'U (m/s)'], ['coverageFactor', 'k'], ['method', 'Method'], ['mach', 'Mach'],
  ['status', 'Status'], ['reviewDecision', 'Review decision (this version)'], ['analysisVersion', 'Analysis version'],
  ['timeBase', 'Time base'], ['signedOff', 'Signed off'],
] as const;
export type CampaignRow = Record<(typeof CAMPAIGN_COLUMNS)[number][0], CsvValue>;

/** One row per shot of the campaign, in shot-number order, with its current analysis's result. */
export async function campaignRows(campaign: Campaign, options: ExportOptions = {}): Promise<CampaignRow[]> {
  const { shots: selection = 'all', precision = 'full' } = options;
  // "approved" is the review state of the current version (shared/contracts/shot-status.ts): signed off, this version.
  const shots = await Shot.findAll({
    where: { campaignId: campaign.id, labId: campaign.labId, deletedAt: null, ...(selection === 'signed-off' ? { status: 'approved' } : {}) },
    order: [['number', 'ASC']],
  });
  const ids = shots.map((s) => s.currentAnalysisId).filter((x): x is string => !!x);
  const [analyses, projectiles, reviews] = await Promise.all([
    Analysis.findAll({ where: { id: ids, labId: campaign.labId }, attributes: ['id', 'version', 'results', ...TIME_BASE_ATTRIBUTES] }),
    Projectile.findAll({ where: { labId: campaign.labId }, attributes: ['id', 'name'] }),
    Review.findAll({ where: { analysisId: ids, labId: campaign.labId }, attributes: ['analysisId', 'decision', 'createdAt'], order: [['createdAt', 'DESC'], ['id', 'DESC']] }),
  ]);
  // The decision about the version exported: an approval of an older version does not cover a recomputed result.
  const latest = new Map<string, string>();
  for (const r of reviews) if (!latest.has(r.analysisId)) latest.set(r.analysisId, r.decision);
  return shots.map((s) => {
    const a = analyses.find((x) => x.id === s.currentAnalysisId);
    const results = (a?.results ?? null) as Partial<ShotAnalysis> | null;
    const speed = results?.speed ?? null;
    const mach = results?.derived?.mach ?? null;
    const [speedMps, uncertaintyMps] = precision === 'rounded' ? roundedPair(speed?.value, speed?.uncertainty) : [speed?.value ?? null, speed?.uncertainty ?? null];
    return {
      number: s.number,
      firedAt: s.firedAt ? s.firedAt.toISOString() : null,
      tubePressureKpa: kPa(s.tubePressurePa),
      sealType: s.sealType,
      ambientTemperatureC: s.ambientTemperatureK == null ? null : tidy(s.ambientTemperatureK - ZERO_CELSIUS_K),
      ambientPressureKpa: kPa(s.ambientPressurePa),
      projectile: projectiles.find((p) => p.id === s.projectileId)?.name ?? null,
      speedMps,
      uncertaintyMps,
      coverageFactor: speed?.coverage ?? null,
      method: speed ? `${speed.method} (${speed.basis})` : null,
      mach: precision === 'rounded' ? roundedPair(mach?.value, mach?.uncertainty)[0] : mach?.value ?? null,
      status: s.status,
      reviewDecision: (s.currentAnalysisId && latest.get(s.currentAnalysisId)) || null,
      analysisVersion: a?.version ?? null,
      // "unchecked": the speed is marked "check the time base" and is not a measurement until an analyst confirms it.
      timeBase: a ? timeBaseState(a) : null,
      signedOff: s.status === 'approved' ? 'yes' : 'no',
    };
  });
}

/** A version's "check the time base" state as the per-shot export states it (timeBaseStatus, in short). */
export interface ShotTimeBase {
  /** null: not flagged; unchecked: flagged and not confirmed; confirmed: an analyst checked the read. */
  state: 'unchecked' | 'confirmed' | null;
  reasons: { code: string; message: string }[];
  confirmation: { by: string | null; at: string; note: string } | null;
}

function timeBaseNote(t: ShotTimeBase): string {
  const why = t.reasons.map((r) => r.message).join('; ');
  if (t.state === 'unchecked') return `check the time base: ${why}. Not a measurement until an analyst confirms the read or fixes it in a new version.`;
  const c = t.confirmation;
  return `time base checked${c?.by ? ` by ${c.by}` : ''}${c ? `, ${c.at.slice(0, 10)}` : ''}${c?.note ? `: "${c.note}"` : ''} (it had been marked: ${why})`;
}

export const SHOT_COLUMNS = [
  ['kind', 'Record'], ['channel', 'Channel'], ['gatePositionM', 'Gate position (m)'], ['edge', 'Edge'], ['direction', 'Direction'],
  ['timeS', 'Time (s)'], ['pulseWidthS', 'Pulse width (s)'], ['speedMps', 'Speed (m/s)'], ['uncertaintyMps', 'U (m/s)'], ['note', 'Note'],
] as const;
export type ShotRow = Record<(typeof SHOT_COLUMNS)[number][0], CsvValue>;

/**
 * Every gate's crossings (leading and trailing edge of the projectile, mesial-level crossing times) and pulses, then
 * the speed lines: the reported speed, each gate pair's flight speed, each gate's occlusion speed.
 */
export function shotRows(results: Partial<ShotAnalysis> | null, precision: 'rounded' | 'full' = 'full', timeBase: ShotTimeBase | null = null): ShotRow[] {
  const rows: ShotRow[] = [];
  // Rounded: a speed and its U per JCGM 100 §7.2.6 (roundedPair). Crossing times, widths and positions carry no
  // uncertainty in this file and someone may recompute from them: 12 significant digits (tidy: 1 fs at 1 ms), only
  // the binary noise of the last digits dropped.
  const pair = (v: number | null | undefined, u: number | null | undefined): [CsvValue, CsvValue] => (precision === 'rounded' ? roundedPair(v, u) : [v ?? null, u ?? null]);
  const num = (x: number | null | undefined): CsvValue => (precision === 'rounded' ? tidy(x) : x ?? null);
  const blank = { channel: null, gatePositionM: null, edge: null, direction: null, timeS: null, pulseWidthS: null, speedMps: null, uncertaintyMps: null, note: null };
  // First, so nobody copies a speed out of the file without seeing it: the version is marked "check the time base".
  const unchecked = timeBase?.state === 'unchecked';
  if (timeBase?.state) rows.push({ ...blank, kind: 'time base', note: timeBaseNote(timeBase) });
  for (const gate of results?.gates ?? []) {
    const channel = results?.channels?.find((c) => c.name === gate.channel);
    if (gate.status !== 'ok' || gate.pulses.length === 0) {
      rows.push({ ...blank, kind: 'gate', channel: gate.channel, gatePositionM: gate.position, note: channel?.reason ?? 'missed' });
      continue;
    }
    for (const p of gate.pulses) {
      const full = channel?.pulses.find((x) => x.start === p.start && x.end === p.end);
      const at = { ...blank, channel: gate.channel, gatePositionM: gate.position };
      rows.push({ ...at, kind: 'crossing', edge: 'leading', direction: full?.entry.direction ?? null, timeS: num(p.start) });
      rows.push({ ...at, kind: 'crossing', edge: 'trailing', direction: full?.exit.direction ?? null, timeS: num(p.end) });
      rows.push({ ...at, kind: 'pulse', timeS: num(p.start), pulseWidthS: num(p.width) });
    }
  }
  const speed = results?.speed;
  if (speed) {
    const [v, u] = pair(speed.value, speed.uncertainty);
    rows.push({ ...blank, kind: 'speed', speedMps: v, uncertaintyMps: u, note: `${speed.method} (${speed.basis}), k = ${speed.coverage}${unchecked ? '; check the time base: not a measurement until an analyst confirms the read' : ''}` });
  }
  for (const f of results?.flight ?? []) {
    const [v, u] = pair(f.speed, f.uncertainty);
    rows.push({ ...blank, kind: 'flight', channel: `${f.from.channel} → ${f.to.channel}`, gatePositionM: num(f.to.position - f.from.position), speedMps: v, uncertaintyMps: u, note: 'mean speed over the span, k = 2' });
  }
  for (const o of results?.occlusion ?? []) {
    const [v, u] = pair(o.speed, o.uncertainty);
    rows.push({ ...blank, kind: 'occlusion', channel: o.channel, gatePositionM: o.position, pulseWidthS: num(o.width), speedMps: v, uncertaintyMps: u, note: `length ${o.length} m, k = 2` });
  }
  return rows;
}
