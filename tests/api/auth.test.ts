// Sign-in, sessions, API tokens, invitations over real SMTP, headers, the audit trail and lab isolation, end to end
// through the app against the throwaway PostgreSQL and Redis (see tests/helpers/api-harness.ts).
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { allRoutes } from '../../server/app.ts';
import { isStreamRoute, readStreamStart } from '../helpers/stream-start.ts';
import { ApiToken, AuditEvent, Campaign, Invitation, Lab, Membership, Shot, User } from '../../server/db/models/index.ts';
import { SESSION_COOKIE } from '../../server/lib/authenticate.ts';
import { readFakeOutbox } from '../../server/dev/fake-smtp.ts';
import { createMailer } from '../../server/lib/mailer.ts';
import { hashPassword } from '../../server/lib/passwords.ts';
import { sha256Hex } from '../../server/lib/tokens.ts';
import {
  cookiePair, createApiHarness, freeLoopbackPort, setCookieFor, type ApiHarness, type DemoWorld,
} from '../helpers/api-harness.ts';

let h: ApiHarness;
let demo: DemoWorld;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
});
afterAll(() => h?.close());
// Rate-limit counters, revoked sessions and the fake outbox start empty in every test; database rows stay, so each
// test makes its own people and invitations.
beforeEach(() => h.resetRedis());

const SAME_401 = 'That e-mail and password do not match an account.';

function login(email: string, password: string) {
  return request(h.app).post('/api/auth/login').send({ email, password });
}

function sessionFrom(res: { headers: Record<string, unknown> }): string {
  const line = setCookieFor(res.headers, SESSION_COOKIE);
  if (!line) throw new Error('no session cookie in the response');
  return cookiePair(line);
}

let serial = 0;
const uniqueEmail = (who: string) => `${who}.${Date.now().toString(36)}${(serial++).toString(36)}@example.org`;

