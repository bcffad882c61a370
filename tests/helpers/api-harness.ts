// The API under test with its real dependencies: the throwaway PostgreSQL and Redis of scripts/with-services.sh,
// the real nodemailer transport and an in-process fake SMTP server that shares the test Redis. Only the clock-heavy
// parts are made fast: a short sign-in window, sessions minted without argon2.
import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Express } from 'express';
import { Redis } from 'ioredis';
import type { Sequelize } from 'sequelize';
import type { Role } from '../../shared/contracts/roles.ts';
import { buildApp } from '../../server/app.ts';
import { loadConfig, type Config } from '../../server/config.ts';
import { Campaign, GateRig, Lab, Membership, Projectile, Shot, User } from '../../server/db/models/index.ts';
import { demoAccounts, seedDemo } from '../../server/db/seeders/demo.ts';
import { createSequelize } from '../../server/db/sequelize.ts';
import { startFakeSmtp, type FakeSmtpCredentials } from '../../server/dev/fake-smtp.ts';
import { SESSION_COOKIE } from '../../server/lib/authenticate.ts';
import type { Deps } from '../../server/lib/deps.ts';
import { createLogger } from '../../server/lib/logger.ts';
import { createMailer, type Mailer } from '../../server/lib/mailer.ts';
import { createLoginLimiter } from '../../server/lib/rate-limit.ts';
import { createJobQueues } from '../../server/lib/job-queues.ts';
import { signSession } from '../../server/lib/tokens.ts';
import { LocalDiskStore } from '../../server/storage/local-disk-store.ts';

/** The columns of the authorization matrix: four Hollowmere roles, another lab's admin, and nobody. */
export type DemoActor = Role | 'otherLabAdmin';

export interface DemoUser {
  id: string;
  email: string;
  /** The demo password from server/db/seeders/demo-accounts.json. */
  password: string;
  name: string;
  role: Role;
  labSlug: 'hollowmere' | 'sandgate';
}

export interface DemoLab {
  id: string;
  name: string;
  slug: string;
}

/** The ids of the demo records after the last reset (UUIDs change with every seed). */
export interface DemoWorld {
  labs: { hollowmere: DemoLab; sandgate: DemoLab };
  users: Record<DemoActor, DemoUser>;
  hollowmere: { campaignIds: string[]; shotIds: string[]; projectileIds: string[]; gateRigIds: string[] };
  sandgate: { campaignIds: string[]; shotIds: string[]; projectileIds: string[]; gateRigIds: string[] };
}

export interface ApiHarnessOptions {
  /** Config values that win over the environment, on top of the harness's own test settings. @default {} */
  config?: Partial<Config>;
}

export interface ApiHarness {
  app: Express;
  deps: Deps;
  config: Config;
  sequelize: Sequelize;
  redis: Redis;
  smtpPort: number;
  /** Empties every app table and Redis, then seeds the demo labs again; returns (and keeps) the new ids. */
  resetDatabase(): Promise<DemoWorld>;
  /** FLUSHDB only: rate-limit counters, revoked sessions, the fake outbox. */
  resetRedis(): Promise<void>;
  /** The demo world of the last reset; throws before the first one. */
  readonly demo: DemoWorld;
  /** A `Cookie` header value carrying a fresh session of this user, minted without a sign-in (no argon2). */
  sessionCookie(userId: string): string;
  /** Builds a second app on the same database and Redis with another mailer (e.g. one whose server is down). */
  appWithMailer(mailer: Mailer): Express;
  /** Builds a second app on the same connections with some settings changed (e.g. an HTTPS public URL). */
  appWithConfig(overrides: Partial<Config>): Express;
  close(): Promise<void>;
}

// umzug's record of applied migrations: the one table a reset must keep.
const KEEP_TABLES = ['schema_migrations'];

function requireEnv(name: string): string {
  const value = process.env[name];
  if (!value) throw new Error(`${name} is not set: run the API tests through bash scripts/with-services.sh (npm run test:api)`);
  return value;
}

/** A loopback port nobody listens on right now (bound, read, released). */
export async function freeLoopbackPort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as { port: number };
      server.close(() => resolve(port));
    });
  });
}

