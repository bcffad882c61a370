// Issue 12, item 5: a page on another port of the same host (same site, so the SameSite=Lax cookie goes along)
// must not change anything with the user's session. Bearer-token scripts are unaffected.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Capture } from '../../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../../helpers/api-harness.ts';

let h: ApiHarness;
let demo: DemoWorld;
const csv = Buffer.from('Time (s),CH1 (V)\n0,0\n1e-6,5\n2e-6,0\n');

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
});
afterAll(() => h?.close());

/** A multipart upload to a Hollowmere shot as the experimenter, with the browser headers given. */
function upload(headers: Record<string, string>, name: string) {
  const req = request(h.app).post(`/api/shots/${demo.hollowmere.shotIds[0]}/captures`);
  for (const [key, value] of Object.entries(headers)) req.set(key, value);
  return req.attach('files', Buffer.concat([csv, Buffer.from(`# ${name}\n`)]), `${name}.csv`);
}

describe('cross-site requests with the session cookie', () => {
  it('When a page on another port of the same host posts an upload, then it is refused with 403 and nothing is stored', async () => {
    const before = await Capture.count();
    const res = await upload({ Cookie: h.sessionCookie(demo.users.experimenter.id), Origin: 'http://127.0.0.1:9999', 'Sec-Fetch-Site': 'same-site' }, 'csrf');
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('cross_site_request');
    expect(res.body.error.message).toBe('This request came from another page (http://127.0.0.1:9999), not from Gatepost itself, so it was refused. Make the change in Gatepost; scripts use an API token.');
    expect(await Capture.count()).toBe(before);
  });

  it('When only Origin (an older browser) or only Sec-Fetch-Site names another site, then it is refused too, JSON bodies included', async () => {
    const cookie = h.sessionCookie(demo.users.admin.id);
    const invite = (headers: Record<string, string>) =>
      request(h.app).post(`/api/labs/${demo.labs.hollowmere.id}/invitations`).set('Cookie', cookie).set(headers).send({ email: 'mallory@example.org', role: 'admin' });
    expect((await invite({ Origin: 'http://evil.example' })).status).toBe(403);
    expect((await invite({ 'Sec-Fetch-Site': 'cross-site' })).status).toBe(403);
    // Signing someone in from another site (login CSRF) is refused as well.
    const login = await request(h.app).post('/api/auth/login').set('Sec-Fetch-Site', 'cross-site')
      .send({ email: demo.users.admin.email, password: demo.users.admin.password });
    expect(login.status).toBe(403);
  });

  it('When Gatepost\'s own page posts (same origin), or a script without browser headers, then it goes through', async () => {
    const cookie = h.sessionCookie(demo.users.experimenter.id);
    expect((await upload({ Cookie: cookie, Origin: new URL(h.config.publicUrl).origin, 'Sec-Fetch-Site': 'same-origin' }, 'own-page')).status).toBe(202);
    expect((await upload({ Cookie: cookie }, 'script-with-cookie')).status).toBe(202);
  });

  it('When a script sends a Bearer token, then Origin and Sec-Fetch-Site do not matter', async () => {
    const created = await request(h.app).post('/api/me/tokens').set('Cookie', h.sessionCookie(demo.users.experimenter.id)).send({ name: 'bench script', password: demo.users.experimenter.password });
    expect(created.status).toBe(201);
    const res = await upload({ Authorization: `Bearer ${created.body.secret}`, Origin: 'http://127.0.0.1:9999', 'Sec-Fetch-Site': 'same-site' }, 'bearer');
    expect(res.status).toBe(202);
  });
});
