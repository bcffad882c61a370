/**
 * Analysis settings a campaign keeps as its default and a batch recompute applies to many shots: the detection part
 * of the parameter set (threshold and hysteresis, smoothing, polarity, edges, gate mapping). Each shot keeps its own
 * projectile, ambient conditions and tolerances; settings left out keep each shot's own.
 */
import * as z from 'zod';
import { gateSchema, smoothingSchema, thresholdSchema, type AnalysisOptionsInput } from './analysis.ts';

export const analysisSettingsSchema = z
  .object({
    threshold: thresholdSchema.optional(),
    /** null: no smoothing. */
    smoothing: smoothingSchema.nullable().optional(),
    polarity: z.enum(['auto', 'falling', 'rising']).optional(),
    edges: z.enum(['both', 'leading', 'trailing']).optional(),
    /** Which channel is which gate and where (m along the path). */
    gates: z.array(gateSchema).min(1).optional(),
  })
  .strict();
export type AnalysisSettings = z.infer<typeof analysisSettingsSchema>;

/** The keys a settings object may carry, in the order they are shown. */
export const SETTINGS_KEYS = ['threshold', 'smoothing', 'polarity', 'edges', 'gates'] as const;

/** A shot's parameters with the given settings laid over them; keys the settings leave out are kept. */
export function applySettings(parameters: AnalysisOptionsInput, settings: AnalysisSettings | null | undefined): AnalysisOptionsInput {
  const out: AnalysisOptionsInput = { ...parameters };
  if (!settings) return out;
  for (const key of SETTINGS_KEYS) {
    if (settings[key] !== undefined) (out as Record<string, unknown>)[key] = settings[key];
  }
  return out;
}

/** PUT /api/labs/:labId/campaigns/:campaignId/analysis-settings: the campaign's defaults, or null to clear them. */
export const campaignSettingsBody = z.object({ settings: analysisSettingsSchema.nullable() });
export type CampaignSettingsBody = z.infer<typeof campaignSettingsBody>;

/** POST /api/labs/:labId/campaigns/:campaignId/batches: settings for chosen shots (by id) or for all of them. */
export const batchRequestBody = z
  .object({
    settings: analysisSettingsSchema.refine((s) => Object.keys(s).length > 0, 'name at least one setting to apply'),
    shotIds: z.array(z.uuid('each shot id must be a shot id')).min(1, 'choose at least one shot').max(1000).optional(),
    all: z.boolean().optional(),
  })
  .refine((b) => (b.shotIds !== undefined) !== (b.all === true), {
    message: 'choose the shots with shotIds, or send "all": true for every shot of the campaign (not both)',
    path: ['shotIds'],
  });
export type BatchRequestBody = z.infer<typeof batchRequestBody>;
