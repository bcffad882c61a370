// `npm start`: runs Gatepost with its demo lab on this machine. Starts a project-local PostgreSQL cluster (durable) and
// Redis (append-only file) on 127.0.0.1, migrates and seeds, builds the client when it changed, then runs the fake
// SMTP server, the API server and the job worker as child processes until Ctrl-C. See scripts/README.md.
import { randomBytes, createHash } from 'node:crypto';
import { chmodSync, existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { performance } from 'node:perf_hooks';
import {
  DEFAULT_PORTS, ServiceError, ensureDebianPackages, isPortFree, portFromEnv, postgresCanUse, readOrCreateSecret, startPostgres,
  startRedis, type RunningService,
} from './lib/services.ts';
import { describeExit, spawnChild, superviseChild, waitForHttp, type SupervisedChild } from './lib/processes.ts';
import { buildNode, nodeBuildIsCurrent, NODE_BUILD_DIR } from './lib/build-node.ts';
import { startEnvironment } from './lib/start-env.ts';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
process.chdir(root);
// The children run the compiled build (dist/node, made by buildNode below), not TypeScript through tsx.
const compiled = (script: string): string => join(root, NODE_BUILD_DIR, script.replace(/\.ts$/, '.js'));
// Everything this process and its children write (passwords, Redis's files, uploads, channel files, logs) is for
// this user alone; the data folder itself is opened up just enough for the postgres user to pass through.
process.umask(0o077);
const say = (line: string): void => console.log(`[start] ${line}`);

const services: RunningService[] = [];
// A database being started when a stop request comes: the shutdown waits for it, then stops it too.
let serviceStarting: Promise<unknown> = Promise.resolve();
const children: Array<{ stop(timeoutMs?: number): Promise<unknown> }> = [];
let shuttingDown: Promise<never> | null = null;

/** Stops the children (newest first), then Redis, then PostgreSQL, and exits with `code`. Runs once. */
function shutdown(code: number, reason: string): Promise<never> {
  shuttingDown ??= (async () => {
    say(reason);
    await Promise.all([...children].reverse().map((child) => child.stop(10_000)));
    await serviceStarting.catch(() => undefined);
    for (const service of [...services].reverse()) {
      try {
        await service.stop();
      } catch (error) {
        console.error(`[start] ${(error as Error).message}`);
        code ||= 1;
      }
    }
    say(code === 0 ? 'stopped' : `stopped (exit ${code})`);
    process.exit(code);
  })();
  return shuttingDown;
}

for (const signal of ['SIGINT', 'SIGTERM', 'SIGHUP'] as const) {
  process.on(signal, () => {
    // A Ctrl-C reaches this process twice (from the terminal and relayed by tsx); one shutdown is enough.
    if (!shuttingDown) void shutdown(0, `${signal} received: stopping everything`);
  });
}

/** The parent process id of `pid`, from /proc (field 4 of stat; the command name before it may hold spaces). */
function parentOf(pid: number): number | null {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    return Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]);
  } catch {
    return null;
  }
}

// npm runs `sh -c "bash scripts/start.sh"` and passes a SIGTERM it receives to that sh alone, which dies without
// passing it on; tsx (our parent) is then re-parented. Treat the launcher going away as a stop request, so a
// `kill <npm pid>` leaves no servers or databases behind.
const launcher = parentOf(process.ppid);
// With the launcher gone the terminal or pipe may be gone too: a failed write must not end the shutdown half-way.
for (const stream of [process.stdout, process.stderr]) stream.on('error', () => undefined);
setInterval(() => {
  if (!shuttingDown && launcher !== null && parentOf(process.ppid) !== launcher) {
    void shutdown(0, 'the launching process went away: stopping everything');
  }
}, 500).unref();

/** Starts a database and records it for the shutdown in the same step, so a Ctrl-C meanwhile cannot miss it. */
function startService(start: () => Promise<RunningService>): Promise<unknown> {
  serviceStarting = start().then((service) => services.push(service));
  return serviceStarting;
}

/** Runs a one-shot step (migrate, seed, build) as a child; a failure stops everything. */
async function step(name: string, command: string, args: string[], env: NodeJS.ProcessEnv): Promise<void> {
  const child = spawnChild({ name, command, args, env });
  children.push(child);
  const status = await child.exited;
  children.splice(children.indexOf(child), 1);
  if (shuttingDown) await shuttingDown;
  if (status.code !== 0) await shutdown(1, `${name} failed (${describeExit(status)}): stopping everything`);
}

/**
 * A long-running child: if it crashes, it is started again after a growing wait (1 s, 2 s, … 30 s) while the rest
 * keeps running; a job it was running is taken over by the next worker (BullMQ's stalled-job recovery).
 */
function keepRunning(name: string, script: string, env: NodeJS.ProcessEnv): SupervisedChild {
  const child = superviseChild({ name, command: process.execPath, args: [compiled(script)], env, say: (line) => console.error(`[start] ${line}`) });
  children.push(child);
  return child;
}

