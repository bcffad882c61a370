// The authorization matrix: every API route, called by each Hollowmere role, by another lab's admin and by nobody,
// must answer exactly the status written in MATRIX below. The expected codes are written out by hand (from the
// product's role design in issue 2), never computed from shared/contracts/roles.ts, so a wrong entry in PERMISSIONS
// or a wrong `access` on a route makes this test fail. Lab routes address Hollowmere's records, so Sandgate's admin
// must be told 404: the API hides other labs' records as if they did not exist.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { allRoutes } from '../../server/app.ts';
import { createHash } from 'node:crypto';
import type { ImportedCapture } from '../../shared/contracts/capture.ts';
import { Analysis, AnalysisBatch, ApiToken, Campaign, Capture, GateRig, Invitation, Membership, PasswordReset, Projectile, Shot, User } from '../../server/db/models/index.ts';
import { writeChannelFiles } from '../../server/traces/write-channel-files.ts';
import { newApiToken, newInvitationSecret, newPasswordResetSecret, signSession } from '../../server/lib/tokens.ts';
import { SESSION_COOKIE } from '../../server/lib/authenticate.ts';
import { hashPassword } from '../../server/lib/passwords.ts';
import { readStreamStart } from '../helpers/stream-start.ts';
import { createApiHarness, type ApiHarness, type DemoActor, type DemoUser, type DemoWorld } from '../helpers/api-harness.ts';

/** Column order of every row. `null` is the signed-out caller. */
const ACTORS = ['admin', 'experimenter', 'analyst', 'reviewer', 'otherLabAdmin', null] as const satisfies readonly (DemoActor | null)[];
type Actor = (typeof ACTORS)[number];
type Expected = [admin: number, experimenter: number, analyst: number, reviewer: number, otherLabAdmin: number, signedOut: number];

/** How signed-in callers prove who they are: the browser's session cookie or a personal API token. */
type Credential = 'session' | 'token';

interface CaseContext {
  h: ApiHarness;
  demo: DemoWorld;
  actor: Actor;
  /** The acting user; null when signed out. */
  user: DemoUser | null;
  credential: Credential;
  /** Headers carrying a new credential of this kind for the acting user (none when signed out). */
  freshAuth: () => Promise<Record<string, string>>;
}

interface Prepared {
  /** Path parameters besides the defaults (Hollowmere's lab, first campaign, first shot). */
  params?: Record<string, string>;
  body?: unknown;
  /** Replace the acting user's credential headers (e.g. a fresh session to sign out). */
  headers?: Record<string, string>;
  /** A multipart file upload instead of a JSON body. */
  attach?: { field: string; name: string; content: string };
}

interface Row {
  expect: Expected;
  /** The answers to an API token where they differ (routes only a browser session may use). @default expect */
  tokenExpect?: Expected;
  /** Makes a fresh target for this one call, so cases cannot disturb each other. */
  prepare?: (ctx: CaseContext) => Promise<Prepared> | Prepared;
  /** Checks the JSON of a successful answer. */
  shape?: (body: Record<string, unknown>, ctx: CaseContext) => void;
  /** The answer is a stream that stays open: read its first frame, check it with `shape` ({ text }), hang up. */
  stream?: true;
}

let serial = 0;
const unique = (what: string) => `${what}-${Date.now().toString(36)}-${(serial++).toString(36)}`;

/** A new Hollowmere member (no argon2: the hash is never checked), to be re-roled or removed. */
async function freshMember(demo: DemoWorld): Promise<string> {
  const user = await User.create({ email: `${unique('member')}@hollowmere.example`, name: 'Matrix Member', passwordHash: 'not-used' });
  await Membership.create({ labId: demo.labs.hollowmere.id, userId: user.id, role: 'analyst' });
  return user.id;
}

const THROWAWAY_PASSWORD = 'throwaway password 12a';
let throwawayHash: Promise<string> | undefined;

/** An account of its own (in no lab) with a known password, for the rows that change the caller's account. */
async function throwawayAccount(): Promise<User> {
  throwawayHash ??= hashPassword(THROWAWAY_PASSWORD);
  return User.create({ email: `${unique('throwaway')}@example.org`, name: 'Matrix Throwaway', passwordHash: await throwawayHash });
}

/** Credential headers of a given account, of the kind under test. */
async function credentialOf(userId: string, credential: Credential): Promise<Record<string, string>> {
  if (credential === 'token') return apiTokenHeader(userId);
  const { token } = signSession(userId, matrixJwtSecret, 1);
  return { Cookie: `${SESSION_COOKIE}=${token}` };
}
let matrixJwtSecret = '';

/** A pending Hollowmere invitation whose secret link the test knows. */
async function freshInvitation(demo: DemoWorld): Promise<{ id: string; secret: string }> {
  const { secret, hash } = newInvitationSecret();
  const inv = await Invitation.create({
    labId: demo.labs.hollowmere.id, email: `${unique('invitee')}@example.org`, role: 'experimenter', tokenHash: hash,
    invitedBy: demo.users.admin.id, expiresAt: new Date(Date.now() + 86_400_000),
  });
  return { id: inv.id, secret };
}

