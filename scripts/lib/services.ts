// Start and stop the project's own PostgreSQL cluster and Redis server on 127.0.0.1, installing Debian's packages
// when they are missing. Used by scripts/start.ts (durable, fixed ports) and scripts/with-services.ts (throwaway,
// free ports). Recipes and pitfalls: ../shared/STACK.md beside the checkout.
import { spawn } from 'node:child_process';
import { createRequire } from 'node:module';
import { chmodSync, chownSync, closeSync, existsSync, mkdirSync, openSync, readdirSync, readFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { dirname, join } from 'node:path';

/** A failure a person can act on: the scripts print `message` alone, without a stack trace. */
export class ServiceError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ServiceError';
  }
}

export type DebianPackage = 'postgresql' | 'redis-server' | 'chromium' | 'poppler-utils';

/** Where Debian's `chromium` package puts the browser. */
export const CHROMIUM_PATH = '/usr/bin/chromium';

/** Fixed default ports of `npm start`, each overridable by the environment variable named beside it. */
export const DEFAULT_PORTS = {
  postgres: { env: 'GATEPOST_PG_PORT', port: 5544 },
  redis: { env: 'GATEPOST_REDIS_PORT', port: 6391 },
  web: { env: 'GATEPOST_PORT', port: 8640 },
  smtp: { env: 'GATEPOST_SMTP_PORT', port: 2526 },
} as const;

type Say = (line: string) => void;
const defaultSay: Say = (line) => console.log(`[services] ${line}`);

const isRoot = (): boolean => typeof process.getuid === 'function' && process.getuid() === 0;

interface RunResult {
  code: number;
  output: string;
}

/**
 * Runs a command to completion, collecting stdout and stderr together. Resolves on 'exit', not 'close': a daemon
 * started by the command may keep the pipes open long after the command itself has finished.
 */
function run(
  command: string,
  args: string[],
  options: { inherit?: boolean; env?: NodeJS.ProcessEnv; cwd?: string; timeoutMs?: number } = {},
): Promise<RunResult> {
  return new Promise((resolve, reject) => {
    const child = spawn(command, args, {
      cwd: options.cwd ?? '/',
      env: options.env ?? process.env,
      stdio: options.inherit ? ['ignore', 'inherit', 'inherit'] : ['ignore', 'pipe', 'pipe'],
    });
    let output = '';
    child.stdout?.on('data', (chunk: Buffer) => { output += chunk.toString(); });
    child.stderr?.on('data', (chunk: Buffer) => { output += chunk.toString(); });
    child.on('error', (error) => reject(new ServiceError(`could not run ${command}: ${error.message}`)));
    const timer = options.timeoutMs ? setTimeout(() => child.kill('SIGKILL'), options.timeoutMs) : null;
    child.on('exit', (code, signal) => {
      if (timer) clearTimeout(timer);
      child.stdout?.destroy();
      child.stderr?.destroy();
      resolve({ code: code ?? (signal ? 128 : 1), output });
    });
  });
}

/** PostgreSQL refuses to run as root, so as root its commands run as the `postgres` system user. */
function asPostgres(command: string, args: string[]): [string, string[]] {
  return isRoot() ? ['runuser', ['-u', 'postgres', '--', command, ...args]] : [command, args];
}

function findOnPath(name: string): string | null {
  for (const folder of (process.env.PATH ?? '').split(':').concat(['/usr/sbin', '/usr/bin', '/sbin', '/bin'])) {
    if (folder && existsSync(join(folder, name))) return join(folder, name);
  }
  return null;
}

/** Debian installs each PostgreSQL major version under /usr/lib/postgresql/N/bin and puts none of them on PATH. */
export function findPostgresBinDir(): string | null {
  const root = '/usr/lib/postgresql';
  if (existsSync(root)) {
    const versions = readdirSync(root)
      .filter((name) => existsSync(join(root, name, 'bin', 'pg_ctl')) && existsSync(join(root, name, 'bin', 'initdb')))
      .sort((a, b) => Number(b) - Number(a));
    if (versions.length > 0) return join(root, versions[0], 'bin');
  }
  const pgCtl = findOnPath('pg_ctl');
  return pgCtl && findOnPath('initdb') ? dirname(pgCtl) : null;
}

const PACKAGE_PRESENT: Record<DebianPackage, () => boolean> = {
  postgresql: () => findPostgresBinDir() !== null,
  'redis-server': () => findOnPath('redis-server') !== null && findOnPath('redis-cli') !== null,
  chromium: () => existsSync(CHROMIUM_PATH),
  // pdftoppm renders the shot report's PDF pages to PNG in the API tests.
  'poppler-utils': () => findOnPath('pdftoppm') !== null,
};

