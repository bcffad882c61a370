import { readFileSync } from 'node:fs';
import type { Sequelize } from 'sequelize';
import type { Role } from '../../../shared/contracts/roles.ts';
import { hashPassword } from '../../lib/passwords.ts';
import { Campaign, GateRig, Lab, Membership, Projectile, Shot, User } from '../models/index.ts';

/*
 * The demo scenario (invented for Gatepost, every name and number fictional): the Hollowmere Ballistics Lab runs
 * an evacuated-tube launcher for table-tennis balls and times it with a three-gate rig at the tube exit. A second
 * small lab, Sandgate Impact Group, exists so that lab isolation can be seen and tested.
 */

interface DemoAccount { email: string; password: string; role: Role; name: string; lab: 'hollowmere' | 'sandgate' }

export const demoAccounts: DemoAccount[] = JSON.parse(
  readFileSync(new URL('./demo-accounts.json', import.meta.url), 'utf8'),
) as DemoAccount[];

const kPa = 1000;

// The demo accounts share two passwords; hashing each once per process keeps repeated seeding (tests) cheap.
const hashes = new Map<string, Promise<string>>();
const demoHash = (password: string) => {
  if (!hashes.has(password)) hashes.set(password, hashPassword(password));
  return hashes.get(password)!;
};
const celsius = (c: number) => c + 273.15;

/** Seeds the demo labs when they are absent; returns false when they already exist (a second start changes nothing). */
export async function seedDemo(sequelize: Sequelize): Promise<boolean> {
  if (await Lab.findOne({ where: { slug: 'hollowmere' } })) return false;
  await sequelize.transaction(async (transaction) => {
    const hollowmere = await Lab.create({ name: 'Hollowmere Ballistics Lab', slug: 'hollowmere' }, { transaction });
    const sandgate = await Lab.create({ name: 'Sandgate Impact Group', slug: 'sandgate' }, { transaction });
    const labs = { hollowmere, sandgate };
    const users: Record<string, User> = {};
    for (const account of demoAccounts) {
      const user = await User.create(
        { email: account.email, name: account.name, passwordHash: await demoHash(account.password) },
        { transaction },
      );
      users[account.email] = user;
      await Membership.create({ labId: labs[account.lab].id, userId: user.id, role: account.role }, { transaction });
    }
    const experimenter = users['tomas.reyl@hollowmere.example'];

    const ball = await Projectile.create({
      labId: hollowmere.id, name: 'Table-tennis ball, 40 mm', material: 'celluloid-free plastic',
      // 40 mm and 2.7 g are the ITTF nominal values (Laws 2.3.1–2.3.2); the tolerances are the demo lab's own.
      diameterM: 0.040, diameterToleranceM: 0.0001, massKg: 0.0027, massToleranceKg: 0.00005,
      notes: 'Weighed in batches of ten on the lab balance.',
    }, { transaction });
    await Projectile.create({
      labId: hollowmere.id, name: 'Foam sphere, 38 mm', material: 'closed-cell foam',
      diameterM: 0.038, diameterToleranceM: 0.0003, massKg: 0.0011, massToleranceKg: 0.0001,
      notes: 'Soft target tests only.',
    }, { transaction });
    const rig = await GateRig.create({
      labId: hollowmere.id, name: 'Exit rig, three gates',
      gates: [
        { label: 'A', position_m: 0, position_uncertainty_m: 0.0005 },
        { label: 'B', position_m: 0.15, position_uncertainty_m: 0.0005 },
        { label: 'C', position_m: 0.3, position_uncertainty_m: 0.0005 },
      ],
      beamWidthM: 0.001, sensorType: 'phototransistor',
      notes: 'Gates on one aluminium rail, 150 mm pitch, measured with a steel rule.',
    }, { transaction });
    await Projectile.create({
      labId: sandgate.id, name: 'Steel ball, 25.4 mm', material: 'chrome steel',
      // A 1 inch bearing ball: (4/3)·π·(12.7 mm)³ × 7.85 g/cm³ (a handbook density of steel, from memory) = 67.4 g.
      diameterM: 0.0254, diameterToleranceM: 0.00001, massKg: 0.0674, massToleranceKg: 0.0002,
      notes: 'Bearing ball for the drop calibration.',
    }, { transaction });
    await GateRig.create({
      labId: sandgate.id, name: 'Drop tower pair',
      gates: [
        { label: 'Upper', position_m: 0, position_uncertainty_m: 0.001 },
        { label: 'Lower', position_m: 0.5, position_uncertainty_m: 0.001 },
      ],
      beamWidthM: 0.002, sensorType: 'photodiode', notes: '',
    }, { transaction });

    const sweep = await Campaign.create({
      labId: hollowmere.id, name: 'Vacuum sweep, autumn 2026',
      description: 'Exit speed against tube pressure, one seal type, same ball batch.',
      startedOn: '2026-10-12', tubeLengthM: 2, boreM: 0.0405, createdBy: experimenter.id,
    }, { transaction });
    await Campaign.create({
      labId: hollowmere.id, name: 'Seal comparison',
      description: 'Three seal materials at the lowest pressure the pump reaches.',
      startedOn: '2026-11-20', createdBy: experimenter.id,
    }, { transaction });
    await Campaign.create({
      labId: sandgate.id, name: 'Drop calibration', description: 'Free-fall check of the gate pair.',
      startedOn: '2026-09-01', createdBy: users['sam.whitlow@sandgate.example'].id,
    }, { transaction });

    const pressuresKpa = [12.0, 8.5, 6.0, 4.2, 3.0, 2.1, 1.5, 1.1];
    for (let i = 0; i < pressuresKpa.length; i++) {
      await Shot.create({
        labId: hollowmere.id, campaignId: sweep.id, number: i + 1,
        firedAt: new Date(Date.UTC(2026, 9, 12 + Math.floor(i / 3), 9 + (i % 3) * 2, 15)),
        projectileId: ball.id, gateRigId: rig.id,
        tubePressurePa: pressuresKpa[i] * kPa, sealType: 'Polyester film, 50 µm',
        ambientTemperatureK: celsius(19.5 + (i % 3) * 0.5), ambientPressurePa: 100.9 * kPa,
        notes: i === 5 ? 'Gate C alignment checked before this shot.' : '',
        createdBy: experimenter.id,
      }, { transaction });
    }
  });
  return true;
}

