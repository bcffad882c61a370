// Issue 12, items 7 and 14, for real: `npm start`'s own supervisor (scripts/start.sh → scripts/start.ts) with its
// own PostgreSQL, Redis, mail stand-in, API server and worker, in a fresh data folder on free ports. The unit tests
// (tests/unit/scripts) check superviseChild and startEnvironment apart; this one checks what a lab admin sees:
// kill -9 of the worker or the API → restarted with a log line while the rest keeps answering; SIGINT to the process
// group → everything stops, nothing left behind. The client build is not under test: GATEPOST_CLIENT_DIR names a
// one-page build of our own, so npm start serves it instead of running vite build (as for a release folder).
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { freeLoopbackPort } from '../helpers/api-harness.ts';

const root = fileURLToPath(new URL('../..', import.meta.url));
const PUBLIC_URL = 'https://gatepost.lab.example';

/** Command line of a process, or null when it is gone. */
function commandLine(pid: number): string | null {
  try {
    return readFileSync(`/proc/${pid}/cmdline`, 'utf8').replaceAll('\0', ' ').trim();
  } catch {
    return null;
  }
}

function parentOf(pid: number): number | null {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    return Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]);
  } catch {
    return null;
  }
}

const pids = (): number[] => readdirSync('/proc').filter((name) => /^\d+$/.test(name)).map(Number);

/** Every live process below `ancestor`, with its command line. */
function descendants(ancestor: number): Array<{ pid: number; cmd: string }> {
  const found: Array<{ pid: number; cmd: string }> = [];
  for (const pid of pids()) {
    for (let p = parentOf(pid); p !== null && p > 1; p = parentOf(p)) {
      if (p === ancestor) {
        const cmd = commandLine(pid);
        if (cmd) found.push({ pid, cmd });
        break;
      }
    }
  }
  return found;
}

/** Live processes whose command line contains `text` (PostgreSQL and Redis are daemons: not below npm start). */
const processesWith = (text: string) => pids().filter((pid) => commandLine(pid)?.includes(text));

const alive = (pid: number) => commandLine(pid) !== null;

async function until<T>(what: string, probe: () => T | null | undefined | false | Promise<T | null | undefined | false>, timeoutMs = 60_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > deadline) throw new Error(`gave up waiting for ${what}`);
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
}

const health = (port: number) =>
  fetch(`http://127.0.0.1:${port}/api/health`, { signal: AbortSignal.timeout(2_000) }).then((r) => r.status, () => 0);

let start: ChildProcess;
let output = '';
let exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
let dataDir: string;
let clientDir: string;
const ports = { web: 0, pg: 0, redis: 0, smtp: 0 };

beforeAll(async () => {
  dataDir = mkdtempSync(path.join(tmpdir(), 'gatepost-start-'));
  clientDir = mkdtempSync(path.join(tmpdir(), 'gatepost-client-'));
  writeFileSync(path.join(clientDir, 'index.html'), '<!doctype html><title>Gatepost supervisor test</title><p>client stand-in</p>\n');
  for (const key of Object.keys(ports) as Array<keyof typeof ports>) ports[key] = await freeLoopbackPort();
  // npm start as a person runs it, but on its own ports and data folder; none of the test run's settings leak in.
  const env: NodeJS.ProcessEnv = Object.fromEntries(Object.entries(process.env).filter(([key]) => !key.startsWith('GATEPOST_') && key !== 'NODE_ENV'));
  Object.assign(env, {
    GATEPOST_PORT: String(ports.web), GATEPOST_PG_PORT: String(ports.pg), GATEPOST_REDIS_PORT: String(ports.redis),
    GATEPOST_SMTP_PORT: String(ports.smtp), GATEPOST_DATA_DIR: dataDir, GATEPOST_CLIENT_DIR: clientDir,
    // Item 14: the address of a TLS-terminating proxy in front; the server still listens on loopback.
    GATEPOST_PUBLIC_URL: PUBLIC_URL,
  });
  // Its own process group, as a terminal gives it: Ctrl-C is SIGINT to the group.
  start = spawn('bash', ['scripts/start.sh'], { cwd: root, env, detached: true, stdio: ['ignore', 'pipe', 'pipe'] });
  start.stdout!.on('data', (chunk: Buffer) => { output += chunk.toString(); });
  start.stderr!.on('data', (chunk: Buffer) => { output += chunk.toString(); });
  exited = new Promise((resolve) => start.on('exit', (code, signal) => resolve({ code, signal })));
  await until('"Gatepost is running" from npm start', () => {
    if (start.exitCode !== null) throw new Error(`npm start exited (${start.exitCode}):\n${output}`);
    return output.includes('Gatepost is running at');
  }, 240_000);
}, 300_000);

afterAll(async () => {
  // Whatever a failed test left: the whole group, then the folders.
  if (start && start.exitCode === null) {
    try {
      process.kill(-start.pid!, 'SIGINT');
    } catch {
      // gone already
    }
    await Promise.race([exited, new Promise((resolve) => setTimeout(resolve, 30_000))]);
  }
  rmSync(dataDir, { recursive: true, force: true });
  rmSync(clientDir, { recursive: true, force: true });
}, 60_000);

