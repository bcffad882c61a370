// `bash scripts/with-services.sh CMD...`: runs CMD against a throwaway PostgreSQL cluster and Redis on free loopback
// ports in a temporary folder, then stops both and deletes the folder, whatever happens (failure, Ctrl-C, SIGTERM).
// Exits with CMD's exit code. See scripts/README.md for the environment CMD receives.
import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { chmodSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { performance } from 'node:perf_hooks';
import { constants } from 'node:os';
import {
  CHROMIUM_PATH, ServiceError, ensureDebianPackages, freePort, readOrCreateSecret, redactUrl, startPostgres, startRedis, stopPostgresAt, stopRedisByPidFile,
  type RunningService,
} from './lib/services.ts';
import { describeExit, spawnChild, type ChildHandle } from './lib/processes.ts';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const say = (line: string): void => console.log(`[services] ${line}`);
const command = process.argv.slice(2);
if (command.length === 0) {
  console.error('usage: bash scripts/with-services.sh COMMAND [ARGS...]');
  process.exit(2);
}

// What this process creates (the passwords, Redis's folder) is for its own user alone.
process.umask(0o077);
// A closed pipe (`npm run test:api | head`) must not crash this process before it has stopped the services.
for (const stream of [process.stdout, process.stderr]) stream.on('error', () => undefined);

const FOLDER_PREFIX = 'gatepost-test-';
const OWNER_FILE = 'owner.pid';

/**
 * Clears away the services and folders of earlier runs whose owner process is gone: a run killed with SIGKILL (or a
 * machine reset) cannot clean up after itself, and its PostgreSQL and Redis would otherwise run until reboot.
 * Only folders carrying an owner file are touched, so nothing of other programs is.
 */
async function sweepAbandonedRuns(): Promise<void> {
  for (const name of readdirSync(tmpdir()).filter((entry) => entry.startsWith(FOLDER_PREFIX))) {
    const dir = join(tmpdir(), name);
    let owner: number;
    try {
      owner = Number(readFileSync(join(dir, OWNER_FILE), 'utf8'));
    } catch {
      continue;
    }
    if (!Number.isInteger(owner) || owner <= 0 || processIsAlive(owner)) continue;
    say(`clearing away ${dir}, left by an earlier run (pid ${owner}) that was killed`);
    await stopPostgresAt(join(dir, 'postgres'), 'immediate').catch((error: Error) => say(error.message));
    await stopRedisByPidFile(join(dir, 'redis', 'redis.pid')).catch((error: Error) => say(error.message));
    rmSync(dir, { recursive: true, force: true });
  }
}

function processIsAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}

const services: RunningService[] = [];
let folder: string | null = null;
let stopSignal: NodeJS.Signals | null = null;
let commandProcess: ReturnType<typeof spawn> | null = null;
let migrateProcess: ChildHandle | null = null;

for (const signal of ['SIGINT', 'SIGTERM', 'SIGHUP'] as const) {
  process.on(signal, () => {
    if (stopSignal) return;
    stopSignal = signal;
    say(`${signal} received: stopping`);
    // A Ctrl-C in the terminal reaches the command too (same process group); a SIGTERM sent to us alone does not.
    if (commandProcess && commandProcess.exitCode === null) commandProcess.kill(signal);
    void migrateProcess?.stop();
  });
}

async function cleanUp(): Promise<void> {
  for (const service of [...services].reverse()) {
    try {
      await service.stop();
    } catch (error) {
      console.error(`[services] ${(error as Error).message}`);
    }
  }
  if (folder) {
    rmSync(folder, { recursive: true, force: true });
    say(`removed ${folder}`);
  }
}

const signalExitCode = (signal: NodeJS.Signals): number => 128 + (constants.signals[signal] ?? 1);

async function main(): Promise<number> {
  const startedAt = performance.now();
  await ensureDebianPackages(['postgresql', 'redis-server', 'chromium', 'poppler-utils'], say);
  await sweepAbandonedRuns();
  folder = mkdtempSync(join(tmpdir(), FOLDER_PREFIX));
  writeFileSync(join(folder, OWNER_FILE), String(process.pid));
  // mkdtemp makes the folder private (700); the postgres user must be able to enter it (and need not list it).
  chmodSync(folder, 0o711);
  const [pgPort, redisPort] = [await freePort(), await freePort()];
  services.push(await startPostgres({ dir: join(folder, 'postgres'), port: pgPort, durable: false, log: join(folder, 'postgres.log'), say }));
  if (stopSignal) return signalExitCode(stopSignal);
  services.push(await startRedis({ dir: join(folder, 'redis'), port: redisPort, persistent: false, say }));
  if (stopSignal) return signalExitCode(stopSignal);
  const [postgres, redis] = services;

  const env: NodeJS.ProcessEnv = {
    ...process.env,
    GATEPOST_TEST_DATABASE_URL: postgres.url,
    GATEPOST_TEST_REDIS_URL: redis.url,
    GATEPOST_DATABASE_URL: postgres.url,
    GATEPOST_REDIS_URL: redis.url,
    GATEPOST_CHROMIUM: CHROMIUM_PATH,
    GATEPOST_TEST_TMP_DIR: folder,
    GATEPOST_JWT_SECRET: process.env.GATEPOST_JWT_SECRET || randomBytes(32).toString('base64url'),
    // What the tests' fake SMTP servers ask for and the app's mailer signs in with (as npm start does): every
    // API and browser test, and the app processes they start, inherit the pair.
    GATEPOST_SMTP_USER: 'gatepost',
    GATEPOST_SMTP_PASSWORD: readOrCreateSecret(join(folder, 'smtp-password')),
  };

  if (existsSync(join(root, 'server/db/cli.ts'))) {
    const migrate = (migrateProcess = spawnChild({ name: 'migrate', command: join(root, 'node_modules/.bin/tsx'), args: ['server/db/cli.ts', 'migrate'], env, cwd: root }));
    const status = await migrate.exited;
    if (stopSignal) return signalExitCode(stopSignal);
    if (status.code !== 0) {
      console.error(`[services] migrations failed (${describeExit(status)})`);
      return 1;
    }
  } else {
    say('server/db/cli.ts does not exist yet: no migrations to run');
  }
  say(`PostgreSQL ${redactUrl(postgres.url)} and Redis ${redactUrl(redis.url)} ready in ${((performance.now() - startedAt) / 1000).toFixed(1)} s`);

  say(`running: ${command.join(' ')}`);
  return new Promise<number>((resolveCode) => {
    commandProcess = spawn(command[0], command.slice(1), { stdio: 'inherit', env });
    commandProcess.on('error', (error) => {
      console.error(`[services] could not run ${command[0]}: ${error.message}`);
      resolveCode(127);
    });
    commandProcess.on('exit', (code, signal) => resolveCode(code ?? signalExitCode(signal ?? 'SIGTERM')));
  });
}

let exitCode: number;
try {
  exitCode = await main();
} catch (error) {
  // A Ctrl-C reaches pg_ctl and initdb too; their failure is then expected, not news.
  if (!stopSignal) console.error(`[services] ${error instanceof ServiceError ? error.message : ((error as Error).stack ?? String(error))}`);
  exitCode = 1;
} finally {
  await cleanUp();
}
// Stopped by a signal: report it as such (130 for Ctrl-C), unless the command already exited with its own code.
process.exit(stopSignal && (exitCode === 0 || !commandProcess) ? signalExitCode(stopSignal) : exitCode);
