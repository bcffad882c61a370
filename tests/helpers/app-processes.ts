// Starts the API server and the job worker as real processes (TypeScript through tsx, or the compiled build) against the throwaway services of
// scripts/with-services.sh, for browser tests and worker fault tests (kill the worker, restart it).
import { randomBytes } from 'node:crypto';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { buildNode, nodeBuildIsCurrent, NODE_BUILD_DIR } from '../../scripts/lib/build-node.ts';
import { spawnChild, waitForHttp, type ChildHandle } from '../../scripts/lib/processes.ts';
import { freePort } from '../../scripts/lib/services.ts';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const tsx = join(root, 'node_modules/.bin/tsx');

export interface AppProcessesOptions {
  /**
   * Extra environment for both processes, applied last (over the defaults below).
   * @default {}
   */
  env?: NodeJS.ProcessEnv;
  /**
   * Start the job worker as well as the API server.
   * @default true
   */
  worker?: boolean;
  /**
   * Print the processes' output as it comes ("[api] …"); otherwise it is kept and shown when they fail to start.
   * @default false
   */
  echo?: boolean;
  /**
   * Run the compiled build (dist/node, built first when older than the sources) with node, as `npm start` does,
   * instead of the TypeScript through tsx.
   * @default false
   */
  compiled?: boolean;
  /**
   * How long to wait for GET /api/health to answer 200.
   * @default 60000
   */
  timeoutMs?: number;
}

export interface AppProcesses {
  /** http://127.0.0.1:PORT of the API server (which also serves the built client). */
  baseUrl: string;
  /** The environment both processes got, to start more (or a CLI) against the same services. */
  env: NodeJS.ProcessEnv;
  api: ChildHandle;
  /** null when started with `worker: false`. */
  worker: ChildHandle | null;
  /** Starts a new worker process (after a test killed the old one with `worker.stop()` or a signal). */
  restartWorker(): ChildHandle;
  /** Starts a new API server on the same port (after a test stopped it with `api.stop()`); resolves once it answers. */
  restartApi(): Promise<ChildHandle>;
  /** Stops both (SIGTERM, then SIGKILL after 10 s). */
  stop(): Promise<void>;
}

/**
 * Spawns `tsx server/index.ts` and `tsx worker/index.ts` on a free port against GATEPOST_TEST_DATABASE_URL and
 * GATEPOST_TEST_REDIS_URL, and resolves once GET /api/health answers 200.
 */
export async function startAppProcesses(options: AppProcessesOptions = {}): Promise<AppProcesses> {
  const { env: extraEnv = {}, worker: withWorker = true, echo = false, compiled = false, timeoutMs = 60_000 } = options;
  const databaseUrl = process.env.GATEPOST_TEST_DATABASE_URL;
  const redisUrl = process.env.GATEPOST_TEST_REDIS_URL;
  if (!databaseUrl || !redisUrl) {
    throw new Error('GATEPOST_TEST_DATABASE_URL / GATEPOST_TEST_REDIS_URL not set: run through npm test or npm run test:e2e');
  }
  const port = await freePort();
  const baseUrl = `http://127.0.0.1:${port}`;
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    GATEPOST_DATABASE_URL: databaseUrl,
    GATEPOST_REDIS_URL: redisUrl,
    GATEPOST_PORT: String(port),
    GATEPOST_PUBLIC_URL: baseUrl,
    GATEPOST_SMTP_HOST: '127.0.0.1',
    GATEPOST_MAIL_OUTBOX: 'fake',
    GATEPOST_JWT_SECRET: process.env.GATEPOST_JWT_SECRET || randomBytes(32).toString('base64url'),
    ...extraEnv,
  };
  if (compiled && !nodeBuildIsCurrent(root)) await buildNode(root);
  const start = (name: string, script: string): ChildHandle => compiled
    ? spawnChild({ name, command: process.execPath, args: [join(NODE_BUILD_DIR, script.replace(/\.ts$/, '.js'))], env, cwd: root, echo })
    : spawnChild({ name, command: tsx, args: [script], env, cwd: root, echo });

  let api = start('api', 'server/index.ts');
  let worker = withWorker ? start('worker', 'worker/index.ts') : null;
  const stop = async (): Promise<void> => {
    await Promise.all([api.stop(), worker?.stop()]);
  };
  try {
    await waitForHttp(`${baseUrl}/api/health`, { timeoutMs, watch: worker ? [api, worker] : [api] });
  } catch (error) {
    await stop();
    const logs = [api, worker].filter((child) => child !== null).map((child) => `--- ${child.name} (${child.hasExited() ? 'exited' : 'stopped'}):\n${child.output()}`);
    throw new Error(`the app did not start: ${(error as Error).message}\n${logs.join('\n')}`, { cause: error });
  }
  return {
    baseUrl,
    env,
    get api() {
      return api;
    },
    get worker() {
      return worker;
    },
    restartWorker() {
      if (worker && !worker.hasExited()) throw new Error(`the worker (pid ${worker.pid}) is still running; stop it first`);
      worker = start('worker', 'worker/index.ts');
      return worker;
    },
    async restartApi() {
      if (!api.hasExited()) throw new Error(`the API server (pid ${api.pid}) is still running; stop it first`);
      api = start('api', 'server/index.ts');
      await waitForHttp(`${baseUrl}/api/health`, { timeoutMs, watch: [api] });
      return api;
    },
    stop,
  };
}