/**
 * The data folder: .data/ in the checkout unless GATEPOST_DATA_DIR says otherwise. The PostgreSQL server runs as the
 * postgres user, which cannot enter a checkout under a private home folder; then a folder under /var/tmp is used.
 */
async function chooseDataDir(): Promise<string> {
  const chosen = process.env.GATEPOST_DATA_DIR;
  const dir = resolve(chosen || join(root, '.data'));
  mkdirSync(dir, { recursive: true });
  // The postgres user must pass through to its cluster folder; listing or reading the rest needs no one else.
  chmodSync(dir, 0o711);
  if (await postgresCanUse(dir)) return dir;
  if (chosen) throw new ServiceError(`GATEPOST_DATA_DIR=${chosen}: the postgres user cannot enter it (a parent folder is private)`);
  const fallback = `/var/tmp/gatepost-${createHash('sha256').update(root).digest('hex').slice(0, 12)}`;
  say(`the postgres user cannot enter ${dir} (a parent folder is private); keeping the data in ${fallback} instead`);
  mkdirSync(fallback, { recursive: true, mode: 0o711 });
  chmodSync(fallback, 0o711);
  return fallback;
}

/** A random signing secret made on first start and kept (mode 600) so sessions survive a restart. */
function jwtSecret(dataDir: string): string {
  const file = join(dataDir, 'jwt-secret');
  if (!existsSync(file)) writeFileSync(file, `${randomBytes(48).toString('base64url')}\n`, { mode: 0o600 });
  chmodSync(file, 0o600);
  return readFileSync(file, 'utf8').trim();
}

function newestMtime(path: string): number {
  if (!existsSync(path)) return 0;
  const stat = statSync(path);
  if (!stat.isDirectory()) return stat.mtimeMs;
  let newest = stat.mtimeMs;
  for (const entry of readdirSync(path)) newest = Math.max(newest, newestMtime(join(path, entry)));
  return newest;
}

/** The client build is current when dist/client/index.html is newer than every input of the build. */
function clientBuildIsCurrent(): boolean {
  const built = join(root, 'dist/client/index.html');
  if (!existsSync(built)) return false;
  // shared/ is bundled into the client too; package.json and the lock file change the dependencies.
  const inputs = ['src', 'shared', 'public', 'index.html', 'vite.config.ts', 'postcss.config.js', 'tsconfig.json', 'package.json', 'package-lock.json'];
  const newestInput = Math.max(...inputs.map((input) => newestMtime(join(root, input))));
  return statSync(built).mtimeMs > newestInput;
}

interface DemoAccount {
  email: string;
  password: string;
  role: string;
  lab?: string;
}

function demoSignIns(): string[] {
  const file = join(root, 'server/db/seeders/demo-accounts.json');
  if (!existsSync(file)) return ['(no server/db/seeders/demo-accounts.json: no demo sign-ins to show)'];
  try {
    const accounts = JSON.parse(readFileSync(file, 'utf8')) as DemoAccount[];
    const width = Math.max(...accounts.map((account) => account.role.length));
    const emailWidth = Math.max(...accounts.map((account) => account.email.length));
    return accounts.map((account) =>
      `${account.role.padEnd(width)}  ${account.email.padEnd(emailWidth)}  ${account.password}${account.lab ? `  (lab ${account.lab})` : ''}`);
  } catch (error) {
    return [`(could not read ${file}: ${(error as Error).message})`];
  }
}