describe('sign-in and sessions', () => {
  it('When a demo user signs in with the right password, then an httpOnly SameSite=Lax cookie is set and /api/auth/me works with it', async () => {
    // Arrange
    const analyst = demo.users.analyst;
    // Act
    const res = await login(analyst.email, analyst.password);
    // Assert
    expect(res.status).toBe(200);
    const cookie = setCookieFor(res.headers, SESSION_COOKIE)!;
    expect(cookie).toMatch(/; HttpOnly/);
    expect(cookie).toMatch(/; SameSite=Lax/);
    expect(cookie).toMatch(/; Path=\//);
    // Plain-HTTP public URL in the harness, so the cookie must not be Secure-only (it would never come back).
    expect(cookie).not.toMatch(/; Secure/);
    const expires = Date.parse(/Expires=([^;]+)/.exec(cookie)![1]);
    expect(Math.abs(expires - (Date.now() + h.config.sessionHours * 3_600_000))).toBeLessThan(60_000);

    const me = await request(h.app).get('/api/auth/me').set('Cookie', cookiePair(cookie));
    expect(me.status).toBe(200);
    expect(me.body).toMatchObject({
      user: { id: analyst.id, email: 'priya.okafor@hollowmere.example', name: 'Priya Okafor' },
      memberships: [{ labSlug: 'hollowmere', labName: 'Hollowmere Ballistics Lab', role: 'analyst' }],
      via: 'session',
    });
    expect(me.body.user).not.toHaveProperty('passwordHash');
  });

  it('When the password is wrong or the e-mail is unknown, then both get the same 401 and the same message', async () => {
    // Arrange
    const admin = demo.users.admin;
    // Act
    const wrongPassword = await login(admin.email, 'not-the-password');
    const unknownEmail = await login('nobody.here@hollowmere.example', 'not-the-password');
    // Assert
    expect(wrongPassword.status).toBe(401);
    expect(unknownEmail.status).toBe(401);
    expect(wrongPassword.body).toEqual({ error: { code: 'invalid_credentials', message: SAME_401 } });
    expect(unknownEmail.body).toEqual(wrongPassword.body);
    expect(setCookieFor(wrongPassword.headers, SESSION_COOKIE)).toBeUndefined();
  });

  it('When a user signs out, then the cookie is cleared and the old cookie gets 401 saying the session was signed out', async () => {
    // Arrange
    const reviewer = demo.users.reviewer;
    const cookie = h.sessionCookie(reviewer.id);
    const otherSession = h.sessionCookie(reviewer.id);
    expect((await request(h.app).get('/api/auth/me').set('Cookie', cookie)).status).toBe(200);
    // Act
    const out = await request(h.app).post('/api/auth/logout').set('Cookie', cookie);
    // Assert
    expect(out.status).toBe(204);
    const cleared = setCookieFor(out.headers, SESSION_COOKIE)!;
    expect(cleared).toMatch(/^gp_session=;/);
    expect(Date.parse(/Expires=([^;]+)/.exec(cleared)![1])).toBeLessThan(Date.now());
    const again = await request(h.app).get('/api/auth/me').set('Cookie', cookie);
    expect(again.status).toBe(401);
    expect(again.body.error.message).toBe('You have signed out of this session. Please sign in again.');
    // The revocation is kept in Redis (shared by every API process) no longer than the session could live.
    const jti = (jwt.decode(cookie.slice(SESSION_COOKIE.length + 1)) as jwt.JwtPayload).jti!;
    const ttl = await h.redis.ttl(`gp:revoked-session:${jti}`);
    expect(ttl).toBeGreaterThan(0);
    expect(ttl).toBeLessThanOrEqual(h.config.sessionHours * 3600);
    // Only that session ends: the same person's other browser stays signed in.
    expect((await request(h.app).get('/api/auth/me').set('Cookie', otherSession)).status).toBe(200);
  });

  it('When the session JWT has expired, then the API answers 401 saying the session has expired', async () => {
    // Arrange: a token that is right in every way except its exp, one minute in the past (RFC 7519 §4.1.4).
    const now = Math.floor(Date.now() / 1000);
    const expired = jwt.sign(
      { typ: 'session', sub: demo.users.experimenter.id, jti: crypto.randomUUID(), iss: 'gatepost', iat: now - 3600, exp: now - 60 },
      h.config.jwtSecret,
      { algorithm: 'HS256' },
    );
    // Act
    const viaCookie = await request(h.app).get('/api/auth/me').set('Cookie', `${SESSION_COOKIE}=${expired}`);
    const viaBearer = await request(h.app).get('/api/labs/' + demo.labs.hollowmere.id).set('Authorization', `Bearer ${expired}`);
    // Assert
    for (const res of [viaCookie, viaBearer]) {
      expect(res.status).toBe(401);
      expect(res.body.error.message).toBe('Your session has expired. Please sign in again.');
    }
  });

  it('When a session token is signed with another secret, then it is refused like an expired one', async () => {
    // Arrange
    const forged = jwt.sign({ typ: 'session' }, 'another-secret-of-at-least-32-characters!', {
      algorithm: 'HS256', subject: demo.users.admin.id, jwtid: crypto.randomUUID(), issuer: 'gatepost', expiresIn: 3600,
    });
    // Act
    const res = await request(h.app).get('/api/auth/me').set('Cookie', `${SESSION_COOKIE}=${forged}`);
    // Assert
    expect(res.status).toBe(401);
  });
});

describe('sign-in rate limit', () => {
  it('When loginMaxFailures sign-ins have failed from one address, then the next one from there, even with the right password, gets 429 with Retry-After, counted in Redis', async () => {
    // Arrange
    const experimenter = demo.users.experimenter;
    const max = h.config.loginMaxFailures;
    for (let i = 0; i < max; i++) expect((await login(experimenter.email, `wrong-${i}`)).status).toBe(401);
    // Act
    const blocked = await login(experimenter.email, experimenter.password);
    // Assert
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('too_many_requests');
    expect(blocked.body.error.message).toMatch(/^Too many failed sign-ins to this account from your address\. Try again in 1 minute/);
    const retryAfter = Number(blocked.headers['retry-after']);
    expect(Number.isInteger(retryAfter)).toBe(true);
    expect(retryAfter).toBeGreaterThanOrEqual(1);
    expect(retryAfter).toBeLessThanOrEqual(h.config.loginWindowSeconds);
    expect(setCookieFor(blocked.headers, SESSION_COOKIE)).toBeUndefined();

    // Every attempt is counted before the password is checked, the refused one too: max failures + 1.
    const pairKeys = await h.redis.keys(`gp:login-fail:pair:${experimenter.email}*`);
    expect(pairKeys).toHaveLength(1);
    for (const key of [pairKeys[0], `gp:login-fail:acct:${experimenter.email}`]) {
      expect(await h.redis.get(key), key).toBe(String(max + 1));
      const ttl = await h.redis.ttl(key);
      expect(ttl).toBeGreaterThan(0);
      expect(ttl).toBeLessThanOrEqual(h.config.loginWindowSeconds);
    }
    // Another account from the same address is not refused (only slowed down).
    expect((await login(demo.users.admin.email, demo.users.admin.password)).status).toBe(200);
  });

  it('When the window has passed, then the right password signs in again and clears that address\'s count', async () => {
    // Arrange
    const reviewer = demo.users.reviewer;
    for (let i = 0; i < h.config.loginMaxFailures; i++) expect((await login(reviewer.email, `wrong-${i}`)).status).toBe(401);
    expect((await login(reviewer.email, reviewer.password)).status).toBe(429);
    const [pairKey] = await h.redis.keys(`gp:login-fail:pair:${reviewer.email}*`);
    // Act: the window is the counter key's expiry in Redis, so fast-forward it to its last 300 ms and let it run out.
    // (How long the window is, counted from the first failure, is tested in tests/unit/server/login-limiter.test.ts.)
    expect(await h.redis.pexpire(pairKey, 300)).toBe(1);
    const deadline = Date.now() + 5_000;
    while ((await h.redis.exists(pairKey)) && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
    const res = await login(reviewer.email, reviewer.password);
    // Assert
    expect(res.status).toBe(200);
    expect(await h.redis.exists(pairKey)).toBe(0);
  });

  // Guesses sent at the same moment: the limiter counts each attempt before the slow password hash (reserve), so
  // at most loginMaxFailures of them are checked and the rest are refused with 429.
  it('When many wrong passwords arrive at once, then no more than loginMaxFailures of them are checked', async () => {
    // Arrange
    const analyst = demo.users.analyst;
    // Act
    const answers = await Promise.all(Array.from({ length: 4 }, (_, i) => login(analyst.email, `parallel-guess-${i}`)));
    // Assert
    expect(answers.filter((r) => r.status === 401).length).toBeLessThanOrEqual(h.config.loginMaxFailures);
    expect(answers.filter((r) => r.status === 429).length).toBeGreaterThanOrEqual(4 - h.config.loginMaxFailures);
  });
});

describe('personal API tokens', () => {
  /** Creates a token in a session of `user`, confirmed with the user's password (issue 12, item 6). */
  async function createToken(user: { id: string; password: string }, body: object) {
    const res = await request(h.app).post('/api/me/tokens').set('Cookie', h.sessionCookie(user.id)).send({ ...body, password: user.password });
    expect(res.status).toBe(201);
    return res.body as { token: { id: string; prefix: string }; secret: string };
  }
  const me = (secret: string) => request(h.app).get('/api/auth/me').set('Authorization', `Bearer ${secret}`);

  it('When a personal API token is sent as Bearer, then the API knows the user and shows via "token"', async () => {
    // Arrange
    const analyst = demo.users.analyst;
    const { token, secret } = await createToken(analyst, { name: 'nightly export' });
    // Act
    const res = await me(secret);
    // Assert
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ user: { id: analyst.id }, via: 'token', expiresAt: null });
    // Shown once: the database keeps only the SHA-256 and a short prefix, the list never the secret.
    const row = await ApiToken.findByPk(token.id, { rejectOnEmpty: true });
    expect(row.tokenHash).toBe(sha256Hex(secret));
    expect(secret.startsWith(token.prefix)).toBe(true);
    const list = await request(h.app).get('/api/me/tokens').set('Cookie', h.sessionCookie(analyst.id));
    expect(JSON.stringify(list.body)).not.toContain(secret);
    expect(list.body.tokens[0]).toMatchObject({ id: token.id, name: 'nightly export', lastUsedAt: expect.any(String), revokedAt: null });
  });

  it('When the token is revoked, then it stops working with 401', async () => {
    // Arrange
    const cookie = h.sessionCookie(demo.users.experimenter.id);
    const { token, secret } = await createToken(demo.users.experimenter, { name: 'rig logger' });
    expect((await me(secret)).status).toBe(200);
    // Act
    const revoke = await request(h.app).delete(`/api/me/tokens/${token.id}`).set('Cookie', cookie);
    const after = await me(secret);
    // Assert
    expect(revoke.status).toBe(204);
    expect(after.status).toBe(401);
    expect(after.body.error.message).toBe('This API token is not valid (expired, revoked or unknown).');
  });

  it('When the token has expired, then it stops working with 401', async () => {
    // Arrange
    const { token, secret } = await createToken(demo.users.reviewer, { name: 'weekly report', expiresInDays: 1 });
    expect((await me(secret)).status).toBe(200);
    // Act: move its expiry into the past, as a day passing would.
    await h.sequelize.query("UPDATE api_tokens SET expires_at = now() - interval '1 second' WHERE id = $1", { bind: [token.id] });
    const after = await me(secret);
    // Assert
    expect(after.status).toBe(401);
  });

  it("When a user tries to revoke another user's token, then the answer is 404 and the token keeps working", async () => {
    // Arrange
    const { token, secret } = await createToken(demo.users.analyst, { name: 'private script' });
    // Act
    const res = await request(h.app).delete(`/api/me/tokens/${token.id}`).set('Cookie', h.sessionCookie(demo.users.admin.id));
    // Assert
    expect(res.status).toBe(404);
    expect((await me(secret)).status).toBe(200);
    expect((await ApiToken.findByPk(token.id, { rejectOnEmpty: true })).revokedAt).toBeNull();
  });
});

