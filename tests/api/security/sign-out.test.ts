// Issue 12, item 11: sign-out while Redis is down must not look like it worked. The answer says it failed and the
// cookie is left alone (the session is still valid); the page stays (src/app/lab-shell.tsx shows the error).
import { Redis } from 'ioredis';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../../server/app.ts';
import { SESSION_COOKIE } from '../../../server/lib/authenticate.ts';
import { createApiHarness, freeLoopbackPort, setCookieFor, type ApiHarness, type DemoWorld } from '../../helpers/api-harness.ts';

let h: ApiHarness;
let demo: DemoWorld;
let deadRedis: Redis;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
  // A Redis client of the app's kind (fails fast) pointed at a port nobody listens on: Redis is down.
  deadRedis = new Redis({ host: '127.0.0.1', port: await freeLoopbackPort(), maxRetriesPerRequest: 1, connectTimeout: 500, retryStrategy: () => 200 });
  deadRedis.on('error', () => undefined);
});
afterAll(async () => {
  deadRedis?.disconnect();
  await h?.close();
});

describe('sign-out while Redis is down', () => {
  it('When the revocation cannot be recorded, then 503 says sign-out failed, the cookie is not cleared, and the session still works once Redis is back', async () => {
    const cookie = h.sessionCookie(demo.users.analyst.id);
    const down = buildApp({ ...h.deps, redis: deadRedis });
    const res = await request(down).post('/api/auth/logout').set('Cookie', cookie);
    expect(res.status).toBe(503);
    expect(res.body.error.code).toBe('service_unavailable');
    expect(setCookieFor(res.headers, SESSION_COOKIE)).toBeUndefined();
    expect((await request(h.app).get('/api/auth/me').set('Cookie', cookie)).status).toBe(200);
    // With Redis back, signing out works and ends the session.
    const out = await request(h.app).post('/api/auth/logout').set('Cookie', cookie);
    expect(out.status).toBe(204);
    expect((await request(h.app).get('/api/auth/me').set('Cookie', cookie)).status).toBe(401);
  });
});