let aptListsUpdated = false;

/**
 * Installs the Debian packages among `packages` whose programs are missing. As root it runs `apt-get update` (once
 * per process) and `apt-get install`; otherwise it throws a ServiceError saying what to install.
 */
export async function ensureDebianPackages(packages: DebianPackage[], say: Say = defaultSay): Promise<void> {
  const missing = packages.filter((name) => !PACKAGE_PRESENT[name]());
  if (missing.length === 0) return;
  const install = `apt-get install -y --no-install-recommends ${missing.join(' ')}`;
  if (!isRoot()) {
    throw new ServiceError(`missing Debian packages: ${missing.join(', ')}; install them as root with: ${install}`);
  }
  // Another engineer's apt-get may hold the dpkg lock on a shared machine: wait for it instead of failing.
  const aptOptions = ['-o', 'DPkg::Lock::Timeout=300', '-q'];
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  if (!aptListsUpdated) {
    say(`installing missing Debian packages (${missing.join(', ')}): apt-get update`);
    const update = await run('apt-get', [...aptOptions, 'update'], { inherit: true, env });
    if (update.code !== 0) throw new ServiceError(`apt-get update failed (exit ${update.code}); see the output above`);
    aptListsUpdated = true;
  }
  say(install);
  const result = await run('apt-get', [...aptOptions, 'install', '-y', '--no-install-recommends', ...missing], { inherit: true, env });
  if (result.code !== 0) throw new ServiceError(`${install} failed (exit ${result.code}); see the output above`);
  const stillMissing = missing.filter((name) => !PACKAGE_PRESENT[name]());
  if (stillMissing.length > 0) {
    throw new ServiceError(`installed ${stillMissing.join(', ')} but its programs are still not found`);
  }
}

/** Returns the path of Debian's Chromium, installing the `chromium` package when missing (as root). */
export async function ensureChromium(say: Say = defaultSay): Promise<string> {
  await ensureDebianPackages(['chromium'], say);
  return CHROMIUM_PATH;
}

/** A TCP port on 127.0.0.1 that was free a moment ago (the OS picks it). For throwaway services in tests. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.unref();
    server.on('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      server.close(() => resolve(port));
    });
  });
}

/** True when nothing listens on 127.0.0.1:port. */
export function isPortFree(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const server = createServer();
    server.unref();
    server.once('error', () => resolve(false));
    server.listen(port, '127.0.0.1', () => server.close(() => resolve(true)));
  });
}

/** Reads a port from the environment variable `name`, or returns `fallback`; a bad value is an error, not a guess. */
export function portFromEnv(name: string, fallback: number): number {
  const raw = process.env[name];
  if (raw === undefined || raw === '') return fallback;
  const port = Number(raw);
  if (!Number.isInteger(port) || port < 1 || port > 65535) {
    throw new ServiceError(`${name}=${raw} is not a TCP port (an integer from 1 to 65535)`);
  }
  return port;
}

/** Makes sure the `postgres` system user exists (Debian's package creates it; a bare machine may lack it). */
async function ensurePostgresUser(): Promise<void> {
  if (!isRoot()) return;
  if ((await run('id', ['-u', 'postgres'])).code === 0) return;
  const result = await run('useradd', ['--system', '--user-group', '--home-dir', '/var/lib/postgresql', '--shell', '/bin/sh', 'postgres']);
  if (result.code !== 0) throw new ServiceError(`could not create the postgres system user: ${result.output.trim()}`);
}

/**
 * True when the PostgreSQL server user can reach and write `folder`: a checkout under a private home folder (mode
 * 700) cannot be traversed by the `postgres` user, and initdb then fails with "could not access directory".
 */
export async function postgresCanUse(folder: string): Promise<boolean> {
  if (!isRoot()) return true;
  await ensurePostgresUser();
  return (await run('runuser', ['-u', 'postgres', '--', 'test', '-x', folder])).code === 0;
}

function tail(file: string, lines = 15): string {
  try {
    return readFileSync(file, 'utf8').trimEnd().split('\n').slice(-lines).join('\n');
  } catch {
    return '(no log)';
  }
}

export interface RunningService {
  /** Connection URL on 127.0.0.1. */
  url: string;
  port: number;
  /** Stops the server; safe to call more than once and when it has already stopped. */
  stop(): Promise<void>;
}

