import * as z from 'zod';
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

/** Every condition a campaign can ask its shots for, with the reason shown on the forms. */
export const CONDITIONS = {
  gateRigId: { key: 'gateRigId', label: 'gate rig', why: 'gate positions for the speed' },
  projectileId: { key: 'projectileId', label: 'projectile', why: 'its length and mass, for the single-gate speed and the energy' },
  tubePressurePa: { key: 'tubePressurePa', label: 'tube vacuum', why: 'speed against vacuum level in the trends' },
  ambientTemperatureK: { key: 'ambientTemperatureK', label: 'ambient temperature', why: 'the speed of sound, for the Mach number' },
  ambientPressurePa: { key: 'ambientPressurePa', label: 'ambient pressure', why: 'the outside air that drives the launcher model' },
} as const;
export type ConditionKey = keyof typeof CONDITIONS;
export type NeededCondition = (typeof CONDITIONS)[ConditionKey];

/**
 * Mach 0.3 at 15 °C (c = 340.294 m/s, U.S. Standard Atmosphere 1976): below it the air around the projectile behaves
 * as incompressible and a Mach number says nothing a lab needs (the 0.3 limit is common practice in aerodynamics).
 */
export const MACH_MATTERS_FROM_MS = 0.3 * 340.294;

/** What decides which conditions a campaign's shots need: read from the campaign and its shots by the server. */
export interface CampaignConditionFacts {
  /** The campaign's launcher tube is logged (length or bore): the trends page's launcher model predicts from it. */
  launcher: boolean;
  /** At least one of the campaign's shots logged its tube vacuum (a vacuum sweep, seals compared at a stated vacuum). */
  vacuumLogged: boolean;
  /** The fastest speed measured among the campaign's shots (not counting results marked "check the time base"), m/s. */
  fastestSpeedMs: number | null;
}

/**
 * The conditions a shot needs for its campaign's analysis and trends, in form order. Always the gate rig and the
 * projectile. Tube vacuum when the campaign studies it: its launcher tube is logged (speed against vacuum, launcher
 * model) or its shots log the vacuum (a shot without it drops out of the speed-against-vacuum plot and the vacuum
 * groups). Ambient temperature when the Mach number means something: a launcher campaign (near-sonic speeds) or a
 * shot measured at Mach 0.3 or more. Ambient pressure when the launcher model needs the outside air. A drop tower or
 * any slow campaign without a tube therefore asks for the rig and the projectile only.
 */
export function neededConditions(facts: CampaignConditionFacts): NeededCondition[] {
  const needs: NeededCondition[] = [CONDITIONS.gateRigId, CONDITIONS.projectileId];
  if (facts.launcher || facts.vacuumLogged) needs.push(CONDITIONS.tubePressurePa);
  if (facts.launcher || (facts.fastestSpeedMs != null && facts.fastestSpeedMs >= MACH_MATTERS_FROM_MS)) needs.push(CONDITIONS.ambientTemperatureK);
  if (facts.launcher) needs.push(CONDITIONS.ambientPressurePa);
  return needs;
}

/**
 * Labels of the needed conditions a shot lacks, in `needed` order: what "conditions missing" lists. A shot logged
 * without one is marked until it is filled in.
 */
export function missingConditions(
  shot: {
    projectileId: string | null;
    gateRigId: string | null;
    conditions: { tubePressurePa: number | null; ambientTemperatureK: number | null; ambientPressurePa?: number | null };
  },
  needed: readonly NeededCondition[],
): string[] {
  const value: Record<ConditionKey, unknown> = {
    gateRigId: shot.gateRigId, projectileId: shot.projectileId, tubePressurePa: shot.conditions.tubePressurePa,
    ambientTemperatureK: shot.conditions.ambientTemperatureK, ambientPressurePa: shot.conditions.ambientPressurePa ?? null,
  };
  return needed.filter((c) => value[c.key] == null).map((c) => c.label);
}