/** A two-channel capture small enough to write per case (values in volts, 1 µs samples). */
function tinyCapture(): ImportedCapture {
  const n = 200;
  const a = new Float64Array(n).map((_, i) => (i > 50 && i < 90 ? 0.2 : 4.8));
  const b = new Float64Array(n).map((_, i) => (i > 120 && i < 160 ? 0.2 : 4.8));
  return {
    channels: [
      { name: 'CH1', unit: 'V', sourceUnit: 'V', values: a, invalidCount: 0 },
      { name: 'CH2', unit: 'V', sourceUnit: 'V', values: b, invalidCount: 0 },
    ],
    time: { kind: 'uniform', t0: 0, dt: 1e-6, jitter: 0 },
    length: n,
    metadata: {},
    layout: {},
    warnings: [],
  };
}

/** A new Hollowmere shot with one capture in the given state (ready ones get real channel files). */
async function freshShotWithCapture(h: ApiHarness, state: 'ready' | 'failed'): Promise<{ shotId: string; captureId: string }> {
  const demo = h.demo;
  const shot = await Shot.create({
    labId: demo.labs.hollowmere.id, campaignId: demo.hollowmere.campaignIds[0], number: 1000 + serial++, firedAt: null,
    projectileId: null, gateRigId: null, tubePressurePa: null, ambientTemperatureK: null, ambientPressurePa: null, createdBy: null,
  });
  const sha256 = createHash('sha256').update(unique('capture')).digest('hex');
  const capture = await Capture.create({
    labId: shot.labId, shotId: shot.id, fileName: 'matrix.csv', sizeBytes: 10, sha256, storageKey: `labs/${shot.labId}/raw/${sha256}`,
    uploadedBy: null, state, error: state === 'failed' ? 'line 3: expected 3 numbers' : null,
  });
  if (state === 'ready') {
    const descriptor = await writeChannelFiles(h.deps.blobStore, shot.labId, capture.id, tinyCapture());
    await capture.update({ channels: descriptor, sampleCount: 200, timeBase: descriptor.time });
  }
  return { shotId: shot.id, captureId: capture.id };
}

/** Two finished analysis versions of a fresh shot, made straight in the database. */
async function freshAnalyses(h: ApiHarness): Promise<{ shotId: string; analysisId: string; otherId: string }> {
  const { shotId } = await freshShotWithCapture(h, 'ready');
  const make = (version: number, level: number) =>
    Analysis.create({
      labId: h.demo.labs.hollowmere.id, shotId, version, parameters: { threshold: { level } }, engineVersion: 'matrix',
      jobKey: unique('matrix-analysis'), requestedBy: null, state: 'done', results: { speed: { value: 200 + version } } as object,
    });
  const [a, b] = [await make(1, 50), await make(2, 40)];
  return { shotId, analysisId: a.id, otherId: b.id };
}

/** A new Hollowmere shot whose current analysis (version 1) is done, in the given review state (issue 7 rows). */
async function freshAnalysedShot(h: ApiHarness, status: 'analysed' | 'in_review' = 'analysed'): Promise<{ shotId: string }> {
  const shot = await Shot.create({
    labId: h.demo.labs.hollowmere.id, campaignId: h.demo.hollowmere.campaignIds[0], number: 1000 + serial++, firedAt: null,
    projectileId: null, gateRigId: null, tubePressurePa: null, ambientTemperatureK: null, ambientPressurePa: null, createdBy: null,
  });
  const analysis = await Analysis.create({
    labId: shot.labId, shotId: shot.id, version: 1, parameters: {}, engineVersion: 'matrix', jobKey: unique('matrix-review'),
    requestedBy: null, state: 'done', results: { speed: { value: 201, uncertainty: 0.4, method: 'flight' } } as object,
  });
  await shot.update({ status, currentAnalysisId: analysis.id, reviewAnalysisId: status === 'in_review' ? analysis.id : null });
  return { shotId: shot.id };
}

const errorShape = (body: Record<string, unknown>) =>
  expect(body).toEqual({ error: expect.objectContaining({ code: expect.any(String), message: expect.any(String) }) });

/**
 * One row per route, in the order of server/app.ts. Columns: Hollowmere admin, experimenter, analyst, reviewer,
 * Sandgate's admin (other lab), signed out.
 */
