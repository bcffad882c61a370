import type { ShotAnalysis } from '../../../shared/analysis/types.ts';
import { Analysis, Campaign, Projectile, Review, Shot } from '../../db/models/index.ts';
import { TIME_BASE_ATTRIBUTES, timeBaseState } from '../analyses/time-base-status.ts';
import { tidy, type CsvValue } from './to-csv.ts';

/** 0 °C in kelvin (exact by definition, SI Brochure 9th ed., 2.3.1). */
const ZERO_CELSIUS_K = 273.15;
const kPa = (pa: number | null) => (pa == null ? null : tidy(pa / 1000));

export const CAMPAIGN_COLUMNS = [
  ['number', 'Shot'], ['firedAt', 'Fired at (UTC)'], ['tubePressureKpa', 'Tube pressure (kPa)'], ['sealType', 'Seal'],
  ['ambientTemperatureC', 'Ambient temperature (°C)'], ['ambientPressureKpa', 'Ambient pressure (kPa)'], ['projectile', 'Projectile'],
  ['speedMps', 'Speed (m/s)'], ['uncertaintyMps', 'U (m/s)'], ['coverageFactor', 'k'], ['method', 'Method'], ['mach', 'Mach'],
  ['status', 'Status'], ['reviewDecision', 'Review decision (this version)'], ['analysisVersion', 'Analysis version'],
  ['timeBase', 'Time base'],
] as const;
export type CampaignRow = Record<(typeof CAMPAIGN_COLUMNS)[number][0], CsvValue>;

/** One row per shot of the campaign, in shot-number order, with its current analysis's result. */
export async function campaignRows(campaign: Campaign): Promise<CampaignRow[]> {
  const shots = await Shot.findAll({ where: { campaignId: campaign.id, labId: campaign.labId, deletedAt: null }, order: [['number', 'ASC']] });
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
    return {
      number: s.number,
      firedAt: s.firedAt ? s.firedAt.toISOString() : null,
      tubePressureKpa: kPa(s.tubePressurePa),
      sealType: s.sealType,
      ambientTemperatureC: s.ambientTemperatureK == null ? null : tidy(s.ambientTemperatureK - ZERO_CELSIUS_K),
      ambientPressureKpa: kPa(s.ambientPressurePa),
      projectile: projectiles.find((p) => p.id === s.projectileId)?.name ?? null,
      speedMps: speed?.value ?? null,
      uncertaintyMps: speed?.uncertainty ?? null,
      coverageFactor: speed?.coverage ?? null,
      method: speed ? `${speed.method} (${speed.basis})` : null,
      mach: results?.derived?.mach?.value ?? null,
      status: s.status,
      reviewDecision: (s.currentAnalysisId && latest.get(s.currentAnalysisId)) || null,
      analysisVersion: a?.version ?? null,
      // "unchecked": the speed is marked "check the time base" and is not a measurement until an analyst confirms it.
      timeBase: a ? timeBaseState(a) : null,
    };
  });
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
export function shotRows(results: Partial<ShotAnalysis> | null): ShotRow[] {
  const rows: ShotRow[] = [];
  const blank = { channel: null, gatePositionM: null, edge: null, direction: null, timeS: null, pulseWidthS: null, speedMps: null, uncertaintyMps: null, note: null };
  for (const gate of results?.gates ?? []) {
    const channel = results?.channels?.find((c) => c.name === gate.channel);
    if (gate.status !== 'ok' || gate.pulses.length === 0) {
      rows.push({ ...blank, kind: 'gate', channel: gate.channel, gatePositionM: gate.position, note: channel?.reason ?? 'missed' });
      continue;
    }
    for (const p of gate.pulses) {
      const full = channel?.pulses.find((x) => x.start === p.start && x.end === p.end);
      const at = { ...blank, channel: gate.channel, gatePositionM: gate.position };
      rows.push({ ...at, kind: 'crossing', edge: 'leading', direction: full?.entry.direction ?? null, timeS: p.start });
      rows.push({ ...at, kind: 'crossing', edge: 'trailing', direction: full?.exit.direction ?? null, timeS: p.end });
      rows.push({ ...at, kind: 'pulse', timeS: p.start, pulseWidthS: p.width });
    }
  }
  const speed = results?.speed;
  if (speed) rows.push({ ...blank, kind: 'speed', speedMps: speed.value, uncertaintyMps: speed.uncertainty, note: `${speed.method} (${speed.basis}), k = ${speed.coverage}` });
  for (const f of results?.flight ?? []) {
    rows.push({ ...blank, kind: 'flight', channel: `${f.from.channel} → ${f.to.channel}`, gatePositionM: f.to.position - f.from.position, speedMps: f.speed, uncertaintyMps: f.uncertainty, note: 'mean speed over the span, k = 2' });
  }
  for (const o of results?.occlusion ?? []) {
    rows.push({ ...blank, kind: 'occlusion', channel: o.channel, gatePositionM: o.position, pulseWidthS: o.width, speedMps: o.speed, uncertaintyMps: o.uncertainty, note: `length ${o.length} m, k = 2` });
  }
  return rows;
}
