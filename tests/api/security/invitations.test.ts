// Issue 12, item 9: the invitation link is the addressee's proof of owning the address. Admins see that an
// invitation was sent, not its link; five simultaneous accepts give one success and four clear 409s.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { User } from '../../../server/db/models/index.ts';
import { readFakeOutbox } from '../../../server/dev/fake-smtp.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../../helpers/api-harness.ts';

let h: ApiHarness;
let demo: DemoWorld;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
});
afterAll(() => h?.close());

async function invite(email: string): Promise<string> {
  const admin = h.sessionCookie(demo.users.admin.id);
  const sent = await request(h.app).post(`/api/labs/${demo.labs.hollowmere.id}/invitations`).set('Cookie', admin).send({ email, role: 'analyst' });
  expect(sent.status, JSON.stringify(sent.body)).toBe(201);
  const mail = (await readFakeOutbox(h.redis)).find((m) => m.to.includes(email))!;
  return /\/invite\/([A-Za-z0-9_-]+)/.exec(mail.text)![1];
}

describe('invitations', () => {
  it('When a lab admin reads the outbox, then the invitation is there but its link is not', async () => {
    const email = 'future.colleague@elsewhere.example';
    const token = await invite(email);
    const outbox = await request(h.app).get(`/api/labs/${demo.labs.hollowmere.id}/outbox`).set('Cookie', h.sessionCookie(demo.users.admin.id));
    const shown = (outbox.body.messages as Array<{ to: string[]; text: string }>).find((m) => m.to.includes(email))!;
    expect(shown.text).toContain('/invite/[only the addressee sees this link]');
    expect(JSON.stringify(outbox.body)).not.toContain(token);
  });

  it('When five people accept one invitation at once, then one gets the account and four get a clear 409', async () => {
    const email = 'rush.hour@elsewhere.example';
    const token = await invite(email);
    const answers = await Promise.all(Array.from({ length: 5 }, (_, i) =>
      request(h.app).post(`/api/invitations/${token}/accept`).send({ name: `Rush ${i}`, password: `long-enough-password-${i}` })));
    const statuses = answers.map((r) => r.status).sort();
    expect(statuses, JSON.stringify(answers.map((r) => r.body))).toEqual([200, 409, 409, 409, 409]);
    for (const refused of answers.filter((r) => r.status === 409)) {
      expect(refused.body.error.message).toBe('This invitation is being accepted in another window or was just used. Sign in instead.');
    }
    expect(await User.count({ where: { email } })).toBe(1);
  });
});

describe('what an invitation tells, and to whom', () => {
  it('When a lab admin invites an address, then nothing the admin can read carries the link, so only its addressee learns whether the address has an account', async () => {
    // The Sandgate admin's address has an account; Hollowmere's admin invites it and must not learn that.
    const email = demo.users.otherLabAdmin.email;
    const admin = h.sessionCookie(demo.users.admin.id);
    const lab = demo.labs.hollowmere.id;
    const sent = await request(h.app).post(`/api/labs/${lab}/invitations`).set('Cookie', admin).send({ email, role: 'reviewer' });
    expect(sent.status, JSON.stringify(sent.body)).toBe(201);
    const token = /\/invite\/([A-Za-z0-9_-]+)/.exec((await readFakeOutbox(h.redis)).find((m) => m.to.includes(email))!.text)![1];
    const seen: Array<[string, request.Response]> = [['the invitation sent', sent]];
    for (const what of ['invitations', 'outbox', 'audit']) seen.push([what, await request(h.app).get(`/api/labs/${lab}/${what}`).set('Cookie', admin)]);
    for (const [what, res] of seen) {
      expect(res.status, what).toBe(res === sent ? 201 : 200);
      expect(JSON.stringify(res.body), what).not.toContain(token);
      expect(JSON.stringify(res.body), what).not.toMatch(/accountExists|already has an account/i);
    }
    // The addressee, holding the link, is told: sign in with the existing password rather than make an account.
    const offer = await request(h.app).get(`/api/invitations/${token}`);
    expect(offer.body).toMatchObject({ email, accountExists: true });
  });

  it('When five accept one invitation to an existing account at once, then one joins and four get a clear 409', async () => {
    const { email, password } = demo.users.otherLabAdmin;
    const token = await invite(email);
    const answers = await Promise.all(Array.from({ length: 5 }, () =>
      request(h.app).post(`/api/invitations/${token}/accept`).send({ password })));
    const statuses = answers.map((r) => r.status).sort();
    expect(statuses, JSON.stringify(answers.map((r) => r.body))).toEqual([200, 409, 409, 409, 409]);
    for (const refused of answers.filter((r) => r.status === 409)) {
      expect(refused.body.error.message).toBe('This invitation is being accepted in another window or was just used. Sign in instead.');
    }
  });
});