export interface PostgresOptions {
  /** The cluster's data folder; created and initialised (initdb) on first use. */
  dir: string;
  /** TCP port on 127.0.0.1; no Unix socket is opened. */
  port: number;
  /**
   * Keep PostgreSQL's crash-safe defaults. false adds fsync=off, synchronous_commit=off and full_page_writes=off:
   * fast, and a power cut may lose or corrupt data, so only throwaway test clusters use it.
   * @default true
   */
  durable?: boolean;
  /**
   * The server's log file.
   * @default `${dir}.log`
   */
  log?: string;
  /** Progress messages. @default console.log with a "[services]" prefix */
  say?: Say;
}

// pg ships no type declarations and @types/pg is not installed; this is the small part of its API used here.
interface PgClient {
  connect(): Promise<void>;
  query(sql: string, values?: unknown[]): Promise<{ rows: Array<Record<string, unknown>> }>;
  end(): Promise<void>;
}
const requireCjs = createRequire(import.meta.url);
const loadPg = (): { Client: new (options: { connectionString: string }) => PgClient } => requireCjs('pg');

/**
 * Starts (initialising on first use) a project-local PostgreSQL cluster on 127.0.0.1:port, TCP only, and creates the
 * database `gatepost` when it is missing. A cluster of this folder that is already running on this port is reused.
 */
export async function startPostgres(options: PostgresOptions): Promise<RunningService> {
  const { dir, port, durable = true, log = `${dir}.log`, say = defaultSay } = options;
  const binDir = findPostgresBinDir();
  if (!binDir) throw new ServiceError('PostgreSQL is not installed; install it with: apt-get install -y postgresql');
  const pgCtl = join(binDir, 'pg_ctl');
  await ensurePostgresUser();

  const parent = dirname(dir);
  mkdirSync(parent, { recursive: true });
  if (!(await postgresCanUse(parent))) {
    throw new ServiceError(`the postgres user cannot reach ${parent} (a parent folder is private); use a folder under /var/tmp`);
  }
  const portTaken = (): ServiceError =>
    new ServiceError(`port ${port} on 127.0.0.1 is taken by another program; choose another PostgreSQL port (GATEPOST_PG_PORT)`);
  // Before initdb, so a taken port costs no cluster; a cluster of this folder on this port is checked below.
  if (postmasterPort(dir) !== port && !(await isPortFree(port))) throw portTaken();
  if (!existsSync(join(dir, 'PG_VERSION'))) {
    if (existsSync(dir) && readdirSync(dir).length > 0) {
      throw new ServiceError(`${dir} is not empty and holds no PostgreSQL cluster; move it away or delete it`);
    }
    mkdirSync(dir, { recursive: true, mode: 0o700 });
    chmodSync(dir, 0o700);
    if (isRoot()) chownPostgres(dir);
    say(`creating a PostgreSQL cluster in ${dir}`);
    const initArgs = ['-D', dir, '-U', 'postgres', '--auth=trust', '-E', 'UTF8', '--locale=C.UTF-8'];
    if (!durable) initArgs.push('--no-sync');
    const init = await run(...asPostgres(join(binDir, 'initdb'), initArgs));
    if (init.code !== 0) throw new ServiceError(`initdb failed for ${dir}:\n${init.output.trim()}`);
  }
  // pg_ctl opens the log as the server user, so the file must exist and belong to it.
  closeSync(openSync(log, 'a'));
  if (isRoot()) chownPostgres(log);

  const runningPort = postmasterPort(dir);
  const status = await run(...asPostgres(pgCtl, ['-D', dir, 'status']));
  if (status.code === 0 && runningPort === port) {
    say(`PostgreSQL in ${dir} is already running on port ${port}; reusing it`);
  } else {
    if (status.code === 0) {
      say(`PostgreSQL in ${dir} is running on port ${runningPort}; restarting it on port ${port}`);
      await stopPostgresCluster(pgCtl, dir);
    }
    if (!(await isPortFree(port))) throw portTaken();
    // -k '' opens no Unix socket: no write access to /var/run/postgresql is needed, and deep folders do not hit
    // the 107-byte socket path limit. pg_ctl passes -o through a shell, hence the quotes.
    const serverOptions = [`-c listen_addresses=127.0.0.1`, `-p ${port}`, `-k ''`];
    if (!durable) serverOptions.push('-c fsync=off', '-c synchronous_commit=off', '-c full_page_writes=off');
    say(`starting PostgreSQL on 127.0.0.1:${port}${durable ? '' : ' (throwaway: fsync off)'}; log ${log}`);
    const start = await run(...asPostgres(pgCtl, ['-D', dir, '-l', log, '-w', '-t', '60', '-o', serverOptions.join(' '), 'start']));
    if (start.code !== 0) {
      throw new ServiceError(`PostgreSQL did not start (pg_ctl exit ${start.code}). Last lines of ${log}:\n${tail(log)}`);
    }
  }

  const adminUrl = `postgres://postgres@127.0.0.1:${port}/postgres`;
  const { Client } = loadPg();
  const client = new Client({ connectionString: adminUrl });
  try {
    await client.connect();
    const found = await client.query('SELECT 1 FROM pg_database WHERE datname = $1', ['gatepost']);
    if (found.rows.length === 0) {
      say('creating the database gatepost');
      await client.query('CREATE DATABASE gatepost');
    }
  } catch (error) {
    // Nobody gets a handle to stop it with, so stop it here rather than leave it running.
    await stopPostgresCluster(pgCtl, dir).catch(() => undefined);
    throw new ServiceError(`PostgreSQL on port ${port} started but the database gatepost could not be prepared (server stopped again): ${(error as Error).message}`);
  } finally {
    await client.end().catch(() => undefined);
  }

  let stopped: Promise<void> | null = null;
  return {
    url: `postgres://postgres@127.0.0.1:${port}/gatepost`,
    port,
    stop: () => {
      stopped ??= (async () => {
        say('stopping PostgreSQL');
        await stopPostgresCluster(pgCtl, dir);
      })();
      return stopped;
    },
  };
}

