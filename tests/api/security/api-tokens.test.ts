// Issue 12, item 6: an API token cannot mint a token (which could outlive its expiry and revocation). Creating and
// listing tokens need a browser session, and creating one needs the account's password typed again.
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { ApiToken } from '../../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../../helpers/api-harness.ts';

let h: ApiHarness;
let demo: DemoWorld;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
});
beforeEach(() => h.resetRedis());
afterAll(() => h?.close());

async function tokenOf(user: { id: string; password: string }, expiresInDays?: number): Promise<string> {
  const res = await request(h.app).post('/api/me/tokens').set('Cookie', h.sessionCookie(user.id)).send({ name: 'uploader', expiresInDays, password: user.password });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.secret as string;
}

describe('API tokens', () => {
  it('When a token that expires tomorrow tries to make a token that never expires, then 403 and none is made', async () => {
    const user = demo.users.experimenter;
    const secret = await tokenOf(user, 1);
    const before = await ApiToken.count();
    const res = await request(h.app).post('/api/me/tokens').set('Authorization', `Bearer ${secret}`).send({ name: 'forever', password: user.password });
    expect(res.status).toBe(403);
    expect(res.body.error).toMatchObject({ code: 'session_required', message: 'Tokens are made only in a signed-in browser session (API tokens page), not with an API token.' });
    expect(await ApiToken.count()).toBe(before);
  });

  it('When a token asks for the list of tokens, then 403; the token still works for the lab\'s data', async () => {
    const secret = await tokenOf(demo.users.analyst);
    expect((await request(h.app).get('/api/me/tokens').set('Authorization', `Bearer ${secret}`)).status).toBe(403);
    expect((await request(h.app).get(`/api/labs/${demo.labs.hollowmere.id}/campaigns`).set('Authorization', `Bearer ${secret}`)).status).toBe(200);
  });

  it('When a session makes a token without the password or with a wrong one, then it is refused and none is made', async () => {
    const user = demo.users.reviewer;
    const cookie = h.sessionCookie(user.id);
    const before = await ApiToken.count();
    const missing = await request(h.app).post('/api/me/tokens').set('Cookie', cookie).send({ name: 'stolen laptop' });
    expect(missing.status).toBe(400);
    expect(JSON.stringify(missing.body)).toContain('Type your password to confirm.');
    const wrong = await request(h.app).post('/api/me/tokens').set('Cookie', cookie).send({ name: 'stolen laptop', password: 'guess' });
    expect(wrong.status).toBe(403);
    expect(wrong.body.error.message).toBe('That is not your password. Type the password you sign in with.');
    expect(await ApiToken.count()).toBe(before);
  });

  it('When someone with an unattended session guesses the password here, then the sign-in limiter stops it too', async () => {
    const user = demo.users.admin;
    const cookie = h.sessionCookie(user.id);
    const answers: number[] = [];
    for (let i = 0; i <= h.config.loginMaxFailures; i++) {
      answers.push((await request(h.app).post('/api/me/tokens').set('Cookie', cookie).send({ name: 'x', password: `guess-${i}` })).status);
    }
    expect(answers).toEqual([...Array(h.config.loginMaxFailures).fill(403), 429]);
  });
});
