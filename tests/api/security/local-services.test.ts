// Issue 12, item 1: the PostgreSQL and Redis the project runs itself (npm start, and these very tests through
// scripts/with-services.sh) are not open to other users of the machine. Checked on the throwaway services the API
// tests use, and on servers of their own for the secrets' files and the upgrade of a data folder of an earlier
// version (trust for everyone, Redis without a password).
import { execFileSync } from 'node:child_process';
import { chmodSync, mkdirSync, mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { connect } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Redis from 'ioredis';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { query } from '../../helpers/pg-query.ts';
import {
  findPostgresBinDir, freePort, scramSha256Verifier, startPostgres, startRedis, stopPostgresAt, type RunningService,
} from '../../../scripts/lib/services.ts';

/** `url` with its user, password or database changed: what another local program might try. */
function variant(url: string, change: { user?: string; password?: string; database?: string }): string {
  const u = new URL(url);
  if (change.user !== undefined) u.username = change.user;
  if (change.password !== undefined) u.password = change.password;
  if (change.database !== undefined) u.pathname = `/${change.database}`;
  return u.toString();
}

/** Sends one inline command to Redis on 127.0.0.1:port with no AUTH, as any local program could; the first reply line. */
function askRedis(port: number, command: string): Promise<string> {
  return new Promise((resolve, reject) => {
    const socket = connect(port, '127.0.0.1', () => socket.write(`${command}\r\n`));
    socket.setTimeout(5_000, () => socket.destroy(new Error('no answer from Redis')));
    socket.once('data', (chunk) => {
      resolve(chunk.toString().split('\r\n')[0]);
      socket.end();
    });
    socket.once('error', reject);
  });
}

const mode = (file: string): string => (statSync(file).mode & 0o777).toString(8);
const isRoot = process.getuid?.() === 0;

describe('the throwaway PostgreSQL of the API tests', () => {
  const url = process.env.GATEPOST_TEST_DATABASE_URL!;

  it('When another local program connects as the superuser over TCP without a password, then it is refused', async () => {
    await expect(query(variant(url, { user: 'postgres', password: '', database: 'postgres' }), 'SELECT 1')).rejects.toThrow(
      /no pg_hba\.conf entry|password authentication failed/,
    );
    await expect(query(variant(url, { user: 'postgres', password: '', database: 'gatepost' }), 'SELECT 1')).rejects.toThrow();
  });

  it('When someone knows the app role but not its password, then it is refused (scram-sha-256)', async () => {
    await expect(query(variant(url, { password: '' }), 'SELECT 1')).rejects.toThrow(/password/);
    await expect(query(variant(url, { password: 'hollowmere-demo' }), 'SELECT 1')).rejects.toThrow(/password authentication failed/);
  });

  it('When the app connects, then its role is no superuser, owns the app database and every table in it, and reaches no other database', async () => {
    const [me] = await query(url, `SELECT current_user AS role, r.rolsuper, r.rolcreaterole, r.rolcreatedb,
      pg_get_userbyid(d.datdba) AS db_owner FROM pg_roles r, pg_database d WHERE r.rolname = current_user AND d.datname = current_database()`);
    expect(me).toEqual({ role: 'gatepost', rolsuper: false, rolcreaterole: false, rolcreatedb: false, db_owner: 'gatepost' });
    const foreign = await query(url, `SELECT c.relname, pg_get_userbyid(c.relowner) AS owner FROM pg_class c
      JOIN pg_namespace n ON n.oid = c.relnamespace WHERE n.nspname = 'public' AND c.relkind IN ('r', 'S') AND pg_get_userbyid(c.relowner) <> 'gatepost'`);
    expect(foreign).toEqual([]);
    await expect(query(variant(url, { database: 'postgres' }), 'SELECT 1')).rejects.toThrow(/no pg_hba\.conf entry/);
    // The way into the OS the issue named: COPY … FROM PROGRAM runs commands as the postgres user.
    await expect(query(url, "CREATE TEMP TABLE probe (line text); COPY probe FROM PROGRAM 'id'")).rejects.toThrow(/must be superuser|pg_execute_server_program/);
  });
});

describe('the throwaway Redis of the API tests', () => {
  it('When another local program connects without the password, then every command is refused (NOAUTH)', async () => {
    const url = new URL(process.env.GATEPOST_TEST_REDIS_URL!);
    expect(url.password).not.toBe('');
    expect(await askRedis(Number(url.port), 'KEYS *')).toMatch(/^-NOAUTH/);
    expect(await askRedis(Number(url.port), 'GET bull:notify:id')).toMatch(/^-NOAUTH/);
  });
});

describe('servers of their own: secrets and the upgrade of an earlier data folder', () => {
  let folder: string;
  const running: RunningService[] = [];
  const quiet = (): void => undefined;
  beforeAll(() => {
    folder = mkdtempSync(join(tmpdir(), 'gatepost-security-test-'));
    chmodSync(folder, 0o755); // the postgres user must be able to enter it
  });
  afterAll(async () => {
    for (const service of running.reverse()) await service.stop().catch(() => undefined);
    await stopPostgresAt(join(folder, 'old', 'postgres'), 'immediate').catch(() => undefined);
    rmSync(folder, { recursive: true, force: true });
  });

  it('When the services start, then each generated secret is in the data folder with mode 600 and the Redis password is not on its command line', async () => {
    const data = join(folder, 'fresh');
    mkdirSync(data);
    chmodSync(data, 0o711); // as scripts/start.ts leaves the data folder: the postgres user passes through
    const postgres = await startPostgres({ dir: join(data, 'postgres'), port: await freePort(), durable: false, say: quiet });
    running.push(postgres);
    const redis = await startRedis({ dir: join(data, 'redis'), port: await freePort(), persistent: false, say: quiet });
    running.push(redis);
    for (const name of ['postgres-app-password', 'postgres-superuser-password', 'redis-password', 'redis/redis.conf']) {
      expect(mode(join(data, name)), name).toBe('600');
    }
    const appPassword = readFileSync(join(data, 'postgres-app-password'), 'utf8').trim();
    expect(new URL(postgres.url).password).toBe(appPassword);
    const redisPassword = readFileSync(join(data, 'redis-password'), 'utf8').trim();
    expect(new URL(redis.url).password).toBe(redisPassword);
    const pid = readFileSync(join(data, 'redis', 'redis.pid'), 'utf8').trim();
    expect(readFileSync(`/proc/${pid}/cmdline`, 'utf8')).not.toContain(redisPassword);
    // The password reached the server only as a SCRAM verifier.
    expect(readFileSync(join(data, 'postgres.log'), 'utf8')).not.toContain(appPassword);
  });

  it('When the data folder of an earlier version (trust for everyone, no Redis password) starts again, then it is locked down and keeps its data', async () => {
    const data = join(folder, 'old');
    const dir = join(data, 'postgres');
    const [pgPort, redisPort] = [await freePort(), await freePort()];
    // The earlier recipe, word for word: initdb --auth=trust, TCP only, everything made by the superuser.
    const bin = findPostgresBinDir()!;
    const asPostgres = (command: string, args: string[]) =>
      isRoot ? execFileSync('runuser', ['-u', 'postgres', '--', join(bin, command), ...args], { encoding: 'utf8' }) : execFileSync(join(bin, command), args, { encoding: 'utf8' });
    mkdirSync(dir, { recursive: true });
    chmodSync(data, 0o755);
    if (isRoot) execFileSync('chown', ['postgres:postgres', dir]);
    asPostgres('initdb', ['-D', dir, '-U', 'postgres', '--auth=trust', '-E', 'UTF8', '--locale=C.UTF-8', '--no-sync']);
    asPostgres('pg_ctl', ['-D', dir, '-l', join(dir, 'old.log'), '-w', '-o', `-c listen_addresses=127.0.0.1 -p ${pgPort} -k ''`, 'start']);
    const oldUrl = `postgres://postgres@127.0.0.1:${pgPort}`;
    await query(`${oldUrl}/postgres`, 'CREATE DATABASE gatepost');
    await query(`${oldUrl}/gatepost`, `CREATE EXTENSION pgcrypto;
      CREATE TABLE shots (id serial PRIMARY KEY, label text);
      CREATE TABLE schema_migrations (name text PRIMARY KEY);
      INSERT INTO shots (label) VALUES ('shot 12 of the old version');
      CREATE FUNCTION shots_append_only() RETURNS trigger LANGUAGE plpgsql AS $$ BEGIN RETURN NEW; END $$;`);
    asPostgres('pg_ctl', ['-D', dir, '-w', '-m', 'fast', 'stop']);
    execFileSync('redis-server', ['--bind', '127.0.0.1', '--port', String(redisPort), '--daemonize', 'yes', '--dir', join(data, 'redis'),
      '--pidfile', join(data, 'redis', 'redis.pid'), '--appendonly', 'yes', '--save', ''], { cwd: (mkdirSync(join(data, 'redis')), data) });
    const oldRedis = new Redis({ host: '127.0.0.1', port: redisPort, maxRetriesPerRequest: null });
    await oldRedis.rpush('bull:ingest:wait', 'a job queued before the upgrade');
    oldRedis.disconnect();

    // The next `npm start` on that folder (same functions, same arguments as scripts/start.ts).
    const postgres = await startPostgres({ dir, port: pgPort, durable: false, log: join(data, 'postgres.log'), say: quiet });
    running.push(postgres);
    const redis = await startRedis({ dir: join(data, 'redis'), port: redisPort, persistent: true, say: quiet });
    running.push(redis);

    expect(await query(postgres.url, 'SELECT label FROM shots')).toEqual([{ label: 'shot 12 of the old version' }]);
    await query(postgres.url, "INSERT INTO shots (label) VALUES ('shot 13'); ALTER TABLE shots ADD COLUMN note text; CREATE OR REPLACE FUNCTION shots_append_only() RETURNS trigger LANGUAGE plpgsql AS $$ BEGIN RETURN OLD; END $$;");
    const owners = await query(postgres.url, `SELECT c.relname, pg_get_userbyid(c.relowner) AS owner FROM pg_class c
      JOIN pg_namespace n ON n.oid = c.relnamespace WHERE n.nspname = 'public' AND c.relkind IN ('r', 'S') ORDER BY 1`);
    expect(owners).toEqual([
      { relname: 'schema_migrations', owner: 'gatepost' },
      { relname: 'shots', owner: 'gatepost' },
      { relname: 'shots_id_seq', owner: 'gatepost' },
    ]);
    await expect(query(`${oldUrl}/gatepost`, 'SELECT 1')).rejects.toThrow(/no pg_hba\.conf entry/);

    const reader = new Redis(redis.url, { maxRetriesPerRequest: null });
    expect(await reader.lrange('bull:ingest:wait', 0, -1)).toEqual(['a job queued before the upgrade']);
    reader.disconnect();
    expect(await askRedis(redisPort, 'LRANGE bull:ingest:wait 0 -1')).toMatch(/^-NOAUTH/);
  }, 60_000);
});

describe('scramSha256Verifier', () => {
  it('When given the RFC 7677 example password and salt, then its StoredKey and ServerKey are the RFC\'s', () => {
    // RFC 7677 §3: password "pencil", salt W22ZaJ0SNY7soEsUEjb6gQ==, 4096 iterations. StoredKey and ServerKey were
    // computed with Python's hashlib/hmac (not with this function), which also reproduced the RFC's ClientProof
    // dHzbZapW…ndVQ= and ServerSignature 6rriTRBi…95G4= from them, so they are the keys of the RFC's exchange.
    const verifier = scramSha256Verifier('pencil', Buffer.from('W22ZaJ0SNY7soEsUEjb6gQ==', 'base64'), 4096);
    expect(verifier).toBe('SCRAM-SHA-256$4096:W22ZaJ0SNY7soEsUEjb6gQ==$WG5d8oPm3OtcPnkdi4Uo7BkeZkBFzpcXkuLmtbsT4qY=:wfPLwcE6nTWhTAmQ7tl2KeoiWGPlZqQxSrmfPwDl2dU=');
  });
});