describe('invitations', () => {
  it('When an admin invites by e-mail, then the message reaches the fake SMTP server and its link creates the account with the invited role', async () => {
    // Arrange
    const hollowmere = demo.labs.hollowmere;
    const admin = h.sessionCookie(demo.users.admin.id);
    const email = uniqueEmail('nadia.ferrow');
    const password = 'gate-B-to-gate-C';

    // Act 1: the invitation goes out through nodemailer over SMTP.
    const sent = await request(h.app).post(`/api/labs/${hollowmere.id}/invitations`).set('Cookie', admin).send({ email, role: 'analyst' });
    // Assert 1
    expect(sent.status).toBe(201);
    expect(sent.body.invitation).toMatchObject({ email, role: 'analyst', state: 'pending' });

    // Act 2: the admin reads what the fake SMTP server received; the other lab's admin may not.
    const outbox = await request(h.app).get(`/api/labs/${hollowmere.id}/outbox`).set('Cookie', admin);
    const peek = await request(h.app).get(`/api/labs/${hollowmere.id}/outbox`).set('Cookie', h.sessionCookie(demo.users.otherLabAdmin.id));
    const ownOutbox = await request(h.app).get(`/api/labs/${demo.labs.sandgate.id}/outbox`).set('Cookie', h.sessionCookie(demo.users.otherLabAdmin.id));
    // Assert 2
    expect(outbox.status).toBe(200);
    const mail = (outbox.body.messages as Array<{ to: string[]; subject: string; text: string; labId: string }>).find((m) => m.to.includes(email));
    expect(mail).toBeDefined();
    expect(mail!.subject).toBe('Ines Calder invited you to Hollowmere Ballistics Lab on Gatepost');
    expect(mail!.labId).toBe(hollowmere.id);
    expect(peek.status).toBe(404);
    expect(ownOutbox.status).toBe(200);
    expect(ownOutbox.body.messages).toEqual([]);
    // The admin sees that it was sent, not the link (issue 12, item 9); the addressee's mailbox holds it.
    expect(mail!.text).toContain('/invite/[only the addressee sees this link]');
    const delivered = (await readFakeOutbox(h.redis)).find((m) => m.to.includes(email))!;
    const link = /https?:\/\/\S+\/invite\/([A-Za-z0-9_-]+)/.exec(delivered.text);
    expect(link, delivered.text).not.toBeNull();
    expect(link![0].startsWith(h.config.publicUrl)).toBe(true);
    const token = link![1];

    // Act 3: the invitee opens the link, then accepts with a name and a password.
    const offer = await request(h.app).get(`/api/invitations/${token}`);
    const accepted = await request(h.app).post(`/api/invitations/${token}/accept`).send({ name: 'Nadia Ferrow', password });
    // Assert 3
    expect(offer.status).toBe(200);
    expect(offer.body).toMatchObject({ labName: 'Hollowmere Ballistics Lab', email, role: 'analyst', invitedBy: 'Ines Calder', accountExists: false });
    expect(accepted.status).toBe(200);
    const me = await request(h.app).get('/api/auth/me').set('Cookie', sessionFrom(accepted));
    expect(me.status).toBe(200);
    expect(me.body).toMatchObject({ user: { email, name: 'Nadia Ferrow' }, memberships: [{ labId: hollowmere.id, role: 'analyst' }] });
    // The password chosen on acceptance is the account's password from now on.
    expect((await login(email, password)).status).toBe(200);
    const acceptedEvent = await AuditEvent.findOne({ where: { action: 'invitation.accepted', targetId: sent.body.invitation.id }, rejectOnEmpty: true });
    expect(acceptedEvent).toMatchObject({ labId: hollowmere.id, actorId: me.body.user.id, details: { role: 'analyst' } });

    // Act 4: the link is used up.
    const reopened = await request(h.app).get(`/api/invitations/${token}`);
    const reaccepted = await request(h.app).post(`/api/invitations/${token}/accept`).send({ name: 'Someone Else', password: 'another-password' });
    // Assert 4
    expect(reopened.status).toBe(410);
    expect(reopened.body.error.message).toBe('This invitation has already been used. Ask your lab admin for a new one.');
    expect(reaccepted.status).toBe(410);
    const list = await request(h.app).get(`/api/labs/${hollowmere.id}/invitations`).set('Cookie', admin);
    expect(list.body.invitations.find((i: { email: string }) => i.email === email)).toMatchObject({ state: 'accepted' });
  });

  it('When the mail server is down, then inviting answers a clear 503 and leaves no open invitation', async () => {
    // Arrange: the same app and database, but a mailer pointed at a loopback port nobody listens on.
    const deadPort = await freeLoopbackPort();
    const app = h.appWithMailer(createMailer({ ...h.config, smtpPort: deadPort }));
    const admin = h.sessionCookie(demo.users.admin.id);
    const email = uniqueEmail('unlucky');
    // Act
    const res = await request(app).post(`/api/labs/${demo.labs.hollowmere.id}/invitations`).set('Cookie', admin).send({ email, role: 'reviewer' });
    // Assert
    expect(res.status).toBe(503);
    expect(res.body.error).toEqual({
      code: 'service_unavailable',
      message: 'The invitation e-mail could not be sent (the mail server did not accept it). Nothing was saved; try again later.',
    });
    expect(res.headers['retry-after']).toBe('5');
    const open = await Invitation.count({ where: { email, acceptedAt: null, revokedAt: null } });
    expect(open).toBe(0);
    const list = await request(h.app).get(`/api/labs/${demo.labs.hollowmere.id}/invitations`).set('Cookie', admin);
    expect(list.body.invitations.filter((i: { email: string; state: string }) => i.email === email && i.state === 'pending')).toEqual([]);
  });

  it('When re-sending to the same address fails because the mail server is down, then the earlier link keeps working', async () => {
    // Arrange: a first invitation that went out.
    const admin = h.sessionCookie(demo.users.admin.id);
    const lab = demo.labs.hollowmere.id;
    const email = uniqueEmail('resend');
    const first = await request(h.app).post(`/api/labs/${lab}/invitations`).set('Cookie', admin).send({ email, role: 'analyst' });
    expect(first.status).toBe(201);
    const token = /\/invite\/([A-Za-z0-9_-]+)/.exec((await readFakeOutbox(h.redis)).find((m) => m.to.includes(email))!.text)![1];
    const down = h.appWithMailer(createMailer({ ...h.config, smtpPort: await freeLoopbackPort() }));
    // Act
    const resend = await request(down).post(`/api/labs/${lab}/invitations`).set('Cookie', admin).send({ email, role: 'analyst' });
    // Assert
    expect(resend.status).toBe(503);
    expect((await request(h.app).get(`/api/invitations/${token}`)).status).toBe(200);
    expect((await Invitation.findByPk(first.body.invitation.id, { rejectOnEmpty: true })).revokedAt).toBeNull();
  });

  it('When an invitation is re-sent successfully, then only the newest link works', async () => {
    // Arrange
    const admin = h.sessionCookie(demo.users.admin.id);
    const lab = demo.labs.hollowmere.id;
    const email = uniqueEmail('resent');
    await request(h.app).post(`/api/labs/${lab}/invitations`).set('Cookie', admin).send({ email, role: 'analyst' });
    // Act
    const again = await request(h.app).post(`/api/labs/${lab}/invitations`).set('Cookie', admin).send({ email, role: 'reviewer' });
    // Assert: newest mail first in the outbox.
    expect(again.status).toBe(201);
    const [newest, older] = (await readFakeOutbox(h.redis)).filter((m) => m.to.includes(email)).map((m) => /\/invite\/([A-Za-z0-9_-]+)/.exec(m.text)![1]);
    expect((await request(h.app).get(`/api/invitations/${newest}`)).body.role).toBe('reviewer');
    expect((await request(h.app).get(`/api/invitations/${older}`)).status).toBe(410);
  });
});