function chownPostgres(path: string): void {
  // os.userInfo only knows the current user, so read the postgres user's ids from the user database.
  const entry = readFileSync('/etc/passwd', 'utf8').split('\n').find((line) => line.startsWith('postgres:'));
  if (!entry) throw new ServiceError('the postgres system user does not exist');
  const [, , uid, gid] = entry.split(':');
  chownSync(path, Number(uid), Number(gid));
}

/** Line 4 of postmaster.pid is the port the running server listens on. */
function postmasterPort(dir: string): number | null {
  try {
    return Number(readFileSync(join(dir, 'postmaster.pid'), 'utf8').split('\n')[3]);
  } catch {
    return null;
  }
}

/**
 * Stops whatever PostgreSQL server runs from the cluster folder `dir` (used to clear away clusters a killed run left
 * behind). `immediate` skips the shutdown checkpoint, fine only for clusters about to be deleted.
 */
export async function stopPostgresAt(dir: string, mode: 'fast' | 'immediate' = 'fast'): Promise<void> {
  const binDir = findPostgresBinDir();
  if (!binDir || !existsSync(join(dir, 'postmaster.pid'))) return;
  await stopPostgresCluster(join(binDir, 'pg_ctl'), dir, mode);
}

/** Stops the Redis server whose pid file is `pidFile`, if it is still a running redis-server. */
export async function stopRedisByPidFile(pidFile: string): Promise<void> {
  const pid = readPid(pidFile);
  if (pid === null || !isAlive(pid)) return;
  let command: string;
  try {
    command = readFileSync(`/proc/${pid}/cmdline`, 'utf8');
  } catch {
    return;
  }
  if (!command.includes('redis-server')) return; // the pid was reused by another program
  process.kill(pid, 'SIGTERM');
  const deadline = Date.now() + 10_000;
  while (isAlive(pid) && Date.now() < deadline) await sleep(50);
  if (isAlive(pid)) process.kill(pid, 'SIGKILL');
}

async function stopPostgresCluster(pgCtl: string, dir: string, mode: 'fast' | 'immediate' = 'fast'): Promise<void> {
  const status = await run(...asPostgres(pgCtl, ['-D', dir, 'status']));
  if (status.code !== 0) return; // not running (exit 3) or no cluster (exit 4): nothing to stop
  // fast: roll back open transactions and stop now; the cluster itself stays consistent.
  const result = await run(...asPostgres(pgCtl, ['-D', dir, '-w', '-t', '60', '-m', mode, 'stop']));
  if (result.code !== 0) throw new ServiceError(`pg_ctl stop failed for ${dir}: ${result.output.trim()}`);
}

export interface RedisOptions {
  /** Working folder: pid file, log, and the append-only file when persistent. */
  dir: string;
  /** TCP port on 127.0.0.1. */
  port: number;
  /**
   * Keep an append-only file so queued jobs survive a restart (`npm start`). false: no persistence (tests).
   * @default true
   */
  persistent?: boolean;
  /** Progress messages. @default console.log with a "[services]" prefix */
  say?: Say;
}

