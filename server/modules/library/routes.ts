import type { Request } from 'express';
import { col, fn, Op, UniqueConstraintError, where as sqlWhere } from 'sequelize';
import {
  GATE_RIG_MEASURED_FIELDS, gateRigBody, gateRigPatchBody, PROJECTILE_MEASURED_FIELDS, projectileBody, projectilePatchBody,
  type GateRigBody, type GateRigPatchBody, type ProjectileBody, type ProjectilePatchBody,
} from '../../../shared/contracts/library.ts';
import { GateRig, Projectile, Shot } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import { conflict, notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';

const projectileView = (p: Projectile) => ({
  id: p.id, name: p.name, material: p.material, diameterM: p.diameterM, diameterToleranceM: p.diameterToleranceM,
  massKg: p.massKg, massToleranceKg: p.massToleranceKg, notes: p.notes,
});

const gateRigView = (r: GateRig) => ({
  id: r.id, name: r.name, gates: r.gates, beamWidthM: r.beamWidthM, sensorType: r.sensorType, notes: r.notes,
});

type LibraryModel = typeof Projectile | typeof GateRig;

/**
 * Names are unique per lab regardless of case ("Exit rig" and "exit rig" would be told apart by nobody at a bench);
 * the database's own UNIQUE (lab_id, name) is case-sensitive, so this check comes first and gives the message.
 */
async function assertNameFree(model: LibraryModel, what: string, labId: string, name: string, exceptId?: string) {
  const clash = await (model as typeof Projectile).findOne({
    where: {
      labId,
      [Op.and]: [sqlWhere(fn('lower', col('name')), name.toLowerCase())],
      ...(exceptId ? { id: { [Op.ne]: exceptId } } : {}),
    },
    attributes: ['name'],
  });
  if (clash) throw conflict(`This lab already has a ${what} named "${clash.name}"; choose another name.`);
}

const nameTaken = (what: string, name: string) => conflict(`This lab already has a ${what} named "${name}"; choose another name.`);

/** JSON with object keys sorted: PostgreSQL's jsonb reorders keys, so plain JSON.stringify could see a change that is none. */
function canonical(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonical).join(',')}]`;
  if (value && typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonical(v)}`).join(',')}}`;
  }
  return JSON.stringify(value);
}

/** The measured fields a patch would really change (a value sent unchanged is no change). */
function changedFields(current: Record<string, unknown>, patch: Record<string, unknown>, fields: readonly string[]): string[] {
  return fields.filter((f) => patch[f] !== undefined && canonical(patch[f]) !== canonical(current[f]));
}

/**
 * A signed-off shot's numbers were computed from these values: changing them in place would make the library say
 * something else than what the signed-off result used. Names, material and notes may still be corrected.
 */
const FIELD_WORDS: Record<string, string> = {
  diameterM: 'diameter', diameterToleranceM: 'diameter tolerance', massKg: 'mass', massToleranceKg: 'mass tolerance',
  gates: 'gates', beamWidthM: 'beam width', sensorType: 'sensor type',
};

async function assertNoSignedOffUse(kind: 'projectile' | 'gate rig', column: 'projectileId' | 'gateRigId', id: string, labId: string, fields: string[]) {
  if (fields.length === 0) return;
  const signedOff = await Shot.count({ where: { labId, [column]: id, status: 'approved' } });
  if (signedOff > 0) {
    throw conflict(
      `This ${kind} is used by ${signedOff} signed-off shot${signedOff === 1 ? '' : 's'}, so its measured values (${fields.map((f) => FIELD_WORDS[f] ?? f).join(', ')}) cannot change. ` +
        `Save your values as a new entry instead (use a new name), and pick it for new shots.`,
    );
  }
}

const audit = (req: Request, action: string, targetType: string, targetId: string, details: Record<string, unknown>) =>
  recordAudit({ labId: req.lab!.id, actorId: req.auth!.userId, action, targetType, targetId, details, ip: clientIp(req) });

export function libraryRoutes(): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/projectiles',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: "The lab's projectiles (SI: metres, kilograms)",
      async handler(req, res) {
        const rows = await Projectile.findAll({ where: { labId: req.lab!.id }, order: [['name', 'ASC']] });
        res.json({ projectiles: rows.map(projectileView) });
      },
    },
    {
      method: 'post',
      path: '/api/labs/:labId/projectiles',
      access: { kind: 'lab', permission: 'library:write' },
      summary: 'Add a projectile to the library (SI: metres, kilograms)',
      response: { status: 201, description: 'The new projectile' },
      body: projectileBody,
      async handler(req, res) {
        const body = req.body as ProjectileBody;
        const labId = req.lab!.id;
        await assertNameFree(Projectile, 'projectile', labId, body.name);
        try {
          const p = await Projectile.create({ labId, ...body });
          await audit(req, 'projectile.created', 'projectile', p.id, { after: projectileView(p) });
          res.status(201).json({ projectile: projectileView(p) });
        } catch (err) {
          if (err instanceof UniqueConstraintError) throw nameTaken('projectile', body.name);
          throw err;
        }
      },
    },
    {
      method: 'patch',
      path: '/api/labs/:labId/projectiles/:projectileId',
      access: { kind: 'lab', permission: 'library:write' },
      summary: "Correct a projectile; its measured values are locked once a signed-off shot uses it",
      body: projectilePatchBody,
      async handler(req, res) {
        const body = req.body as ProjectilePatchBody;
        const labId = req.lab!.id;
        const p = await Projectile.findOne({ where: { id: req.params.projectileId as string, labId } });
        if (!p) throw notFound('No such projectile in this lab.');
        const before = projectileView(p);
        await assertNoSignedOffUse('projectile', 'projectileId', p.id, labId, changedFields(before, body, PROJECTILE_MEASURED_FIELDS));
        if (body.name !== undefined) await assertNameFree(Projectile, 'projectile', labId, body.name, p.id);
        try {
          await p.update(body);
        } catch (err) {
          if (err instanceof UniqueConstraintError) throw nameTaken('projectile', body.name ?? p.name);
          throw err;
        }
        await audit(req, 'projectile.updated', 'projectile', p.id, { before, after: projectileView(p) });
        res.json({ projectile: projectileView(p) });
      },
    },
    {
      method: 'get',
      path: '/api/labs/:labId/gate-rigs',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: "The lab's gate rigs: gate positions along the path with their uncertainty, beam width, sensor type",
      async handler(req, res) {
        const rows = await GateRig.findAll({ where: { labId: req.lab!.id }, order: [['name', 'ASC']] });
        res.json({ gateRigs: rows.map(gateRigView) });
      },
    },
    {
      method: 'post',
      path: '/api/labs/:labId/gate-rigs',
      access: { kind: 'lab', permission: 'library:write' },
      summary: 'Add a gate rig: gates in flight order with positions (m) and their uncertainty, beam width, sensor type',
      response: { status: 201, description: 'The new gate rig' },
      body: gateRigBody,
      async handler(req, res) {
        const body = req.body as GateRigBody;
        const labId = req.lab!.id;
        await assertNameFree(GateRig, 'gate rig', labId, body.name);
        try {
          const r = await GateRig.create({ labId, ...body });
          await audit(req, 'gate_rig.created', 'gate_rig', r.id, { after: gateRigView(r) });
          res.status(201).json({ gateRig: gateRigView(r) });
        } catch (err) {
          if (err instanceof UniqueConstraintError) throw nameTaken('gate rig', body.name);
          throw err;
        }
      },
    },
    {
      method: 'patch',
      path: '/api/labs/:labId/gate-rigs/:gateRigId',
      access: { kind: 'lab', permission: 'library:write' },
      summary: 'Correct a gate rig; its gates, beam width and sensor are locked once a signed-off shot uses it',
      body: gateRigPatchBody,
      async handler(req, res) {
        const body = req.body as GateRigPatchBody;
        const labId = req.lab!.id;
        const r = await GateRig.findOne({ where: { id: req.params.gateRigId as string, labId } });
        if (!r) throw notFound('No such gate rig in this lab.');
        const before = gateRigView(r);
        await assertNoSignedOffUse('gate rig', 'gateRigId', r.id, labId, changedFields(before, body, GATE_RIG_MEASURED_FIELDS));
        if (body.name !== undefined) await assertNameFree(GateRig, 'gate rig', labId, body.name, r.id);
        try {
          await r.update(body);
        } catch (err) {
          if (err instanceof UniqueConstraintError) throw nameTaken('gate rig', body.name ?? r.name);
          throw err;
        }
        await audit(req, 'gate_rig.updated', 'gate_rig', r.id, { before, after: gateRigView(r) });
        res.json({ gateRig: gateRigView(r) });
      },
    },
  ];
}