describe('invitation edge cases', () => {
  const invite = (labId: string, cookie: string, body: object) =>
    request(h.app).post(`/api/labs/${labId}/invitations`).set('Cookie', cookie).send(body);
  const secretFromOutbox = async (email: string) => {
    const mails = await readFakeOutbox(h.redis);
    const mail = mails.find((m) => m.to.includes(email));
    return /\/invite\/([A-Za-z0-9_-]+)/.exec(mail?.text ?? '')?.[1] ?? '';
  };

  it('When the invited address already has an account, then accepting needs that account\'s password and adds the membership', async () => {
    // Arrange: someone from a third lab, with a real password.
    const email = uniqueEmail('lena.orsk');
    const other = await Lab.create({ name: 'Third test lab', slug: `third-${Date.now().toString(36)}` });
    const user = await User.create({ email, name: 'Lena Orsk', passwordHash: await hashPassword('lena-own-password') });
    await Membership.create({ labId: other.id, userId: user.id, role: 'experimenter' });
    expect((await invite(demo.labs.hollowmere.id, h.sessionCookie(demo.users.admin.id), { email, role: 'reviewer' })).status).toBe(201);
    const token = await secretFromOutbox(email);
    // Act
    const offer = await request(h.app).get(`/api/invitations/${token}`);
    const wrong = await request(h.app).post(`/api/invitations/${token}/accept`).send({ password: 'not-her-password' });
    const right = await request(h.app).post(`/api/invitations/${token}/accept`).send({ password: 'lena-own-password' });
    // Assert
    expect(offer.body.accountExists).toBe(true);
    expect(wrong.status).toBe(401);
    expect(wrong.body.error.message).toBe(`${email} already has an account: enter its password to join Hollowmere Ballistics Lab.`);
    expect(right.status).toBe(200);
    expect(right.body.memberships.map((m: { labSlug: string; role: string }) => [m.labSlug, m.role]).sort()).toEqual([
      ['hollowmere', 'reviewer'], [other.slug, 'experimenter'],
    ].sort());
  });

  it('When an invitation was withdrawn or has expired, then its link answers 410 saying which', async () => {
    // Arrange
    const admin = h.sessionCookie(demo.users.admin.id);
    const lab = demo.labs.hollowmere.id;
    const [withdrawnEmail, expiredEmail] = [uniqueEmail('withdrawn'), uniqueEmail('expired')];
    const withdrawn = await invite(lab, admin, { email: withdrawnEmail, role: 'analyst' });
    const expired = await invite(lab, admin, { email: expiredEmail, role: 'analyst' });
    // Act
    expect((await request(h.app).delete(`/api/labs/${lab}/invitations/${withdrawn.body.invitation.id}`).set('Cookie', admin)).status).toBe(204);
    await h.sequelize.query("UPDATE invitations SET expires_at = now() - interval '1 second' WHERE id = $1", { bind: [expired.body.invitation.id] });
    const a = await request(h.app).get(`/api/invitations/${await secretFromOutbox(withdrawnEmail)}`);
    const b = await request(h.app).post(`/api/invitations/${await secretFromOutbox(expiredEmail)}/accept`).send({ name: 'Too Late', password: 'a long enough password' });
    // Assert
    expect(a.status).toBe(410);
    expect(a.body.error.message).toBe('This invitation was withdrawn. Ask your lab admin for a new one.');
    expect(b.status).toBe(410);
    expect(b.body.error.message).toBe('This invitation has expired. Ask your lab admin for a new one.');
    expect(await User.count({ where: { email: expiredEmail } })).toBe(0);
  });

  it('When a link is made up, then it answers 404 without saying more', async () => {
    const res = await request(h.app).get('/api/invitations/made-up-secret-that-matches-nothing');
    expect(res.status).toBe(404);
    expect(res.body.error.message).toBe('This invitation link is not valid. Ask your lab admin for a new one.');
  });

  it('When an admin invites a current member or a malformed address, then 409 or 400 says what is wrong and no mail goes out', async () => {
    // Arrange
    const admin = h.sessionCookie(demo.users.admin.id);
    const lab = demo.labs.hollowmere.id;
    // Act
    const member = await invite(lab, admin, { email: 'Priya.Okafor@hollowmere.example', role: 'reviewer' });
    const malformed = await invite(lab, admin, { email: 'priya at hollowmere', role: 'reviewer' });
    const badRole = await invite(lab, admin, { email: uniqueEmail('someone'), role: 'owner' });
    // Assert
    expect(member.status).toBe(409);
    expect(member.body.error.message).toBe('priya.okafor@hollowmere.example is already a member of this lab.');
    expect(malformed.status).toBe(400);
    expect(malformed.body.error.message).toBe('Please correct the request: email: Enter a valid e-mail address.');
    expect(badRole.status).toBe(400);
    expect(badRole.body.error.details.fields[0].path).toBe('role');
    expect(await readFakeOutbox(h.redis)).toEqual([]);
  });
});