/** The running child of npm start whose compiled script is `script` (dist/node/…). */
const child = (script: string) => descendants(start.pid!).find((p) => p.cmd.includes(`dist/node/${script}`));

describe('npm start behind an https address (issue 12, item 14)', () => {
  it('When GATEPOST_PUBLIC_URL is https, then npm start keeps it (not http://127.0.0.1), and sessions get Secure cookies and HSTS', async () => {
    expect(output).toContain(`Gatepost is running at ${PUBLIC_URL}`);
    expect(output).toContain(`it listens on http://127.0.0.1:${ports.web}`);
    const accounts = JSON.parse(readFileSync(path.join(root, 'server/db/seeders/demo-accounts.json'), 'utf8')) as Array<{ email: string; password: string }>;
    const login = await fetch(`http://127.0.0.1:${ports.web}/api/auth/login`, {
      method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ email: accounts[0].email, password: accounts[0].password }),
    });
    expect(login.status).toBe(200);
    expect(login.headers.get('set-cookie')).toMatch(/; Secure/i);
    expect(login.headers.get('strict-transport-security')).toMatch(/max-age=\d+/);
    // The page served is the build GATEPOST_CLIENT_DIR names.
    expect(await (await fetch(`http://127.0.0.1:${ports.web}/`)).text()).toContain('client stand-in');
  });
});

describe('npm start supervises its children (issue 12, item 7)', () => {
  it('When the worker is killed with SIGKILL, then it is restarted with a log line and the API keeps answering', async () => {
    expect(output).toContain(`serving the client build in GATEPOST_CLIENT_DIR=${clientDir}: skipping vite build`);
    const worker = child('worker/index.js');
    const api = child('server/index.js');
    expect(worker && api, output).toBeTruthy();
    const before = output.length;

    process.kill(worker!.pid, 'SIGKILL');

    await until('the restart notice', () => output.slice(before).includes('[start] [worker] exited (signal SIGKILL); restarting in 1 s'), 10_000);
    // While the worker is away the API answers; PostgreSQL and Redis (its health check reads both) are up.
    expect(await health(ports.web)).toBe(200);
    const restarted = await until('a new worker', () => {
      const next = child('worker/index.js');
      return next && next.pid !== worker!.pid && output.slice(before).match(/\[start\] \[worker\] restarted \(pid (\d+), restart 1\)/) ? next : null;
    }, 30_000);
    expect(output.slice(before)).toContain(`[start] [worker] restarted (pid ${restarted.pid}, restart 1)`);
    await until('the new worker to be ready', () => output.slice(before).includes('Gatepost worker ready'), 30_000);
    expect(child('server/index.js')?.pid).toBe(api!.pid);
    expect(start.exitCode).toBeNull();
  }, 90_000);

  it('When the API server is killed with SIGKILL, then it comes back on the same port after its wait, the worker untouched', async () => {
    const api = child('server/index.js')!;
    const worker = child('worker/index.js')!;
    const before = output.length;

    process.kill(api.pid, 'SIGKILL');

    await until('the restart notice', () => output.slice(before).includes('[start] [api] exited (signal SIGKILL); restarting in 1 s'), 10_000);
    await until('the API answering again', async () => (await health(ports.web)) === 200, 60_000);
    expect(output.slice(before)).toMatch(/\[start\] \[api\] restarted \(pid \d+, restart 1\)/);
    expect(child('worker/index.js')?.pid).toBe(worker.pid);
    expect(start.exitCode).toBeNull();
  }, 90_000);
});

describe('npm start stops everything on Ctrl-C', () => {
  it('When the process group gets SIGINT, then npm start exits 0 and no server, database or stand-in of it is left', async () => {
    const children = descendants(start.pid!);
    const postgres = processesWith(`-D ${path.join(dataDir, 'postgres')}`);
    const redis = processesWith(`127.0.0.1:${ports.redis}`);
    expect(children.some((p) => p.cmd.includes('dist/node/scripts/fake-smtp.js')), JSON.stringify(children)).toBe(true);
    expect(postgres.length, 'the PostgreSQL of the data folder runs').toBeGreaterThan(0);
    expect(redis.length, 'its Redis runs').toBeGreaterThan(0);

    process.kill(-start.pid!, 'SIGINT');
    const status = await exited;

    expect(status.code, output.slice(-2000)).toBe(0);
    expect(output).toContain('[start] stopped');
    await until('every process to be gone', () => [...children.map((p) => p.pid), ...postgres, ...redis].every((pid) => !alive(pid)), 20_000);
    expect(processesWith(dataDir)).toEqual([]);
    expect(processesWith(`127.0.0.1:${ports.redis}`)).toEqual([]);
    expect(await health(ports.web)).toBe(0);
  }, 90_000);
});