/**
 * The sign-in the tests' fake SMTP servers ask for: GATEPOST_SMTP_USER / GATEPOST_SMTP_PASSWORD, which
 * scripts/with-services.sh sets for the whole run (as npm start does for its children), so the app processes a test
 * starts (startAppProcesses copies process.env) sign in with the same pair. Made here when the run lacks them.
 */
export function fakeSmtpCredentials(): FakeSmtpCredentials {
  process.env.GATEPOST_SMTP_USER ||= 'gatepost';
  process.env.GATEPOST_SMTP_PASSWORD ||= randomBytes(32).toString('base64url');
  return { user: process.env.GATEPOST_SMTP_USER, password: process.env.GATEPOST_SMTP_PASSWORD };
}

// Sequelize models are bound to one connection pool per process (initModels), so a second harness would re-bind
// them and leave them on a closed pool when it closes. One harness per test file; use appWith…() for variants.
let liveHarness = false;

/** Starts the fake SMTP server and builds the app against the test PostgreSQL and Redis. */
export async function createApiHarness(options: ApiHarnessOptions = {}): Promise<ApiHarness> {
  if (liveHarness) {
    throw new Error('an API harness is already open in this test file: close it first, or use appWithConfig()/appWithMailer()');
  }
  liveHarness = true;
  const databaseUrl = requireEnv('GATEPOST_TEST_DATABASE_URL');
  const redisUrl = requireEnv('GATEPOST_TEST_REDIS_URL');
  // maxRetriesPerRequest: null keeps the test client patient; the app's own client settings are not under test here.
  const redis = new Redis(redisUrl, { maxRetriesPerRequest: null });
  const smtpCredentials = fakeSmtpCredentials();
  const smtp = await startFakeSmtp({ port: 0, redis, credentials: smtpCredentials });
  const config = loadConfig(process.env, {
    nodeEnv: 'test',
    databaseUrl,
    redisUrl,
    mailOutbox: 'fake',
    smtpHost: '127.0.0.1',
    smtpPort: smtp.port,
    smtpUser: smtpCredentials.user,
    smtpPassword: smtpCredentials.password,
    // 3 failures keep the rate-limit loop short. The window is short (default 900 s) so leftover counters clear
    // themselves, yet long enough that three argon2 checks on a loaded 2-core machine (~1 s each seen) fit in it.
    loginMaxFailures: 3,
    loginWindowSeconds: 10,
    // Delays as the real ones (doubling to a cap) but in milliseconds, so failure loops stay quick.
    loginDelayStepMs: 5,
    loginMaxDelayMs: 40,
    logLevel: (process.env.GATEPOST_TEST_LOG_LEVEL as Config['logLevel'] | undefined) ?? 'silent',
    publicUrl: 'http://127.0.0.1:8640',
    ...options.config,
  });
  const logger = createLogger(config.logLevel, 'api-test');
  const sequelize = createSequelize(config.databaseUrl);
  const mailer = createMailer(config);
  const loginLimiter = createLoginLimiter(redis, config);
  // Blobs of this test run only, in a temp folder removed by close().
  const blobDir = mkdtempSync(path.join(tmpdir(), 'gatepost-blobs-'));
  const blobStore = new LocalDiskStore(blobDir);
  // Jobs queued by in-process API tests land in the test Redis; no worker runs them unless a test starts one.
  const queues = createJobQueues(redisUrl);
  const deps: Deps = { config, logger, sequelize, redis, mailer, loginLimiter, blobStore, queues };
  const app = buildApp(deps);
  const extraMailers: Mailer[] = [];
  let demo: DemoWorld | null = null;

  // Orders fixed by the seed's own data (creation times can tie within a millisecond): campaigns by start date, so
  // Hollowmere's first is the vacuum sweep with its shots; shots by number; library items by name.
  async function idsOf(labId: string) {
    const where = { labId };
    const ids = (rows: { id: string }[]) => rows.map((r) => r.id);
    return {
      campaignIds: ids(await Campaign.findAll({ where, attributes: ['id'], order: [['startedOn', 'ASC'], ['name', 'ASC']] })),
      shotIds: ids(await Shot.findAll({ where, attributes: ['id'], order: [['number', 'ASC']] })),
      projectileIds: ids(await Projectile.findAll({ where, attributes: ['id'], order: [['name', 'ASC']] })),
      gateRigIds: ids(await GateRig.findAll({ where, attributes: ['id'], order: [['name', 'ASC']] })),
    };
  }

  // Every table the migrations made, read from the catalog, so tables of later migrations are emptied too.
  let appTables: string[] | null = null;
  async function tablesToEmpty(): Promise<string[]> {
    if (!appTables) {
      const [rows] = await sequelize.query("SELECT tablename FROM pg_tables WHERE schemaname = 'public' ORDER BY tablename");
      appTables = (rows as { tablename: string }[]).map((r) => r.tablename).filter((t) => !KEEP_TABLES.includes(t));
      if (!appTables.includes('labs')) throw new Error('the test database has no app tables: were the migrations run?');
    }
    return appTables;
  }

  async function loadDemo(): Promise<DemoWorld> {
    const labRows = await Lab.findAll();
    const lab = (slug: string): DemoLab => {
      const row = labRows.find((l) => l.slug === slug);
      if (!row) throw new Error(`demo lab ${slug} missing after seeding`);
      return { id: row.id, name: row.name, slug: row.slug };
    };
    const labs = { hollowmere: lab('hollowmere'), sandgate: lab('sandgate') };
    const users = {} as Record<DemoActor, DemoUser>;
    for (const account of demoAccounts) {
      const user = await User.findOne({ where: { email: account.email }, rejectOnEmpty: true });
      const membership = await Membership.findOne({ where: { userId: user.id, labId: labs[account.lab].id }, rejectOnEmpty: true });
      const actor: DemoActor = account.lab === 'sandgate' ? 'otherLabAdmin' : membership.role;
      // The first account of each role in demo-accounts.json stands for that role.
      users[actor] ??= { id: user.id, email: user.email, password: account.password, name: user.name, role: membership.role, labSlug: account.lab };
    }
    for (const actor of ['admin', 'experimenter', 'analyst', 'reviewer', 'otherLabAdmin'] as const) {
      if (!users[actor]) throw new Error(`demo-accounts.json has no ${actor}`);
    }
    return { labs, users, hollowmere: await idsOf(labs.hollowmere.id), sandgate: await idsOf(labs.sandgate.id) };
  }

  const harness: ApiHarness = {
    app,
    deps,
    config,
    sequelize,
    redis,
    smtpPort: smtp.port,
    async resetDatabase() {
      // TRUNCATE fires no row triggers, so the append-only audit table empties too (UPDATE/DELETE stay forbidden).
      const tables = await tablesToEmpty();
      await sequelize.query(`TRUNCATE ${tables.map((t) => `"${t}"`).join(', ')} RESTART IDENTITY CASCADE`);
      await redis.flushdb();
      await seedDemo(sequelize);
      demo = await loadDemo();
      return demo;
    },
    async resetRedis() {
      await redis.flushdb();
    },
    get demo() {
      if (!demo) throw new Error('call resetDatabase() before using the demo world');
      return demo;
    },
    sessionCookie(userId) {
      const { token } = signSession(userId, config.jwtSecret, config.sessionHours);
      return `${SESSION_COOKIE}=${token}`;
    },
    appWithMailer(other) {
      extraMailers.push(other);
      return buildApp({ ...deps, mailer: other });
    },
    appWithConfig(overrides) {
      return buildApp({ ...deps, config: { ...config, ...overrides } });
    },
    async close() {
      await queues.close();
      mailer.close();
      for (const m of extraMailers) m.close();
      await smtp.close();
      await sequelize.close();
      await redis.quit();
      rmSync(blobDir, { recursive: true, force: true });
      liveHarness = false;
    },
  };
  return harness;
}

/** The value of one cookie from a response's Set-Cookie headers, with its attributes, or undefined. */
export function setCookieFor(headers: Record<string, unknown>, name: string): string | undefined {
  const raw = headers['set-cookie'];
  const list = Array.isArray(raw) ? (raw as string[]) : typeof raw === 'string' ? [raw] : [];
  return list.find((c) => c.startsWith(`${name}=`));
}

/** `name=value` of a Set-Cookie line, ready to send back as a Cookie header. */
export function cookiePair(setCookie: string): string {
  return setCookie.split(';')[0];
}
