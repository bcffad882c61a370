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
