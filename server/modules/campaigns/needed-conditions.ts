import { QueryTypes } from 'sequelize';
import { neededConditions, type CampaignConditionFacts, type NeededCondition } from '../../../shared/contracts/shots.ts';
import { Shot, type Campaign } from '../../db/models/index.ts';

/**
 * The conditions each campaign's shots need (shared/contracts/shots.ts `neededConditions`), from the campaign's
 * launcher and what its (not deleted) shots logged and measured, in one query for any number of campaigns. A speed
 * marked "check the time base" and not confirmed does not count: a misread time base can give any speed.
 */
export async function campaignNeeds(campaigns: Pick<Campaign, 'id' | 'labId' | 'tubeLengthM' | 'boreM'>[]): Promise<Map<string, NeededCondition[]>> {
  const needs = new Map<string, NeededCondition[]>();
  if (campaigns.length === 0) return needs;
  const rows = await Shot.sequelize!.query<{ campaign_id: string; vacuum_logged: boolean; fastest: number | null }>(
    `SELECT s.campaign_id,
            bool_or(s.tube_pressure_pa IS NOT NULL) AS vacuum_logged,
            max(CASE WHEN jsonb_typeof(a.results -> 'speed' -> 'value') = 'number'
                      AND (a.results -> 'timeBaseCheck' ->> 'flagged' IS DISTINCT FROM 'true' OR a.time_base_confirmed_at IS NOT NULL)
                     THEN (a.results -> 'speed' ->> 'value')::double precision END) AS fastest
       FROM shots s
       LEFT JOIN analyses a ON a.id = s.current_analysis_id AND a.lab_id = s.lab_id AND a.state = 'done'
      WHERE s.campaign_id IN (:ids) AND s.lab_id IN (:labs) AND s.deleted_at IS NULL
      GROUP BY s.campaign_id`,
    { type: QueryTypes.SELECT, replacements: { ids: campaigns.map((c) => c.id), labs: [...new Set(campaigns.map((c) => c.labId))] } },
  );
  const byCampaign = new Map(rows.map((r) => [r.campaign_id, r]));
  for (const c of campaigns) {
    const r = byCampaign.get(c.id);
    const facts: CampaignConditionFacts = {
      launcher: c.tubeLengthM != null || c.boreM != null,
      vacuumLogged: r?.vacuum_logged === true,
      fastestSpeedMs: r?.fastest == null ? null : Number(r.fastest),
    };
    needs.set(c.id, neededConditions(facts));
  }
  return needs;
}