const MATRIX: Record<string, Row> = {
  'GET /api/health': {
    expect: [200, 200, 200, 200, 200, 200],
    shape: (b) => expect(b).toEqual({ status: 'ok', db: 'ok', redis: 'ok' }),
  },
  'POST /api/auth/login': {
    // Each caller signs in with its own demo account; nobody-signed-in uses the reviewer's.
    expect: [200, 200, 200, 200, 200, 200],
    prepare: ({ user, demo }) => {
      const who = user ?? demo.users.reviewer;
      return { body: { email: who.email, password: who.password } };
    },
    shape: (b, { user, demo }) =>
      expect(b).toMatchObject({ user: { id: (user ?? demo.users.reviewer).id }, via: 'session', memberships: expect.any(Array) }),
  },
  'POST /api/auth/logout': {
    expect: [204, 204, 204, 204, 204, 204],
    prepare: async ({ freshAuth }) => ({ headers: await freshAuth() }),
  },
  'GET /api/auth/session': {
    // Answers everyone with 200: the pages ask it before sign-in, and "nobody" is an answer, not an error.
    expect: [200, 200, 200, 200, 200, 200],
    shape: (b, { user, credential }) =>
      (user ? expect(b).toMatchObject({ user: { user: { id: user.id, email: user.email }, via: credential } }) : expect(b).toEqual({ user: null })),
  },
  'GET /api/auth/me': {
    expect: [200, 200, 200, 200, 200, 401],
    shape: (b, { user, credential }) => expect(b).toMatchObject({ user: { id: user!.id, email: user!.email }, via: credential }),
  },
  'GET /api/me/tokens': {
    expect: [200, 200, 200, 200, 200, 401],
    tokenExpect: [403, 403, 403, 403, 403, 401],
    shape: (b) => expect(b).toEqual({ tokens: expect.any(Array) }),
  },
  'POST /api/me/tokens': {
    expect: [201, 201, 201, 201, 201, 401],
    tokenExpect: [403, 403, 403, 403, 403, 401],
    prepare: ({ user }) => ({ body: { name: unique('matrix-script'), password: user?.password ?? 'signed-out' } }),
    shape: (b) => expect(b).toMatchObject({ token: { id: expect.any(String) }, secret: expect.stringMatching(/^gpt_/) }),
  },
  'DELETE /api/me/tokens/:tokenId': {
    // A token of the acting user (of the admin when signed out), so every signed-in caller revokes its own.
    expect: [204, 204, 204, 204, 204, 401],
    prepare: async ({ user, demo }) => {
      const { hash, prefix } = newApiToken();
      const row = await ApiToken.create({ userId: (user ?? demo.users.admin).id, name: unique('to-revoke'), tokenHash: hash, tokenPrefix: prefix, expiresAt: null });
      return { params: { tokenId: row.id } };
    },
  },
  // Account routes act on the caller's own account; a throwaway account stands in for each signed-in caller, so
  // changing a password or ending sessions cannot disturb the demo accounts the other rows use.
  'POST /api/me/password': {
    expect: [200, 200, 200, 200, 200, 401],
    tokenExpect: [403, 403, 403, 403, 403, 401],
    prepare: async ({ user, credential }) => {
      const stand = await throwawayAccount();
      return {
        headers: user ? await credentialOf(stand.id, credential) : {},
        body: { currentPassword: THROWAWAY_PASSWORD, newPassword: 'another long password' },
      };
    },
    shape: (b, { credential }) => expect(b).toMatchObject({ via: credential, tokensRevoked: 0 }),
  },
  'POST /api/me/sign-out-everywhere': {
    expect: [200, 200, 200, 200, 200, 401],
    tokenExpect: [403, 403, 403, 403, 403, 401],
    prepare: async ({ user, credential }) => ({ headers: user ? await credentialOf((await throwawayAccount()).id, credential) : {}, body: {} }),
    shape: (b) => expect(b).toEqual({ sessionsSignedOut: 'all', tokensRevoked: 0 }),
  },
  'POST /api/auth/password-reset': {
    // Public: the same answer whoever asks and whether or not the address has an account.
    expect: [202, 202, 202, 202, 202, 202],
    prepare: () => ({ body: { email: `${unique('forgetful')}@example.org` } }),
    shape: (b) => expect(b).toEqual({ message: expect.stringContaining('If an account uses that address') }),
  },
  'POST /api/auth/password-reset/complete': {
    // Public: the secret from the e-mail is the credential.
    expect: [204, 204, 204, 204, 204, 204],
    prepare: async () => {
      const stand = await throwawayAccount();
      const { secret, hash } = newPasswordResetSecret();
      await PasswordReset.create({ userId: stand.id, tokenHash: hash, expiresAt: new Date(Date.now() + 600_000), requestedIp: null });
      return { body: { token: secret, password: 'a brand new password' } };
    },
  },
  'POST /api/auth/password-reset/check': {
    // Public: the secret from the e-mail is the credential; only looks, so one open link serves every actor.
    expect: [200, 200, 200, 200, 200, 200],
    prepare: async () => {
      const stand = await throwawayAccount();
      const { secret, hash } = newPasswordResetSecret();
      await PasswordReset.create({ userId: stand.id, tokenHash: hash, expiresAt: new Date(Date.now() + 600_000), requestedIp: null });
      return { body: { token: secret } };
    },
    shape: (b) => expect(b).toEqual({ expiresAt: expect.any(String) }),
  },
  'GET /api/labs/:labId': {
    expect: [200, 200, 200, 200, 404, 401],
    shape: (b, { demo, actor }) => expect(b).toEqual({ lab: { id: demo.labs.hollowmere.id, name: 'Hollowmere Ballistics Lab', slug: 'hollowmere' }, role: actor }),
  },
  'GET /api/labs/:labId/members': {
    expect: [200, 200, 200, 200, 404, 401],
    shape: (b) => expect(b).toMatchObject({ members: expect.arrayContaining([expect.objectContaining({ email: 'ines.calder@hollowmere.example', role: 'admin' })]) }),
  },
  'GET /api/labs/:labId/storage': {
    expect: [200, 403, 403, 403, 404, 401],
    shape: (b) => expect(b).toMatchObject({ storage: { usedBytes: expect.any(Number) }, limits: { channelsPerCapture: 64 } }),
  },
  'PATCH /api/labs/:labId/members/:userId': {
    expect: [200, 403, 403, 403, 404, 401],
    prepare: async ({ demo }) => ({ params: { userId: await freshMember(demo) }, body: { role: 'reviewer' } }),
    shape: (b) => expect(b).toEqual({ userId: expect.any(String), role: 'reviewer' }),
  },
  'DELETE /api/labs/:labId/members/:userId': {
    expect: [204, 403, 403, 403, 404, 401],
    prepare: async ({ demo }) => ({ params: { userId: await freshMember(demo) } }),
  },
  'POST /api/labs/:labId/members/:userId/unlock-sign-in': {
    expect: [204, 403, 403, 403, 404, 401],
    prepare: async ({ demo }) => ({ params: { userId: demo.users.experimenter.id } }),
  },
  'POST /api/labs/:labId/members/:userId/disable': {
    expect: [200, 403, 403, 403, 404, 401],
    prepare: async ({ demo }) => ({ params: { userId: await freshMember(demo) } }),
    shape: (b) => expect(b).toEqual({ userId: expect.any(String), active: false }),
  },
  'POST /api/labs/:labId/members/:userId/enable': {
    expect: [200, 403, 403, 403, 404, 401],
    prepare: async ({ demo }) => {
      const userId = await freshMember(demo);
      await User.update({ disabledAt: new Date() }, { where: { id: userId } });
      return { params: { userId } };
    },
    shape: (b) => expect(b).toEqual({ userId: expect.any(String), active: true }),
  },
  'GET /api/labs/:labId/invitations': {
    expect: [200, 403, 403, 403, 404, 401],
    shape: (b) => expect(b).toEqual({ invitations: expect.any(Array) }),
  },
  'POST /api/labs/:labId/invitations': {
    expect: [201, 403, 403, 403, 404, 401],
    prepare: () => ({ body: { email: `${unique('new-person')}@example.org`, role: 'analyst' } }),
    shape: (b) => expect(b).toMatchObject({ invitation: { role: 'analyst', state: 'pending' } }),
  },
  'DELETE /api/labs/:labId/invitations/:invitationId': {
    expect: [204, 403, 403, 403, 404, 401],
    prepare: async ({ demo }) => ({ params: { invitationId: (await freshInvitation(demo)).id } }),
  },
  'GET /api/invitations/:token': {
    // Public on purpose: the invitee has no account yet; the secret in the link is the credential.
    expect: [200, 200, 200, 200, 200, 200],
    prepare: async ({ demo }) => ({ params: { token: (await freshInvitation(demo)).secret } }),
    shape: (b) => expect(b).toMatchObject({ labName: 'Hollowmere Ballistics Lab', role: 'experimenter', accountExists: false }),
  },
  'POST /api/invitations/:token/accept': {
    expect: [200, 200, 200, 200, 200, 200],
    prepare: async ({ demo }) => ({
      params: { token: (await freshInvitation(demo)).secret },
      body: { name: 'Matrix Invitee', password: 'a long enough password' },
    }),
    shape: (b) => expect(b).toMatchObject({ via: 'session', memberships: [expect.objectContaining({ labSlug: 'hollowmere', role: 'experimenter' })] }),
  },
  'GET /api/labs/:labId/outbox': {
    expect: [200, 403, 403, 403, 404, 401],
    shape: (b) => expect(b).toEqual({ messages: expect.any(Array) }),
  },
  'GET /api/labs/:labId/campaigns': {
    expect: [200, 200, 200, 200, 404, 401],
    // Other rows add shots to this campaign, so only the seeded minimum is known here.
    shape: (b) => expect(b).toMatchObject({ campaigns: expect.arrayContaining([expect.objectContaining({ name: 'Vacuum sweep, autumn 2026', shotCount: expect.any(Number) })]) }),
  },
  'POST /api/labs/:labId/campaigns': {
    expect: [201, 201, 403, 403, 404, 401],
    prepare: () => ({ body: { name: unique('Matrix campaign') } }),
    shape: (b) => expect(b).toMatchObject({ campaign: { id: expect.any(String), shotCount: 0 } }),
  },
  'GET /api/labs/:labId/campaigns/:campaignId': {
    expect: [200, 200, 200, 200, 404, 401],
    shape: (b) => expect(b).toMatchObject({ campaign: { name: 'Vacuum sweep, autumn 2026' }, shots: expect.any(Array) }),
  },
  'PATCH /api/labs/:labId/campaigns/:campaignId': {
    expect: [200, 200, 403, 403, 404, 401],
    prepare: async ({ demo }) => {
      const c = await Campaign.create({ labId: demo.labs.hollowmere.id, name: unique('Matrix campaign to correct'), startedOn: null, createdBy: null });
      return { params: { campaignId: c.id }, body: { tubeLengthM: 1.8, boreM: 0.0406 } };
    },
    shape: (b) => expect(b).toMatchObject({ campaign: { tubeLengthM: 1.8, boreM: 0.0406, shotCount: 0 } }),
  },
  'GET /api/labs/:labId/projectiles': {
    expect: [200, 200, 200, 200, 404, 401],
    shape: (b) => expect(b).toMatchObject({ projectiles: expect.arrayContaining([expect.objectContaining({ diameterM: 0.04, massKg: 0.0027 })]) }),
  },
  'POST /api/labs/:labId/projectiles': {
    expect: [201, 403, 201, 403, 404, 401],
    prepare: () => ({ body: { name: unique('Matrix ball'), diameterM: 0.04, diameterToleranceM: 0.0001, massKg: 0.0027, massToleranceKg: 0.00005 } }),
    shape: (b) => expect(b).toMatchObject({ projectile: { id: expect.any(String), diameterM: 0.04, massKg: 0.0027 } }),
  },
  'PATCH /api/labs/:labId/projectiles/:projectileId': {
    expect: [200, 403, 200, 403, 404, 401],
    prepare: async ({ demo }) => {
      const p = await Projectile.create({ labId: demo.labs.hollowmere.id, name: unique('Matrix ball'), diameterM: 0.04, diameterToleranceM: 0.0001, massKg: 0.0027, massToleranceKg: 0.00005 });
      return { params: { projectileId: p.id }, body: { diameterToleranceM: 0.0002 } };
    },
    shape: (b) => expect(b).toMatchObject({ projectile: { diameterToleranceM: 0.0002 } }),
  },
  'GET /api/labs/:labId/gate-rigs': {
    expect: [200, 200, 200, 200, 404, 401],
    // Other rows add rigs, so only the seeded one is known here.
    shape: (b) => expect(b).toMatchObject({ gateRigs: expect.arrayContaining([expect.objectContaining({ name: 'Exit rig, three gates' })]) }),
  },
  'POST /api/labs/:labId/gate-rigs': {
    expect: [201, 403, 201, 403, 404, 401],
    prepare: () => ({ body: { name: unique('Matrix rig'), gates: [{ label: 'A', position_m: 0, position_uncertainty_m: 0.0005 }, { label: 'B', position_m: 0.2, position_uncertainty_m: 0.0005 }], beamWidthM: 0.001, sensorType: 'photodiode' } }),
    shape: (b) => expect(b).toMatchObject({ gateRig: { id: expect.any(String), gates: [expect.objectContaining({ label: 'A' }), expect.objectContaining({ position_m: 0.2 })] } }),
  },
  'PATCH /api/labs/:labId/gate-rigs/:gateRigId': {
    expect: [200, 403, 200, 403, 404, 401],
    prepare: async ({ demo }) => {
      const r = await GateRig.create({ labId: demo.labs.hollowmere.id, name: unique('Matrix rig'), gates: [{ label: 'A', position_m: 0, position_uncertainty_m: 0.0005 }], beamWidthM: 0.001, sensorType: 'photodiode' });
      return { params: { gateRigId: r.id }, body: { beamWidthM: 0.002 } };
    },
    shape: (b) => expect(b).toMatchObject({ gateRig: { beamWidthM: 0.002 } }),
  },
  'POST /api/labs/:labId/shots': {
    expect: [201, 201, 403, 403, 404, 401],
    prepare: ({ demo }) => ({ body: { campaignId: demo.hollowmere.campaignIds[0], tubePressurePa: 1500, notes: 'matrix' } }),
    shape: (b) => expect(b).toMatchObject({ shot: { id: expect.any(String), number: expect.any(Number), conditions: { tubePressurePa: 1500 } } }),
  },
  'GET /api/shots/:shotId': {
    expect: [200, 200, 200, 200, 404, 401],
    shape: (b) => expect(b).toMatchObject({ shot: { number: 1, conditions: { tubePressurePa: 12_000 } }, captures: expect.any(Array), analyses: expect.any(Array) }),
  },
  'PATCH /api/shots/:shotId': {
    expect: [200, 200, 403, 403, 404, 401],
    prepare: () => ({ body: { notes: unique('matrix note') } }),
    shape: (b) => expect(b).toMatchObject({ shot: { number: 1 } }),
  },
  'POST /api/shots/:shotId/captures': {
    expect: [202, 202, 403, 403, 404, 401],
    prepare: () => ({ attach: { field: 'files', name: 'matrix.csv', content: `t,CH1\n0,${serial++}\n1e-6,1\n` } }),
    shape: (b) => expect(b).toMatchObject({ captures: [expect.objectContaining({ state: 'queued', duplicate: false })] }),
  },
  'GET /api/labs/:labId/shots': {
    expect: [200, 200, 200, 200, 404, 401],
    shape: (b) => expect(b).toMatchObject({ shots: expect.any(Array), total: expect.any(Number) }),
  },
  'GET /api/shots/:shotId/analyses': {
    expect: [200, 200, 200, 200, 404, 401],
    shape: (b) => expect(b).toMatchObject({ analyses: expect.any(Array) }),
  },
  'POST /api/shots/:shotId/analyses': {
    expect: [202, 403, 202, 403, 404, 401],
    prepare: async ({ h }) => ({ params: { shotId: (await freshShotWithCapture(h, 'ready')).shotId }, body: { parameters: { threshold: { level: 45 } } } }),
    shape: (b) => expect(b).toMatchObject({ analysis: { version: 1, state: 'queued' } }),
  },
  'GET /api/shots/:shotId/analyses/:analysisId': {
    expect: [200, 200, 200, 200, 404, 401],
    prepare: async ({ h }) => ({ params: await freshAnalyses(h) }),
    shape: (b) => expect(b).toMatchObject({ analysis: { version: 1, results: { speed: { value: 201 } } } }),
  },
  'GET /api/shots/:shotId/analyses/:analysisId/diff/:otherId': {
    expect: [200, 200, 200, 200, 404, 401],
    prepare: async ({ h }) => ({ params: await freshAnalyses(h) }),
    shape: (b) => expect(b).toMatchObject({ parameters: [{ path: 'threshold.level', from: 50, to: 40 }], results: [{ path: 'speed.value', from: 201, to: 202 }] }),
  },
  'POST /api/shots/:shotId/analyses/:analysisId/time-base-confirmation': {
    expect: [201, 403, 201, 403, 404, 401],
    prepare: async ({ h }) => {
      const { shotId } = await freshAnalysedShot(h);
      const analysis = await Analysis.findOne({ where: { shotId }, rejectOnEmpty: true });
      await analysis.update({ results: { speed: { value: 6e-5 }, timeBaseCheck: { flagged: true, reasons: [{ code: 'speed-range', message: 'matrix' }] } } as object });
      return { params: { shotId, analysisId: analysis.id }, body: { note: 'matrix check' } };
    },
    shape: (b) => expect(b).toMatchObject({ version: 1, timeBaseCheck: { flagged: true, blocksApproval: false, confirmation: { note: 'matrix check' } } }),
  },
  'DELETE /api/shots/:shotId': {
    expect: [200, 200, 403, 403, 404, 401],
    prepare: async ({ h }) => ({ params: { shotId: (await freshShotWithCapture(h, 'ready')).shotId } }),
    shape: (b) => expect(b).toMatchObject({ shot: { deletedAt: expect.any(String) } }),
  },
  'POST /api/shots/:shotId/restore': {
    expect: [200, 403, 403, 403, 404, 401],
    prepare: async ({ h }) => {
      const { shotId } = await freshShotWithCapture(h, 'ready');
      await Shot.update({ deletedAt: new Date() }, { where: { id: shotId } });
      return { params: { shotId } };
    },
    shape: (b) => expect(b).toMatchObject({ shot: { deletedAt: null } }),
  },
  'DELETE /api/shots/:shotId/captures/:captureId': {
    expect: [200, 200, 403, 403, 404, 401],
    prepare: async ({ h }) => ({ params: await freshShotWithCapture(h, 'ready') }),
    shape: (b) => expect(b).toMatchObject({ capture: { removedAt: expect.any(String) } }),
  },
  'POST /api/shots/:shotId/captures/:captureId/reingest': {
    expect: [202, 202, 403, 403, 404, 401],
    prepare: async ({ h }) => ({ params: await freshShotWithCapture(h, 'failed'), body: { importOptions: { timeColumn: 0 } } }),
    shape: (b) => expect(b).toMatchObject({ capture: { state: 'queued', ingestAttempt: 2, importOptions: { timeColumn: 0 } } }),
  },
  'GET /api/captures/:captureId/window': {
    expect: [200, 200, 200, 200, 404, 401],
    prepare: async ({ h }) => ({ params: await freshShotWithCapture(h, 'ready') }),
    shape: (b) => expect(b).toMatchObject({ raw: true }),
  },
  'GET /api/captures/:captureId/samples': {
    expect: [200, 200, 200, 200, 404, 401],
    prepare: async ({ h }) => ({ params: await freshShotWithCapture(h, 'ready') }),
  },
  'GET /api/labs/:labId/audit': {
    expect: [200, 403, 403, 200, 404, 401],
    shape: (b) => expect(b).toEqual({ events: expect.any(Array) }),
  },
  'POST /api/shots/:shotId/review-requests': {
    expect: [201, 201, 201, 403, 404, 401],
    prepare: async ({ h }) => ({ params: await freshAnalysedShot(h), body: { message: 'matrix' } }),
    shape: (b) => expect(b).toMatchObject({ request: { analysisVersion: 1, message: 'matrix' }, shot: { status: 'in_review' } }),
  },
  'GET /api/labs/:labId/events': {
    expect: [200, 200, 200, 200, 404, 401],
    stream: true,
    shape: (b) => expect(b.text).toContain('event: ready'),
  },
  'GET /api/labs/:labId/review-queue': {
    expect: [200, 403, 403, 200, 404, 401],
    shape: (b) => expect(b).toEqual({ shots: expect.any(Array) }),
  },
  'POST /api/shots/:shotId/reviews': {
    expect: [403, 403, 403, 201, 404, 401],
    prepare: async ({ h }) => ({ params: await freshAnalysedShot(h, 'in_review'), body: { decision: 'approved' } }),
    shape: (b) => expect(b).toMatchObject({ review: { decision: 'approved', analysisVersion: 1 }, shot: { status: 'approved' } }),
  },
  'GET /api/shots/:shotId/reviews': {
    expect: [200, 200, 200, 200, 404, 401],
    shape: (b) => expect(b).toMatchObject({ status: expect.any(String), history: expect.any(Array) }),
  },
  'GET /api/shots/:shotId/comments': {
    expect: [200, 200, 200, 200, 404, 401],
    shape: (b) => expect(b).toEqual({ comments: expect.any(Array) }),
  },
  'POST /api/shots/:shotId/comments': {
    expect: [201, 201, 201, 201, 404, 401],
    prepare: () => ({ body: { body: unique('matrix comment') } }),
    shape: (b) => expect(b).toMatchObject({ comment: { body: expect.stringMatching(/^matrix comment/), replyTo: null } }),
  },
  'GET /api/shots/:shotId/audit': {
    expect: [200, 403, 403, 200, 404, 401],
    shape: (b) => expect(b).toEqual({ events: expect.any(Array) }),
  },
  'GET /api/me/notifications': {
    expect: [200, 200, 200, 200, 200, 401],
    shape: (b) => expect(b).toEqual({ preferences: { reviewRequested: expect.any(Boolean), approved: expect.any(Boolean), returned: expect.any(Boolean), jobFailed: expect.any(Boolean) } }),
  },
  'PATCH /api/me/notifications': {
    expect: [200, 200, 200, 200, 200, 401],
    prepare: () => ({ body: { jobFailed: true } }),
    shape: (b) => expect(b).toMatchObject({ preferences: { jobFailed: true } }),
  },
  'GET /api/labs/:labId/campaigns/:campaignId/export': {
    // CSV by default (the body is a file; tests/api/export.test.ts reads it).
    expect: [200, 200, 200, 200, 404, 401],
  },
  'GET /api/shots/:shotId/export': {
    expect: [200, 200, 200, 200, 404, 401],
    prepare: async ({ h }) => ({ params: await freshAnalysedShot(h) }),
  },
  'GET /api/labs/:labId/campaigns/:campaignId/report.pdf': {
    expect: [200, 200, 200, 200, 404, 401],
  },
  'GET /api/shots/:shotId/report.pdf': {
    expect: [200, 200, 200, 200, 404, 401],
    prepare: async ({ h }) => ({ params: await freshAnalysedShot(h) }),
  },
  'GET /api/labs/:labId/campaigns/:campaignId/trends': {
    expect: [200, 200, 200, 200, 404, 401],
    shape: (b) => expect(b).toMatchObject({ groupBy: 'none', points: expect.any(Array), groups: expect.any(Array), launcherFit: { status: expect.any(String) } }),
  },
  'PUT /api/labs/:labId/campaigns/:campaignId/analysis-settings': {
    expect: [200, 403, 200, 403, 404, 401],
    prepare: async ({ demo }) => {
      const c = await Campaign.create({ labId: demo.labs.hollowmere.id, name: unique('Matrix campaign with defaults'), startedOn: null, createdBy: null });
      return { params: { campaignId: c.id }, body: { settings: { threshold: { unit: 'percent', level: 40, hysteresis: 30 }, polarity: 'falling' } } };
    },
    shape: (b) => expect(b).toMatchObject({ analysisSettings: { threshold: { level: 40 }, polarity: 'falling' } }),
  },
  'POST /api/labs/:labId/campaigns/:campaignId/batches': {
    expect: [202, 403, 202, 403, 404, 401],
    prepare: async ({ h }) => ({ body: { settings: { polarity: 'falling' }, shotIds: [(await freshShotWithCapture(h, 'ready')).shotId] } }),
    shape: (b) => expect(b).toMatchObject({ batch: { state: 'running', counts: { total: 1, queued: 1 } }, shots: [expect.objectContaining({ after: expect.objectContaining({ version: 1, state: 'queued' }) })] }),
  },
  'GET /api/labs/:labId/campaigns/:campaignId/batches': {
    expect: [200, 200, 200, 200, 404, 401],
    shape: (b) => expect(b).toEqual({ batches: expect.any(Array) }),
  },
  'GET /api/labs/:labId/batches/:batchId': {
    expect: [200, 200, 200, 200, 404, 401],
    prepare: async ({ demo }) => {
      const batch = await AnalysisBatch.create({ labId: demo.labs.hollowmere.id, campaignId: demo.hollowmere.campaignIds[0], settings: { edges: 'leading' }, shotIds: [], requestedBy: null });
      return { params: { batchId: batch.id } };
    },
    shape: (b) => expect(b).toMatchObject({ batch: { settings: { edges: 'leading' }, state: 'done', counts: { total: 0 } }, shots: [] }),
  },
  'GET /api/labs/:labId/campaigns/:campaignId/bench': {
    expect: [200, 200, 200, 200, 404, 401],
    shape: (b) => expect(b).toMatchObject({ campaign: { name: 'Vacuum sweep, autumn 2026' }, latest: expect.objectContaining({ number: expect.any(Number) }), recent: expect.any(Array) }),
  },
  'GET /api/openapi.json': {
    expect: [200, 200, 200, 200, 200, 200],
    shape: (b) => expect(b).toMatchObject({ openapi: '3.1.0', paths: expect.objectContaining({ '/api/shots/{shotId}/captures': expect.any(Object) }) }),
  },
};