describe('error answers', () => {
  it('When a body is not JSON or a route does not exist, then the answer is the one JSON error shape', async () => {
    // Act
    const badJson = await request(h.app).post('/api/auth/login').set('Content-Type', 'application/json').send('{"email": ');
    const noRoute = await request(h.app).get('/api/no-such-thing');
    const notUuid = await request(h.app).get('/api/shots/42').set('Cookie', h.sessionCookie(demo.users.admin.id));
    // Assert
    expect(badJson.status).toBe(400);
    expect(badJson.body).toEqual({ error: { code: 'bad_request', message: 'The request body is not valid JSON.' } });
    expect(noRoute.status).toBe(404);
    expect(noRoute.body).toEqual({ error: { code: 'not_found', message: 'No such API route.' } });
    expect(notUuid.status).toBe(404);
  });

  it('When sign-in input is missing or malformed, then 400 names each field', async () => {
    const res = await request(h.app).post('/api/auth/login').send({ email: 'not-an-address' });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields.map((f: { path: string }) => f.path).sort()).toEqual(['email', 'password']);
    expect(res.body.error.message).toContain('email: Enter a valid e-mail address.');
  });
});

describe('security headers', () => {
  it('When any API route answers, then helmet security headers are present and X-Powered-By is not', async () => {
    // Act
    const res = await request(h.app).get('/api/health');
    // Assert: helmet 8's documented defaults (helmetjs.github.io, "Reference"), with our CSP additions.
    expect(res.status).toBe(200);
    expect(res.headers).toMatchObject({
      'x-content-type-options': 'nosniff',
      'x-frame-options': 'SAMEORIGIN',
      'referrer-policy': 'no-referrer',
      'cross-origin-opener-policy': 'same-origin',
      'cross-origin-resource-policy': 'same-origin',
      'x-dns-prefetch-control': 'off',
      'x-download-options': 'noopen',
      'x-permitted-cross-domain-policies': 'none',
      'origin-agent-cluster': '?1',
      'x-xss-protection': '0',
      'cache-control': 'no-store',
    });
    const csp = res.headers['content-security-policy'] as string;
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("script-src 'self'");
    expect(csp).toContain("object-src 'none'");
    expect(csp).toContain("frame-ancestors 'self'");
    expect(csp).toContain("style-src 'self' 'unsafe-inline'");
    // Plain-HTTP public URL: no HSTS and no upgrade-insecure-requests, or a loopback install would lock itself out.
    expect(csp).not.toContain('upgrade-insecure-requests');
    expect(res.headers['strict-transport-security']).toBeUndefined();
    expect(res.headers['x-powered-by']).toBeUndefined();
  });

  it('When the public URL is HTTPS, then the session cookie is Secure and HSTS and upgrade-insecure-requests are sent', async () => {
    // Arrange: a second app on the same connections, configured as served over HTTPS by a proxy.
    const https = h.appWithConfig({ publicUrl: 'https://gatepost.hollowmere.example' });
    const analyst = demo.users.analyst;
    // Act
    const health = await request(https).get('/api/health');
    const signIn = await request(https).post('/api/auth/login').send({ email: analyst.email, password: analyst.password });
    // Assert: helmet's default HSTS is max-age=31536000; includeSubDomains (helmetjs.github.io, "Reference").
    expect(health.headers['strict-transport-security']).toBe('max-age=31536000; includeSubDomains');
    expect(health.headers['content-security-policy']).toContain('upgrade-insecure-requests');
    expect(signIn.status).toBe(200);
    expect(setCookieFor(signIn.headers, SESSION_COOKIE)).toMatch(/; Secure/);
  });
});

