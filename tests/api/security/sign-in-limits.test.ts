// Issue 12, item 3: guessing is slowed down without handing out a denial of service. Counted per account and source
// address; progressive delays; a lab admin can unlock; the owner is told by mail about repeated failures.
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../../server/db/models/index.ts';
import { readFakeOutbox } from '../../../server/dev/fake-smtp.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../../helpers/api-harness.ts';

let h: ApiHarness;
let demo: DemoWorld;
const ELSEWHERE = '203.0.113.99'; // RFC 5737 documentation address: someone guessing from another network

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
});
beforeEach(() => h.resetRedis());
afterAll(() => h?.close());

const login = (email: string, password: string) => request(h.app).post('/api/auth/login').send({ email, password });

/** A wrong password from `address`, through the app's own limiter (the HTTP path comes from 127.0.0.1 only). */
async function failedAttempt(email: string, address: string) {
  const attempt = await h.deps.loginLimiter.reserve(email, address);
  if (!attempt.blocked) await h.deps.loginLimiter.fail(email, address);
  return attempt;
}

describe('sign-in limits', () => {
  it('When someone on another network fails past the limit on an account, then its owner still signs in', async () => {
    const owner = demo.users.experimenter;
    // The other network's attempts, counted by the app's own limiter (the HTTP path comes from 127.0.0.1 only).
    for (let i = 0; i < h.config.loginMaxFailures + 3; i++) await failedAttempt(owner.email, ELSEWHERE);
    expect((await h.deps.loginLimiter.reserve(owner.email, ELSEWHERE)).blocked).toBe(true);
    expect((await login(owner.email, owner.password)).status).toBe(200);
  });

  it('When many people on one network mistype their passwords, then none of them is refused', async () => {
    const accounts = Object.values(demo.users);
    // From one address: each account one failure short of its own limit, and a few mistyped e-mail addresses; in all
    // more than the earlier per-address limit (4 x loginMaxFailures), after which everyone there was refused.
    const rounds = h.config.loginMaxFailures - 1;
    for (let round = 0; round < rounds; round++) {
      for (const user of accounts) expect((await login(user.email, `typo-${round}`)).status, user.email).toBe(401);
    }
    const mistypedAddresses = Array.from({ length: 6 }, (_, i) => `colleague${i}@hollowmere.exampel`);
    for (const email of mistypedAddresses) expect((await login(email, 'whatever')).status, email).toBe(401);
    expect(accounts.length * rounds + mistypedAddresses.length).toBeGreaterThan(4 * h.config.loginMaxFailures);
    for (const user of accounts) expect((await login(user.email, user.password)).status, user.email).toBe(200);
  });

  it('When failures reach the limit on an account, then its owner gets one mail saying so, with the address', async () => {
    const owner = demo.users.analyst;
    for (let i = 0; i < h.config.loginMaxFailures - 1; i++) await login(owner.email, `guess-${i}`);
    expect((await readFakeOutbox(h.redis)).filter((m) => m.to.includes(owner.email))).toEqual([]);
    for (let i = 0; i < 3; i++) await login(owner.email, `guess-more-${i}`);
    const mails = await pollOutbox(owner.email);
    expect(mails).toHaveLength(1);
    expect(mails[0].subject).toBe('Failed sign-ins to your Gatepost account');
    expect(mails[0].text).toContain(`${h.config.loginMaxFailures} attempts to sign in to your Gatepost account (${owner.email}) failed`);
    expect(mails[0].text).toMatch(/the latest from the address (::ffff:)?127\.0\.0\.1 at /);
  });

  it('When a lab admin unlocks a member, then the member signs in at once, and the unlock is in the audit trail', async () => {
    const member = demo.users.reviewer;
    for (let i = 0; i < h.config.loginMaxFailures; i++) await login(member.email, `wrong-${i}`);
    expect((await login(member.email, member.password)).status).toBe(429);
    const url = `/api/labs/${demo.labs.hollowmere.id}/members/${member.id}/unlock-sign-in`;
    expect((await request(h.app).post(url).set('Cookie', h.sessionCookie(demo.users.experimenter.id))).status).toBe(403);
    expect((await request(h.app).post(url).set('Cookie', h.sessionCookie(demo.users.otherLabAdmin.id))).status).toBe(404);
    expect((await request(h.app).post(url).set('Cookie', h.sessionCookie(demo.users.admin.id))).status).toBe(204);
    expect((await login(member.email, member.password)).status).toBe(200);
    const audit = await AuditEvent.findOne({ where: { action: 'member.sign_in_unlocked', targetId: member.id } });
    expect(audit?.actorId).toBe(demo.users.admin.id);
  });

  it('When ten people sign in at once with one shared account and the right password, then none gets 429', async () => {
    // A class starting together on the lab's shared account, from one address: failures limit, successes must not.
    const shared = demo.users.experimenter;
    const answers = await Promise.all(Array.from({ length: 10 }, () => login(shared.email, shared.password)));
    expect(answers.map((r) => r.status), JSON.stringify(answers.map((r) => r.body.error))).toEqual(Array(10).fill(200));
    // And the limit still holds for wrong passwords sent at once: at most loginMaxFailures are checked.
    const guesses = await Promise.all(Array.from({ length: h.config.loginMaxFailures + 3 }, (_, i) => login(shared.email, `guess-at-once-${i}`)));
    expect(guesses.filter((r) => r.status === 401)).toHaveLength(h.config.loginMaxFailures);
    expect(guesses.filter((r) => r.status === 429)).toHaveLength(3);
  });

  it('When failures pile up, then each further attempt is held longer (delays double up to the cap), and a right password still gets in', async () => {
    const user = demo.users.admin;
    const delays: number[] = [];
    for (let i = 0; i < 6; i++) delays.push((await failedAttempt(user.email, `203.0.113.${i}`)).delayMs);
    const step = h.config.loginDelayStepMs;
    expect(delays).toEqual([0, 0, 0, step, 2 * step, 4 * step].map((d) => Math.min(d, h.config.loginMaxDelayMs)));
    expect((await login(user.email, user.password)).status).toBe(200);
  });
});

async function pollOutbox(to: string) {
  // The mail is sent before the 401 is answered, so it is there; the fake server stores it as the SMTP exchange ends.
  for (let i = 0; i < 50; i++) {
    const mails = (await readFakeOutbox(h.redis)).filter((m) => m.to.includes(to));
    if (mails.length > 0) return mails;
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  return [];
}
