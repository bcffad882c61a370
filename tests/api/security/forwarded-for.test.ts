// Issue 12, item 4: X-Forwarded-For is believed only from the proxy a setting names (GATEPOST_TRUST_PROXY), so a
// local client can neither dodge the per-address sign-in limit nor forge the addresses in the audit trail.
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../../helpers/api-harness.ts';

let h: ApiHarness;
let demo: DemoWorld;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
});
beforeEach(() => h.resetRedis());
afterAll(() => h?.close());

async function failedSignInIp(app: Parameters<typeof request>[0], forwardedFor: string): Promise<string | null> {
  const email = demo.users.analyst.email;
  const res = await request(app).post('/api/auth/login').set('X-Forwarded-For', forwardedFor).send({ email, password: 'not-it' });
  expect(res.status).toBe(401);
  const event = await AuditEvent.findOne({ where: { action: 'auth.login_failed' }, order: [['createdAt', 'DESC']] });
  return event?.ip ?? null;
}

describe('X-Forwarded-For', () => {
  it('When no proxy is named, then a forged header changes neither the audit address nor the per-address count', async () => {
    const ip = await failedSignInIp(h.app, '198.51.100.23');
    expect(ip).toMatch(/^(::ffff:)?127\.0\.0\.1$/);
    // A client changing the header on every guess is still counted as one address.
    const user = demo.users.reviewer;
    for (let i = 0; i < h.config.loginMaxFailures; i++) {
      await request(h.app).post('/api/auth/login').set('X-Forwarded-For', `198.51.100.${i}`).send({ email: user.email, password: `guess-${i}` });
    }
    const refused = await request(h.app).post('/api/auth/login').set('X-Forwarded-For', '198.51.100.200').send({ email: user.email, password: user.password });
    expect(refused.status).toBe(429);
  });

  it('When GATEPOST_TRUST_PROXY names the proxy, then the address it forwards is the client\'s', async () => {
    const behindProxy = h.appWithConfig({ trustProxy: '127.0.0.1, ::1, ::ffff:127.0.0.1' });
    expect(await failedSignInIp(behindProxy, '198.51.100.23')).toBe('198.51.100.23');
  });
});
