import { z } from 'zod';
import { analysisOptionsSchema } from './analysis.ts';

/**
 * A shot's logged conditions, SI inside: the client converts from the units people type (kPa, mbar, °C) at the
 * edge. Every field of a new shot but the campaign may be filled in later.
 */
export const shotConditionsSchema = z.object({
  firedAt: z.iso.datetime({ offset: true }).nullable().optional(),
  projectileId: z.uuid().nullable().optional(),
  gateRigId: z.uuid().nullable().optional(),
  /** Absolute pressure in the tube before the shot, Pa (a vacuum level). */
  tubePressurePa: z.number().min(0, 'Tube pressure cannot be negative.').max(10_000_000).nullable().optional(),
  sealType: z.string().trim().max(200).optional(),
  /** Ambient air temperature, K (−60 °C to +60 °C covers any lab). */
  ambientTemperatureK: z.number().min(213.15, 'Ambient temperature looks wrong (below −60 °C).').max(333.15, 'Ambient temperature looks wrong (above 60 °C).').nullable().optional(),
  /** Ambient air pressure, Pa. */
  ambientPressurePa: z.number().min(30_000, 'Ambient pressure looks wrong (below 30 kPa).').max(120_000, 'Ambient pressure looks wrong (above 120 kPa).').nullable().optional(),
  notes: z.string().max(10_000).optional(),
});

export const createShotBody = shotConditionsSchema.extend({
  campaignId: z.uuid(),
  /** Shot number within the campaign; the next free number when left out. */
  number: z.number().int().positive().optional(),
});
export type CreateShotBody = z.infer<typeof createShotBody>;

/** What the campaign's last shot passes on to the next one when files arrive without a logged shot. */
export interface ShotSetUp {
  projectileId: string | null;
  gateRigId: string | null;
  conditions: { sealType: string; ambientTemperatureK: number | null; ambientPressurePa: number | null };
}

/**
 * The next shot of a campaign for files dropped on the campaign page or sent by the bench uploader: the last shot's
 * projectile, rig, seal and room conditions (to be checked on the shot page), fired now.
 */
export function nextShotBody(campaignId: string, last: ShotSetUp | undefined, notes: string, firedAt: string): CreateShotBody {
  return {
    campaignId,
    projectileId: last?.projectileId ?? null,
    gateRigId: last?.gateRigId ?? null,
    sealType: last?.conditions.sealType || undefined,
    ambientTemperatureK: last?.conditions.ambientTemperatureK ?? null,
    ambientPressurePa: last?.conditions.ambientPressurePa ?? null,
    firedAt,
    notes,
  };
}

export const updateShotBody = shotConditionsSchema;
export type UpdateShotBody = z.infer<typeof updateShotBody>;

export const requestAnalysisBody = z.object({
  /** The full or partial parameter set; what is left out takes the engine's defaults (not the previous version's). */
  parameters: z.lazy(() => analysisOptionsSchema),
});

/** POST /api/shots/:shotId/analyses/:analysisId/time-base-confirmation — "I checked the time base", saying how. */
export const timeBaseConfirmationBody = z.object({
  note: z.string().trim()
    .min(1, 'say what you checked (e.g. "the scope showed 100 ns per point; the file\'s interval matches")')
    .max(2000, 'note must be at most 2000 characters'),
});
export type TimeBaseConfirmationBody = z.infer<typeof timeBaseConfirmationBody>;

/** Importer overrides a person can set when detection got a file wrong (a subset of ParseScopeCsvOptions). */
export const importOverridesSchema = z
  .object({
    encoding: z.enum(['utf-8', 'latin1', 'utf-16le', 'utf-16be']),
    delimiter: z.enum([',', ';', '\t', 'whitespace']),
    decimalComma: z.boolean(),
    dataStartLine: z.number().int().min(1),
    headerRows: z.union([z.literal(0), z.literal(1), z.literal(2)]),
    timeColumn: z.number().int().min(0).nullable(),
    indexColumn: z.number().int().min(0).nullable(),
    timeUnit: z.enum(['s', 'ms', 'us', 'µs', 'ns']),
    t0: z.number(),
    dt: z.number().positive(),
    channelNames: z.array(z.string().trim().min(1).max(100)).max(64),
    channelUnits: z.array(z.string().max(20)).max(64),
  })
  .partial()
  .strict();
export type ImportOverrides = z.infer<typeof importOverridesSchema>;

export const reingestBody = z.object({ importOptions: importOverridesSchema.default({}) });

/**
 * The conditions a shot needs for its campaign's analysis and trends, with the reason shown on the forms. A shot
 * logged without one is marked "conditions missing" until it is filled in.
 */
export const NEEDED_CONDITIONS = [
  { key: 'gateRigId', label: 'gate rig', why: 'gate positions for the speed' },
  { key: 'projectileId', label: 'projectile', why: 'its length and mass, for the single-gate speed' },
  { key: 'tubePressurePa', label: 'tube vacuum', why: 'speed against vacuum level in the trends' },
  { key: 'ambientTemperatureK', label: 'ambient temperature', why: 'the speed of sound, for the Mach number' },
] as const;

/** Labels of the needed conditions a shot lacks, in NEEDED_CONDITIONS order. */
export function missingConditions(shot: {
  projectileId: string | null;
  gateRigId: string | null;
  conditions: { tubePressurePa: number | null; ambientTemperatureK: number | null };
}): string[] {
  const value = { gateRigId: shot.gateRigId, projectileId: shot.projectileId, ...shot.conditions };
  return NEEDED_CONDITIONS.filter((c) => value[c.key] == null).map((c) => c.label);
}