describe('audit trail', () => {
  it('When raw SQL tries to UPDATE or DELETE audit events, then the database refuses and the rows stay', async () => {
    // Arrange: at least one event exists (creating an API token is audited).
    await request(h.app).post('/api/me/tokens').set('Cookie', h.sessionCookie(demo.users.analyst.id)).send({ name: 'audit probe', password: demo.users.analyst.password });
    const before = await AuditEvent.count();
    expect(before).toBeGreaterThan(0);
    // Act + Assert
    await expect(h.sequelize.query("UPDATE audit_events SET action = 'tampered'")).rejects.toThrow('audit_events is append-only');
    await expect(h.sequelize.query('DELETE FROM audit_events')).rejects.toThrow('audit_events is append-only');
    expect(await AuditEvent.count()).toBe(before);
    expect(await AuditEvent.count({ where: { action: 'tampered' } })).toBe(0);
  });

  it('When people sign in, fail to sign in and invite, then each is recorded with who, what and from where', async () => {
    // Arrange
    const startId = Number((await AuditEvent.max('id')) ?? 0);
    const admin = demo.users.admin;
    const email = uniqueEmail('audit.invitee');
    // Act
    await login(demo.users.experimenter.email, 'wrong password');
    await login(admin.email, admin.password);
    const sent = await request(h.app).post(`/api/labs/${demo.labs.hollowmere.id}/invitations`).set('Cookie', h.sessionCookie(admin.id)).send({ email, role: 'experimenter' });
    // Assert
    expect(sent.status).toBe(201);
    const { Op } = await import('sequelize');
    const events = await AuditEvent.findAll({ where: { id: { [Op.gt]: startId } }, order: [['id', 'ASC']] });
    expect(events.map((e) => e.action)).toEqual(['auth.login_failed', 'auth.login', 'invitation.sent']);
    expect(events[0]).toMatchObject({ actorId: demo.users.experimenter.id, labId: null, details: { email: demo.users.experimenter.email } });
    expect(events[1]).toMatchObject({ actorId: admin.id, labId: null });
    expect(events[1].ip).toMatch(/127\.0\.0\.1$/);
    expect(events[2]).toMatchObject({ actorId: admin.id, labId: demo.labs.hollowmere.id, targetType: 'invitation', details: { email, role: 'experimenter' } });
    // The lab's reviewer reads it in the lab's trail, with the actor's name.
    const trail = await request(h.app).get(`/api/labs/${demo.labs.hollowmere.id}/audit`).set('Cookie', h.sessionCookie(demo.users.reviewer.id));
    expect(trail.status).toBe(200);
    expect(trail.body.events[0]).toMatchObject({ action: 'invitation.sent', actor: 'Ines Calder', targetId: events[2].targetId });
  });
});

