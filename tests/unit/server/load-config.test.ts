// loadConfig: every setting has a development default and one environment variable; bad values stop start-up
// with a message naming the variable, and production refuses the development JWT secret.
import { describe, expect, it } from 'vitest';
import { ConfigError, loadConfig } from '../../../server/config.ts';

const PRODUCTION_SECRET = 'k7Qm2xV9pL4sT8wZ1nR6yB3cF5hJ0dGa'; // 32 characters, made up for this test

function configError(fn: () => unknown): string {
  try {
    fn();
  } catch (err) {
    expect(err).toBeInstanceOf(ConfigError);
    return (err as Error).message;
  }
  throw new Error('expected a ConfigError');
}

describe('loadConfig', () => {
  it('When the environment is empty, then the development defaults apply', () => {
    // Act
    const config = loadConfig({});
    // Assert: the values documented in server/config.ts for a loopback development install.
    expect(config).toMatchObject({
      nodeEnv: 'development',
      port: 8640,
      host: '127.0.0.1',
      publicUrl: 'http://127.0.0.1:8640',
      databaseUrl: 'postgres://postgres@127.0.0.1:5544/gatepost',
      redisUrl: 'redis://127.0.0.1:6391',
      sessionHours: 12,
      smtpPort: 2526,
      smtpSecure: false,
      mailOutbox: 'fake',
      loginMaxFailures: 5,
      loginWindowSeconds: 900,
      logLevel: 'info',
    });
    expect(config.smtpUser).toBeUndefined();
  });

  it('When variables are set, then they are read and coerced to numbers and booleans', () => {
    // Act
    const config = loadConfig({
      GATEPOST_PORT: '9000', GATEPOST_SMTP_SECURE: 'true', GATEPOST_LOGIN_MAX_FAILURES: '7', GATEPOST_SESSION_HOURS: '1.5',
      GATEPOST_MAIL_OUTBOX: 'smtp', GATEPOST_LOG_LEVEL: 'warn',
    });
    // Assert
    expect(config).toMatchObject({ port: 9000, smtpSecure: true, loginMaxFailures: 7, sessionHours: 1.5, mailOutbox: 'smtp', logLevel: 'warn' });
  });

  it('When a variable is empty, then it counts as unset and the default applies', () => {
    expect(loadConfig({ GATEPOST_PORT: '', GATEPOST_LOG_LEVEL: '' })).toMatchObject({ port: 8640, logLevel: 'info' });
  });

  it('When overrides are given, then they win over the environment', () => {
    expect(loadConfig({ GATEPOST_PORT: '9000' }, { port: 9100 }).port).toBe(9100);
  });

  it('When a variable holds a bad value, then the error names that variable and what is wrong', () => {
    // Act
    const port = configError(() => loadConfig({ GATEPOST_PORT: 'eighty' }));
    const secret = configError(() => loadConfig({ GATEPOST_JWT_SECRET: 'short' }));
    const outbox = configError(() => loadConfig({ GATEPOST_MAIL_OUTBOX: 'pigeon' }));
    const both = configError(() => loadConfig({ GATEPOST_PORT: '70000', GATEPOST_DATABASE_URL: 'mysql://x' }));
    // Assert
    expect(port).toMatch(/^Invalid configuration:\n {2}GATEPOST_PORT: /);
    expect(secret).toBe('Invalid configuration:\n  GATEPOST_JWT_SECRET: must be at least 32 characters');
    expect(outbox).toMatch(/GATEPOST_MAIL_OUTBOX: /);
    expect(both).toMatch(/GATEPOST_PORT: /);
    expect(both).toMatch(/GATEPOST_DATABASE_URL: /);
  });

  it('When the worker settings are unset, then the worker shares its host\'s cores; set, they are read, and below one refused', () => {
    // Act
    const unset = loadConfig({});
    const set = loadConfig({ GATEPOST_WORKER_CORES: '6', GATEPOST_WORKER_CONCURRENCY: '3', GATEPOST_WORKER_HOST: 'rack-2' });
    const zero = configError(() => loadConfig({ GATEPOST_WORKER_CORES: '0' }));
    const none = configError(() => loadConfig({ GATEPOST_WORKER_CONCURRENCY: '0' }));
    // Assert
    expect([unset.workerCores, unset.workerConcurrency, unset.workerHost]).toEqual([undefined, undefined, undefined]);
    expect(set).toMatchObject({ workerCores: 6, workerConcurrency: 3, workerHost: 'rack-2' });
    expect(zero).toMatch(/GATEPOST_WORKER_CORES: /);
    expect(none).toMatch(/GATEPOST_WORKER_CONCURRENCY: /);
  });

  it('When running in production with the development JWT secret, then start-up is refused', () => {
    // Act
    const message = configError(() => loadConfig({ NODE_ENV: 'production' }));
    // Assert
    expect(message).toBe('Invalid configuration:\n  GATEPOST_JWT_SECRET: must be set in production');
  });

  it('When the public URL is not loopback, then the development JWT secret is refused whatever NODE_ENV says (issue 12, item 14)', () => {
    for (const url of ['https://gatepost.lab.example', 'http://192.168.1.20:8640', 'http://[2001:db8::1]:8640']) {
      expect(configError(() => loadConfig({ NODE_ENV: 'development', GATEPOST_PUBLIC_URL: url }))).toBe(
        `Invalid configuration:\n  GATEPOST_JWT_SECRET: must be set when GATEPOST_PUBLIC_URL (${url}) is not a loopback address`,
      );
    }
    for (const url of ['http://127.0.0.1:8640', 'http://localhost:5173', 'http://[::1]:8640', 'http://127.0.1.1:8640']) {
      expect(loadConfig({ NODE_ENV: 'development', GATEPOST_PUBLIC_URL: url }).publicUrl, url).toBe(url);
    }
    expect(loadConfig({ GATEPOST_PUBLIC_URL: 'https://gatepost.lab.example', GATEPOST_JWT_SECRET: PRODUCTION_SECRET }).jwtSecret).toBe(PRODUCTION_SECRET);
  });

  it('When the server listens beyond loopback, then the development JWT secret is refused even with a loopback public URL', () => {
    // Found in the issue 12 review: GATEPOST_HOST=0.0.0.0 with the development secret let anyone on the network sign sessions.
    for (const host of ['0.0.0.0', '::', '192.168.1.20', 'gatepost.lab.example']) {
      expect(configError(() => loadConfig({ NODE_ENV: 'development', GATEPOST_HOST: host }))).toBe(
        `Invalid configuration:\n  GATEPOST_JWT_SECRET: must be set when GATEPOST_HOST (${host}) is not a loopback address`,
      );
    }
    for (const host of ['127.0.0.1', 'localhost', '::1']) expect(loadConfig({ NODE_ENV: 'development', GATEPOST_HOST: host }).host).toBe(host);
    expect(loadConfig({ GATEPOST_HOST: '0.0.0.0', GATEPOST_JWT_SECRET: PRODUCTION_SECRET }).host).toBe('0.0.0.0');
  });

  it('When running in production with a real secret, then the configuration loads', () => {
    const config = loadConfig({ NODE_ENV: 'production', GATEPOST_JWT_SECRET: PRODUCTION_SECRET });
    expect(config).toMatchObject({ nodeEnv: 'production', jwtSecret: PRODUCTION_SECRET });
  });
});
