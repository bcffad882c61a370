// Issue 12, items 14 and 15, on npm start's side: GATEPOST_PUBLIC_URL is honoured (an https address behind a proxy
// gives Secure cookies and HSTS, tests/api/auth.test.ts) instead of being forced to http://127.0.0.1, and the API and
// worker get the mail stand-in's sign-in. Read back through the server's own loadConfig, as the children read it.
import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../../server/config.ts';
import { startEnvironment } from '../../../scripts/lib/start-env.ts';

const input = {
  databaseUrl: 'postgres://gatepost:pw@127.0.0.1:5544/gatepost', redisUrl: 'redis://:pw@127.0.0.1:6391', webPort: 8640, smtpPort: 2526,
  smtpPassword: 'generated-smtp-password-0123456789', dataDir: '/tmp/gp-data', jwtSecret: 'a-generated-secret-of-enough-length-0123456789',
};

describe('the environment npm start gives its children', () => {
  it('When GATEPOST_PUBLIC_URL is an https address, then the children get it and the server still listens on loopback', () => {
    const { env, localUrl, publicUrl } = startEnvironment({ ...input, base: { GATEPOST_PUBLIC_URL: 'https://gatepost.lab.example' } });
    expect(publicUrl).toBe('https://gatepost.lab.example');
    expect(localUrl).toBe('http://127.0.0.1:8640');
    const config = loadConfig(env);
    expect(config.publicUrl).toBe('https://gatepost.lab.example');
    expect(config.port).toBe(8640);
  });

  it('When GATEPOST_PUBLIC_URL is not set, then the address is the loopback one', () => {
    const { env, publicUrl } = startEnvironment({ ...input, base: {} });
    expect(publicUrl).toBe('http://127.0.0.1:8640');
    expect(loadConfig(env).publicUrl).toBe('http://127.0.0.1:8640');
  });

  it('When the children start, then the app\'s mailer has the mail stand-in\'s user name and generated password', () => {
    const config = loadConfig(startEnvironment({ ...input, base: {} }).env);
    expect(config).toMatchObject({ smtpHost: '127.0.0.1', smtpPort: 2526, smtpUser: 'gatepost', smtpPassword: 'generated-smtp-password-0123456789', mailOutbox: 'fake' });
  });
});