describe('the last admin', () => {
  it('When the only admin of a lab is demoted or removed, then the answer is 409 and the lab keeps its admin', async () => {
    // Arrange: Hollowmere has exactly one admin in the demo data.
    const lab = demo.labs.hollowmere.id;
    const admin = demo.users.admin;
    const cookie = h.sessionCookie(admin.id);
    expect(await Membership.count({ where: { labId: lab, role: 'admin' } })).toBe(1);
    // Act
    const demote = await request(h.app).patch(`/api/labs/${lab}/members/${admin.id}`).set('Cookie', cookie).send({ role: 'analyst' });
    const remove = await request(h.app).delete(`/api/labs/${lab}/members/${admin.id}`).set('Cookie', cookie);
    // Assert
    for (const res of [demote, remove]) {
      expect(res.status).toBe(409);
      expect(res.body.error.message).toBe('A lab needs at least one admin. Make someone else admin first.');
    }
    expect((await Membership.findOne({ where: { labId: lab, userId: admin.id }, rejectOnEmpty: true })).role).toBe('admin');
  });

  it('When a second admin exists, then the first may step down', async () => {
    // Arrange: a lab of its own, so the demo lab keeps its single admin.
    const lab = await Lab.create({ name: 'Step-down test lab', slug: `step-down-${Date.now().toString(36)}` });
    const [first, second] = await Promise.all(
      ['first', 'second'].map((n) => User.create({ email: uniqueEmail(n), name: `${n} admin`, passwordHash: 'not-used' })),
    );
    await Membership.create({ labId: lab.id, userId: first.id, role: 'admin' });
    await Membership.create({ labId: lab.id, userId: second.id, role: 'experimenter' });
    const cookie = h.sessionCookie(first.id);
    // Act
    const promote = await request(h.app).patch(`/api/labs/${lab.id}/members/${second.id}`).set('Cookie', cookie).send({ role: 'admin' });
    const stepDown = await request(h.app).patch(`/api/labs/${lab.id}/members/${first.id}`).set('Cookie', cookie).send({ role: 'reviewer' });
    // Assert
    expect(promote.status).toBe(200);
    expect(stepDown.status).toBe(200);
    expect(stepDown.body).toEqual({ userId: first.id, role: 'reviewer' });
  });
});