const routeKey = (r: { method: string; path: string }) => `${r.method.toUpperCase()} ${r.path}`;
const actorName = (a: Actor) => a ?? 'signedOut';

/** A personal API token of this user, made straight in the database (the token routes are under test above). */
async function apiTokenHeader(userId: string): Promise<Record<string, string>> {
  const { token, hash, prefix } = newApiToken();
  await ApiToken.create({ userId, name: unique('matrix-caller'), tokenHash: hash, tokenPrefix: prefix, expiresAt: null });
  return { Authorization: `Bearer ${token}` };
}

/** Calls one route as each of the six callers; returns the statuses and, for any surprise, what came back. */
async function runRow(h: ApiHarness, key: string, row: Row, credential: Credential) {
  const [method, pathTemplate] = key.split(' ') as [string, string];
  const demo = h.demo;
  const actual: number[] = [];
  const unexpected: string[] = [];
  for (const actor of ACTORS) {
    const user = actor ? demo.users[actor] : null;
    const freshAuth = async (): Promise<Record<string, string>> => {
      if (!user) return {};
      return credential === 'session' ? { Cookie: h.sessionCookie(user.id) } : apiTokenHeader(user.id);
    };
    const ctx: CaseContext = { h, demo, actor, user, credential, freshAuth };
    const prepared = (await row.prepare?.(ctx)) ?? {};
    const params: Record<string, string> = {
      labId: demo.labs.hollowmere.id,
      campaignId: demo.hollowmere.campaignIds[0],
      shotId: demo.hollowmere.shotIds[0],
      ...prepared.params,
    };
    const url = pathTemplate.replace(/:(\w+)/g, (_, name: string) => {
      if (!params[name]) throw new Error(`${key}: no value for :${name}; add it in the row's prepare`);
      return encodeURIComponent(params[name]);
    });
    let req = request(h.app)[method.toLowerCase() as 'get' | 'post' | 'patch' | 'delete'](url);
    for (const [name, value] of Object.entries(prepared.headers ?? (await freshAuth()))) req = req.set(name, value);
    if (prepared.attach) req = req.attach(prepared.attach.field, Buffer.from(prepared.attach.content), prepared.attach.name);
    else if (prepared.body !== undefined) req = req.send(prepared.body as object);
    if (row.stream) req = readStreamStart(req);
    const res = await req;
    actual.push(res.status);
    if (res.status !== expectedOf(row, credential)[actual.length - 1]) {
      unexpected.push(`${actorName(actor)}: ${res.status} ${JSON.stringify(res.body).slice(0, 300)}`);
      continue;
    }
    if (res.status >= 400) errorShape(res.body as Record<string, unknown>);
    else if (res.status !== 204) row.shape?.(res.body as Record<string, unknown>, ctx);
    else expect(res.text).toBe('');
  }
  return { actual, unexpected: unexpected.join('\n') };
}

