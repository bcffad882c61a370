import * as z from 'zod';

/**
 * The lab's library: projectiles and gate rigs, SI inside (metres, kilograms). The client's forms take millimetres
 * and grams and convert at the edge, then validate with these same schemas; the server validates the request body
 * with them. Messages name the quantity in lab units so a person knows what to fix.
 */

const name = z.string().trim().min(1, 'Give it a name.').max(200, 'Keep the name under 200 characters.');
const notes = z.string().max(5000, 'Keep the notes under 5000 characters.');
const nonNegative = (what: string) => z.number({ error: `${what}: enter a number.` }).min(0, `${what} cannot be negative.`);

export const projectileFields = {
  name,
  material: z.string().trim().max(200),
  /** Diameter (the length a centred beam cuts), m: 0.1 mm to 1 m covers any launcher we know of. */
  diameterM: z.number({ error: 'Diameter: enter a number.' }).gt(0, 'Diameter must be greater than 0 mm.').max(1, 'Diameter looks wrong (over 1000 mm).'),
  /** Half-width of the diameter's spread (a rectangular tolerance), m. */
  diameterToleranceM: nonNegative('Diameter tolerance').max(0.1, 'Diameter tolerance looks wrong (over 100 mm).'),
  /** Mass, kg: 1 mg to 100 kg. */
  massKg: z.number({ error: 'Mass: enter a number.' }).gt(0, 'Mass must be greater than 0 g.').max(100, 'Mass looks wrong (over 100 kg).'),
  massToleranceKg: nonNegative('Mass tolerance').max(10, 'Mass tolerance looks wrong (over 10 kg).'),
  notes,
};

export const projectileBody = z.object({ ...projectileFields, material: projectileFields.material.default(''), notes: notes.default('') });
export type ProjectileBody = z.infer<typeof projectileBody>;

/** A correction: any subset of the fields. */
export const projectilePatchBody = z
  .object(projectileFields)
  .partial()
  .refine((b) => Object.keys(b).length > 0, 'Nothing to change: send at least one field.');
export type ProjectilePatchBody = z.infer<typeof projectilePatchBody>;

export const SENSOR_TYPES = ['photodiode', 'phototransistor', 'photodarlington', 'other'] as const;
export type SensorType = (typeof SENSOR_TYPES)[number];

/** One light gate on the rig: its position along the flight path from the rig's origin and that position's uncertainty. */
export const rigGateSchema = z.object({
  label: z.string().trim().min(1, 'Give the gate a label (A, B, …).').max(40, 'Keep gate labels under 40 characters.'),
  /** Position along the flight path, m (may be negative when the origin is not the first gate). */
  position_m: z.number({ error: 'Gate position: enter a number.' }).min(-100).max(100, 'Gate position looks wrong (over 100 m).'),
  /** Standard uncertainty of the position, m. */
  position_uncertainty_m: nonNegative('Gate position uncertainty').max(1, 'Gate position uncertainty looks wrong (over 1000 mm).'),
});
export type RigGate = z.infer<typeof rigGateSchema>;

/**
 * Gates in flight order: positions strictly increase (the speed is a distance over a time, and a zero or negative
 * spacing would divide by nothing or reverse the flight), labels are unique (they name the gate in results).
 */
export const rigGatesSchema = z
  .array(rigGateSchema)
  .min(1, 'A rig needs at least one gate.')
  .max(32, 'A rig has at most 32 gates.')
  .superRefine((gates, ctx) => {
    const seen = new Map<string, number>();
    for (let i = 0; i < gates.length; i++) {
      const label = gates[i].label.trim().toLowerCase();
      const first = seen.get(label);
      if (first !== undefined) {
        ctx.addIssue({ code: 'custom', path: [i, 'label'], message: `Gate ${i + 1} has the same label as gate ${first + 1}; labels must differ.` });
      } else {
        seen.set(label, i);
      }
      if (i > 0 && !(gates[i].position_m > gates[i - 1].position_m)) {
        ctx.addIssue({
          code: 'custom',
          path: [i, 'position_m'],
          message: `Gate ${i + 1} (${gates[i].label}) must lie further along the path than gate ${i} (${gates[i - 1].label}): positions must strictly increase in flight order.`,
        });
      }
    }
  });

export const gateRigFields = {
  name,
  gates: rigGatesSchema,
  /** Width of the light beam along the flight path, m. */
  beamWidthM: nonNegative('Beam width').max(0.1, 'Beam width looks wrong (over 100 mm).'),
  sensorType: z.enum(SENSOR_TYPES, { error: `Sensor type: choose one of ${SENSOR_TYPES.join(', ')}.` }),
  notes,
};

export const gateRigBody = z.object({ ...gateRigFields, notes: notes.default('') });
export type GateRigBody = z.infer<typeof gateRigBody>;

export const gateRigPatchBody = z
  .object(gateRigFields)
  .partial()
  .refine((b) => Object.keys(b).length > 0, 'Nothing to change: send at least one field.');
export type GateRigPatchBody = z.infer<typeof gateRigPatchBody>;

/** The fields of each entry that feed a shot's numbers; edits to them are refused once a signed-off shot uses the entry. */
export const PROJECTILE_MEASURED_FIELDS = ['diameterM', 'diameterToleranceM', 'massKg', 'massToleranceKg'] as const;
export const GATE_RIG_MEASURED_FIELDS = ['gates', 'beamWidthM', 'sensorType'] as const;