describe('lab isolation', () => {
  // Everything of Sandgate's that could leak into a Hollowmere answer.
  let sandgate: { labId: string; campaignId: string; shotId: string; invitationId: string; markers: string[] };

  beforeAll(async () => {
    const lab = demo.labs.sandgate;
    const campaign = await Campaign.findOne({ where: { labId: lab.id }, rejectOnEmpty: true });
    const shot = await Shot.create({ labId: lab.id, campaignId: campaign.id, number: 1, firedAt: null, projectileId: null, gateRigId: null, tubePressurePa: null, ambientTemperatureK: 293.15, ambientPressurePa: 101_325, createdBy: null });
    // A real invitation from Sandgate's admin puts an invitation and an audit event in Sandgate's lab.
    const sent = await request(h.app).post(`/api/labs/${lab.id}/invitations`).set('Cookie', h.sessionCookie(demo.users.otherLabAdmin.id))
      .send({ email: 'sandgate.newcomer@sandgate.example', role: 'analyst' });
    expect(sent.status).toBe(201);
    sandgate = {
      labId: lab.id, campaignId: campaign.id, shotId: shot.id, invitationId: sent.body.invitation.id,
      markers: [lab.id, 'Sandgate', 'sandgate', campaign.id, 'Drop calibration', 'Drop tower pair', shot.id, demo.users.otherLabAdmin.id, demo.users.otherLabAdmin.email, sent.body.invitation.id],
    };
  });
  // The top-level beforeEach empties Redis, so put a Sandgate message back into the fake outbox, through real SMTP.
  beforeEach(async () => {
    await h.deps.mailer.send({ to: 'sandgate.newcomer@sandgate.example', labId: sandgate.labId, subject: 'Sandgate drop tower schedule', text: 'Sandgate only.' });
  });

  const leaks = (body: unknown) => sandgate.markers.filter((m) => JSON.stringify(body).includes(m));

  it('When a Hollowmere user calls every GET route with Hollowmere ids or none, then no answer contains Sandgate data', async () => {
    // Arrange: the Hollowmere admin may read everything in Hollowmere (outbox, invitations, audit included).
    const cookie = h.sessionCookie(demo.users.admin.id);
    const own: Record<string, string> = { labId: demo.labs.hollowmere.id, campaignId: demo.hollowmere.campaignIds[0], shotId: demo.hollowmere.shotIds[0] };
    // Ids of record kinds this sweep does not know yet get a made-up UUID: such a record does not exist (404), and
    // the answer still must not leak. Routes with secrets in the path (invitation links) are not lab-addressed.
    const routes = allRoutes(h.deps).filter((r) => r.method === 'get' && !r.path.includes(':token'));
    expect(routes.length).toBeGreaterThan(10);
    for (const route of routes) {
      // Act
      let madeUp = false;
      const url = route.path.replace(/:(\w+)/g, (_, name: string) => own[name] ?? ((madeUp = true), crypto.randomUUID()));
      const get = request(h.app).get(url).set('Cookie', cookie);
      const res = await (isStreamRoute(route) ? readStreamStart(get) : get);
      // Assert
      // The seeded shots have no analysis yet: exporting one is refused with 409 (and still tells nothing of Sandgate).
      const needsAnalysis = /^\/api\/shots\/:shotId\/(export|report\.pdf)$/.test(route.path);
      const expected = madeUp ? [404] : needsAnalysis ? [200, 409] : [200];
      expect(expected, `${url}: ${res.status} ${JSON.stringify(res.body).slice(0, 300)}`).toContain(res.status);
      expect(leaks(res.body), url).toEqual([]);
    }
  });

  it("When a Hollowmere user names Sandgate's records in any GET route, then every answer is 404 without Sandgate data", async () => {
    // Arrange
    const cookie = h.sessionCookie(demo.users.admin.id);
    const theirs: Record<string, string> = { labId: sandgate.labId, campaignId: sandgate.campaignId, shotId: sandgate.shotId };
    // Every GET route addressed through a lab, a campaign or a shot; other ids in the path get a made-up UUID, since
    // the lab check must answer 404 before any record is looked up.
    const routes = allRoutes(h.deps).filter((r) => r.method === 'get' && /:(labId|campaignId|shotId)\b/.test(r.path));
    expect(routes.length).toBeGreaterThan(8);
    for (const route of routes) {
      // Act
      const url = route.path.replace(/:(\w+)/g, (_, name: string) => theirs[name] ?? crypto.randomUUID());
      const res = await request(h.app).get(url).set('Cookie', cookie);
      // Assert
      expect(res.status, url).toBe(404);
      expect(leaks(res.body), url).toEqual([]);
    }
  });

  it("When a Hollowmere admin puts a Sandgate id under Hollowmere's lab path, then the record is not found and stays unchanged", async () => {
    // Arrange
    const cookie = h.sessionCookie(demo.users.admin.id);
    const lab = demo.labs.hollowmere.id;
    const sam = demo.users.otherLabAdmin.id;
    // Act
    const campaign = await request(h.app).get(`/api/labs/${lab}/campaigns/${sandgate.campaignId}`).set('Cookie', cookie);
    const demote = await request(h.app).patch(`/api/labs/${lab}/members/${sam}`).set('Cookie', cookie).send({ role: 'reviewer' });
    const remove = await request(h.app).delete(`/api/labs/${lab}/members/${sam}`).set('Cookie', cookie);
    const withdraw = await request(h.app).delete(`/api/labs/${lab}/invitations/${sandgate.invitationId}`).set('Cookie', cookie);
    // Assert
    expect([campaign.status, demote.status, remove.status, withdraw.status]).toEqual([404, 404, 404, 404]);
    expect((await Membership.findOne({ where: { labId: sandgate.labId, userId: sam }, rejectOnEmpty: true })).role).toBe('admin');
    expect((await Invitation.findByPk(sandgate.invitationId, { rejectOnEmpty: true })).revokedAt).toBeNull();
  });

  it('When a Hollowmere user asks who they are, then only Hollowmere memberships are listed', async () => {
    // Act
    const res = await request(h.app).get('/api/auth/me').set('Cookie', h.sessionCookie(demo.users.reviewer.id));
    // Assert
    expect(res.body.memberships).toEqual([{ labId: demo.labs.hollowmere.id, labName: 'Hollowmere Ballistics Lab', labSlug: 'hollowmere', role: 'reviewer' }]);
    expect(leaks(res.body)).toEqual([]);
  });
});

describe('invitation secrets', () => {
  it('When an invitation is sent, then the database holds the SHA-256 of the link secret, never the secret', async () => {
    // Arrange
    const email = uniqueEmail('hash.check');
    const sent = await request(h.app).post(`/api/labs/${demo.labs.hollowmere.id}/invitations`).set('Cookie', h.sessionCookie(demo.users.admin.id)).send({ email, role: 'reviewer' });
    expect(sent.status).toBe(201);
    const secret = /\/invite\/([A-Za-z0-9_-]+)/.exec((await readFakeOutbox(h.redis)).find((m) => m.to.includes(email))!.text)![1];
    // Act
    const [rows] = await h.sequelize.query('SELECT row_to_json(i)::text AS j FROM invitations i WHERE id = $1', { bind: [sent.body.invitation.id] });
    // Assert
    const stored = (rows as Array<{ j: string }>)[0].j;
    expect(stored).not.toContain(secret);
    expect(stored).toContain(sha256Hex(secret));
    expect(JSON.stringify(sent.body)).not.toContain(secret);
  });
});