/**
 * Starts a Redis server on 127.0.0.1:port working in `dir`. A server of this folder already running on this port is
 * reused; another program on the port is an error (its data is not ours).
 */
export async function startRedis(options: RedisOptions): Promise<RunningService> {
  const { dir, port, persistent = true, say = defaultSay } = options;
  const server = findOnPath('redis-server');
  const cli = findOnPath('redis-cli');
  if (!server || !cli) throw new ServiceError('Redis is not installed; install it with: apt-get install -y redis-server');
  mkdirSync(dir, { recursive: true });
  const pidFile = join(dir, 'redis.pid');
  const logFile = join(dir, 'redis.log');

  const ourPid = readPid(pidFile);
  // Ask only when something listens: redis-cli on a free port would just fail, slowly on a busy machine.
  const servingPid = (await isPortFree(port)) ? null : await redisProcessId(cli, port);
  if (servingPid !== null && servingPid === ourPid) {
    say(`Redis in ${dir} is already running on port ${port}; reusing it`);
  } else {
    if (servingPid !== null || !(await isPortFree(port))) {
      throw new ServiceError(`port ${port} on 127.0.0.1 is taken by another program; choose another Redis port (GATEPOST_REDIS_PORT)`);
    }
    const args = ['--bind', '127.0.0.1', '--port', String(port), '--daemonize', 'yes', '--pidfile', pidFile, '--logfile', logFile, '--dir', dir];
    // everysec: at most a second of queued jobs is lost on a power cut, at a small fraction of always-fsync's cost.
    if (persistent) args.push('--appendonly', 'yes', '--appendfsync', 'everysec', '--save', '');
    else args.push('--save', '', '--appendonly', 'no');
    say(`starting Redis on 127.0.0.1:${port}${persistent ? ' (append-only file)' : ' (throwaway: no persistence)'}; log ${logFile}`);
    const start = await run(server, args);
    if (start.code !== 0) throw new ServiceError(`redis-server failed (exit ${start.code}): ${start.output.trim()}`);
    // --daemonize returns before the server listens, and loading a large append-only file answers LOADING.
    const deadline = Date.now() + 60_000;
    for (;;) {
      const pid = await redisProcessId(cli, port);
      if (pid !== null && pid === readPid(pidFile) && (await run(cli, ['-p', String(port), 'ping'], { timeoutMs: 3_000 })).output.trim() === 'PONG') break;
      if (Date.now() > deadline) {
        await stopRedisByPidFile(pidFile);
        throw new ServiceError(`Redis did not answer on port ${port} within 60 s. Last lines of ${logFile}:\n${tail(logFile)}`);
      }
      await sleep(50);
    }
  }

  let stopped: Promise<void> | null = null;
  return {
    url: `redis://127.0.0.1:${port}`,
    port,
    stop: () => {
      stopped ??= (async () => {
        say('stopping Redis');
        const pid = readPid(pidFile);
        if (pid === null || (await redisProcessId(cli, port)) !== pid) return;
        await run(cli, ['-p', String(port), 'shutdown', ...(persistent ? [] : ['nosave'])], { timeoutMs: 30_000 });
        const deadline = Date.now() + 30_000;
        while (isAlive(pid) && Date.now() < deadline) await sleep(50);
        if (isAlive(pid)) {
          say(`Redis (pid ${pid}) ignored shutdown; killing it`);
          process.kill(pid, 'SIGKILL');
        }
      })();
      return stopped;
    },
  };
}

/** The process id of the Redis server answering on 127.0.0.1:port, or null when none answers. */
async function redisProcessId(cli: string, port: number): Promise<number | null> {
  // A program that is not Redis may accept the connection and never answer: give up after a few seconds.
  const result = await run(cli, ['-h', '127.0.0.1', '-p', String(port), 'info', 'server'], { timeoutMs: 2_000 });
  const match = /process_id:(\d+)/.exec(result.output);
  return result.code === 0 && match ? Number(match[1]) : null;
}

function readPid(file: string): number | null {
  try {
    const pid = Number(readFileSync(file, 'utf8').trim());
    return Number.isInteger(pid) && pid > 0 ? pid : null;
  } catch {
    return null;
  }
}

function isAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

export const sleep = (ms: number): Promise<void> => new Promise((resolve) => setTimeout(resolve, ms));