/** The seals of the demo's seal comparison, with the absolute pressure at which each lets go (invented for the demo). */
export const DEMO_SEALS = [
  { sealType: 'Polyester film, 50 µm', exitSealPressurePa: null },
  { sealType: 'Aluminium foil, 20 µm', exitSealPressurePa: 150_000 },
  { sealType: 'Kraft paper, 80 g/m²', exitSealPressurePa: 200_000 },
] as const;

/** Heights above the upper gate from which the demo's drop calibration releases its ball, m (invented). */
export const DEMO_DROP_HEIGHTS_M = [0.2, 0.35, 0.5, 0.8];

/**
 * The demo's second campaign and second lab get a few shots each (their scope files come from demo-captures.ts):
 * Hollowmere's seal comparison, two shots per seal at the best vacuum its pump reaches, and Sandgate's drop
 * calibration, a steel ball dropped through its two gates from four heights. Separate from seedDemo, which the
 * tests use as their base world. Only campaigns without shots get them; returns how many shots were made.
 */
export async function seedDemoMoreShots(sequelize: Sequelize): Promise<number> {
  const hollowmere = await Lab.findOne({ where: { slug: 'hollowmere' } });
  const sandgate = await Lab.findOne({ where: { slug: 'sandgate' } });
  if (!hollowmere || !sandgate) return 0;
  const seals = await Campaign.findOne({ where: { labId: hollowmere.id, name: 'Seal comparison' } });
  const drops = await Campaign.findOne({ where: { labId: sandgate.id, name: 'Drop calibration' } });
  const [tomas, sam] = await Promise.all([
    User.findOne({ where: { email: 'tomas.reyl@hollowmere.example' } }),
    User.findOne({ where: { email: 'sam.whitlow@sandgate.example' } }),
  ]);
  const [ball, rig, steel, pair] = await Promise.all([
    Projectile.findOne({ where: { labId: hollowmere.id, name: 'Table-tennis ball, 40 mm' } }),
    GateRig.findOne({ where: { labId: hollowmere.id, name: 'Exit rig, three gates' } }),
    Projectile.findOne({ where: { labId: sandgate.id, name: 'Steel ball, 25.4 mm' } }),
    GateRig.findOne({ where: { labId: sandgate.id, name: 'Drop tower pair' } }),
  ]);
  let made = 0;
  await sequelize.transaction(async (transaction) => {
    if (seals && ball && rig && (await Shot.count({ where: { campaignId: seals.id }, transaction })) === 0) {
      for (let i = 0; i < 6; i++) {
        const seal = DEMO_SEALS[i % 3];
        await Shot.create({
          labId: hollowmere.id, campaignId: seals.id, number: i + 1,
          firedAt: new Date(Date.UTC(2026, 10, 20 + Math.floor(i / 3), 10 + (i % 3), 40)),
          projectileId: ball.id, gateRigId: rig.id,
          // The best the pump reaches drifts a little from shot to shot.
          tubePressurePa: [1.05, 1.1, 1.0, 1.05, 1.1, 1.0][i] * kPa, sealType: seal.sealType,
          ambientTemperatureK: celsius(20.5 + (i % 2) * 0.5), ambientPressurePa: 101.2 * kPa,
          notes: i === 2 ? 'Paper seal torn cleanly; fibres in the catch box.' : '',
          createdBy: tomas?.id ?? null,
        }, { transaction });
        made++;
      }
    }
    if (drops && steel && pair && (await Shot.count({ where: { campaignId: drops.id }, transaction })) === 0) {
      for (const [i, h] of DEMO_DROP_HEIGHTS_M.entries()) {
        await Shot.create({
          labId: sandgate.id, campaignId: drops.id, number: i + 1,
          firedAt: new Date(Date.UTC(2026, 8, 1, 14, 10 + 5 * i)),
          projectileId: steel.id, gateRigId: pair.id, tubePressurePa: null, sealType: '',
          ambientTemperatureK: celsius(22), ambientPressurePa: 100.4 * kPa,
          notes: `Released ${Math.round(h * 1000)} mm above the upper gate.`,
          createdBy: sam?.id ?? null,
        }, { transaction });
        made++;
      }
    }
  });
  return made;
}