async function main(): Promise<void> {
  const pgPort = portFromEnv(DEFAULT_PORTS.postgres.env, DEFAULT_PORTS.postgres.port);
  const redisPort = portFromEnv(DEFAULT_PORTS.redis.env, DEFAULT_PORTS.redis.port);
  const webPort = portFromEnv(DEFAULT_PORTS.web.env, DEFAULT_PORTS.web.port);
  const smtpPort = portFromEnv(DEFAULT_PORTS.smtp.env, DEFAULT_PORTS.smtp.port);
  for (const [port, env] of [[webPort, DEFAULT_PORTS.web.env], [smtpPort, DEFAULT_PORTS.smtp.env]] as const) {
    if (!(await isPortFree(port))) {
      throw new ServiceError(`port ${port} on 127.0.0.1 is taken (another npm start?); stop it or set ${env}`);
    }
  }

  await ensureDebianPackages(['postgresql', 'redis-server'], say);
  const dataDir = await chooseDataDir();
  say(`data folder ${dataDir}`);
  const secret = jwtSecret(dataDir);
  // A data folder of an earlier version was readable by every local user: close what it holds (the cluster folder
  // belongs to the postgres user and is private already).
  for (const entry of readdirSync(dataDir, { withFileTypes: true })) {
    if (entry.name !== 'postgres') chmodSync(join(dataDir, entry.name), entry.isDirectory() ? 0o700 : 0o600);
  }

  // The generated passwords of both are kept in the data folder (mode 600), like the JWT secret.
  await startService(() => startPostgres({ dir: join(dataDir, 'postgres'), port: pgPort, durable: true, log: join(dataDir, 'postgres.log'), secretsDir: dataDir, say }));
  if (shuttingDown) return;
  await startService(() => startRedis({ dir: join(dataDir, 'redis'), port: redisPort, persistent: true, secretsDir: dataDir, say }));
  if (shuttingDown) return;
  const [postgres, redis] = services;
  // The fake SMTP server takes mail only from a client that signs in with this pair: the API and the worker.
  const smtpPassword = readOrCreateSecret(join(dataDir, 'smtp-password'));

  // The server listens on loopback; the address people use may be a reverse proxy's (https: Secure cookies, HSTS).
  const { env, localUrl, publicUrl } = startEnvironment({
    base: process.env, databaseUrl: postgres.url, redisUrl: redis.url, webPort, smtpPort, smtpPassword, dataDir, jwtSecret: secret,
  });

  if (nodeBuildIsCurrent(root)) say(`${NODE_BUILD_DIR} is newer than the server and worker sources: skipping their build`);
  else {
    const started = performance.now();
    const files = await buildNode(root);
    say(`compiled the server and worker into ${NODE_BUILD_DIR} (${files} files, ${((performance.now() - started) / 1000).toFixed(1)} s)`);
  }
  await step('db', process.execPath, [compiled('server/db/cli.ts'), 'migrate', 'seed-demo'], env);
  const ownClient = process.env.GATEPOST_CLIENT_DIR;
  if (ownClient) {
    // A client build of your own (a release folder; the supervisor test): it is served as it is, nothing is built.
    if (!existsSync(join(resolve(ownClient), 'index.html'))) {
      await shutdown(1, `GATEPOST_CLIENT_DIR=${ownClient} holds no index.html (a client build made with vite build): stopping everything`);
    }
    say(`serving the client build in GATEPOST_CLIENT_DIR=${ownClient}: skipping vite build`);
  } else if (clientBuildIsCurrent()) {
    say('client build dist/client is newer than src/, shared/, index.html and the configs: skipping vite build');
  } else {
    say('building the client (dist/client is missing or older than its sources): vite build');
    await step('build', join(root, 'node_modules/.bin/vite'), ['build'], env);
  }
  if (shuttingDown) return;

  keepRunning('smtp', 'scripts/fake-smtp.ts', env);
  const api = keepRunning('api', 'server/index.ts', env);
  const worker = keepRunning('worker', 'worker/index.ts', env);

  try {
    // A child that cannot even start (a bad setting) fails the start instead of being restarted for ever.
    await waitForHttp(`${localUrl}/api/health`, { timeoutMs: 90_000, watch: [api.current(), worker.current()] });
  } catch (error) {
    if (!shuttingDown) await shutdown(1, `${(error as Error).message}: stopping everything`);
    return;
  }
  // The demo's review scene needs the sweep analysed first: recorded beside the running app, once (a failure only says so).
  const reviews = spawnChild({ name: 'demo', command: process.execPath, args: [compiled('server/db/cli.ts'), 'demo-reviews'], env });
  children.push(reviews);
  void reviews.exited.then(() => { if (children.includes(reviews)) children.splice(children.indexOf(reviews), 1); });
  const firstPage = await fetch(`${localUrl}/`).then((response) => response.status, (error: Error) => error.message);
  if (shuttingDown) return;
  // performance.now() counts from the start of this process, so the time includes Node's own start-up.
  const seconds = (performance.now() / 1000).toFixed(1);
  const lines = [
    '',
    `Gatepost is running at ${publicUrl}  (ready in ${seconds} s)${publicUrl === localUrl ? '' : `; it listens on ${localUrl}`}`,
    ...(firstPage === 200 ? [] : [`  warning: GET / answered ${firstPage}, not 200`]),
    '',
    'Demo sign-ins (role, e-mail, password):',
    ...demoSignIns().map((line) => `  ${line}`),
    '',
    `Data in ${dataDir}; PostgreSQL on 127.0.0.1:${pgPort}, Redis on 127.0.0.1:${redisPort}, fake SMTP on 127.0.0.1:${smtpPort}.`,
    'Press Ctrl-C to stop everything (the databases too).',
    '',
  ];
  console.log(lines.join('\n'));
}

main().catch((error: unknown) => {
  // A stop request interrupts what was starting (Ctrl-C reaches pg_ctl too); its failure is expected then.
  if (shuttingDown) return;
  const message = error instanceof ServiceError ? error.message : (error as Error).stack ?? String(error);
  console.error(`[start] ${message}`);
  void shutdown(1, 'start failed: stopping what was started');
});