const expectedOf = (row: Row, credential: Credential): Expected => (credential === 'token' ? row.tokenExpect ?? row.expect : row.expect);
const titleOf = (row: Row, credential: Credential) => ACTORS.map((a, i) => `${actorName(a)} ${expectedOf(row, credential)[i]}`).join(', ');

// Public routes that never read the caller's credential and cost an argon2 hash per call: the session pass covers
// them, the token pass skips them to keep the suite fast.
const CREDENTIAL_BLIND = new Set(['POST /api/auth/login', 'POST /api/invitations/:token/accept', 'POST /api/auth/password-reset/complete']);

describe('authorization matrix', () => {
  let h: ApiHarness;
  beforeAll(async () => {
    h = await createApiHarness();
    await h.resetDatabase();
    matrixJwtSecret = h.config.jwtSecret;
  });
  afterAll(() => h?.close());

  it('When the server gains or loses a route, then this table has exactly one row per route', () => {
    const routes = allRoutes(h.deps).map(routeKey);
    const missingRows = routes.filter((k) => !(k in MATRIX));
    const rowsWithoutRoute = Object.keys(MATRIX).filter((k) => !routes.includes(k));
    const duplicateRoutes = routes.filter((k, i) => routes.indexOf(k) !== i);
    expect({ missingRows, rowsWithoutRoute, duplicateRoutes }).toEqual({ missingRows: [], rowsWithoutRoute: [], duplicateRoutes: [] });
  });

  describe('signed in with the session cookie', () => {
    for (const [key, row] of Object.entries(MATRIX)) {
      it(`When ${key} is called by each caller, then it answers ${titleOf(row, 'session')}`, async () => {
        const { actual, unexpected } = await runRow(h, key, row, 'session');
        expect(actual, unexpected).toEqual(row.expect);
      });
    }
  });

  describe('signed in with a personal API token (Bearer)', () => {
    for (const [key, row] of Object.entries(MATRIX)) {
      if (CREDENTIAL_BLIND.has(key)) continue;
      it(`When ${key} is called by each caller, then it answers ${titleOf(row, 'token')}`, async () => {
        const { actual, unexpected } = await runRow(h, key, row, 'token');
        expect(actual, unexpected).toEqual(expectedOf(row, 'token'));
      });
    }
  });
});
