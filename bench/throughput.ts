/**
 * `npm run bench:throughput`: 200 shots of a 100 000-sample two-channel capture uploaded by 10 clients at once (each
 * logs a shot, uploads its file and polls every 50 ms until the analysis is stored, then takes the next), through
 * the real API server and worker processes (compiled, as npm start runs them), first with one worker process,
 * then with a second one started beside it on the same Redis, PostgreSQL and cores (they share the cores: one job
 * per queue each on two cores, worker/host-share.ts), then with a second one that runs two jobs per queue whatever
 * else runs (GATEPOST_WORKER_CONCURRENCY=2, each process as before issue 13). Prints shots per second, the
 * upload-to-result p50/p95 and what each phase cost (processor time per shot of each process, threads, PostgreSQL
 * connections and transactions, Redis clients and commands), and the ratios to one worker. Target (issue 13): two
 * workers not slower than one.
 * Every file differs in one sample, so nothing is de-duplicated by its hash. Figures only, no pass/fail.
 */
import path from 'node:path';
import { cpus, loadavg } from 'node:os';
import { performance } from 'node:perf_hooks';
import { demoAccounts } from '../server/db/seeders/demo.ts';
import { NODE_BUILD_DIR } from '../scripts/lib/build-node.ts';
import { spawnChild, type ChildHandle } from '../scripts/lib/processes.ts';
import { startBenchApp } from './lib/bench-app.ts';
import { pollUntil, signIn, simulatedCsv, type PipelineClient } from './lib/pipeline-client.ts';
import { sampleUsage, type PhaseUsage } from './lib/process-usage.ts';
import { ROOT } from './lib/time-process.ts';

const SHOTS = 200;
const CLIENTS = 10;
const SAMPLES = 100_000;

interface ShotView {
  captures: { state: string; error: string | null }[];
  currentAnalysis: { state: string } | null;
  analyses: { state: string; error: string | null }[];
}

const quantile = (sorted: number[], q: number) => sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1))];

/** The capture with its last row's last value moved by i µV: a different file (and hash) per shot, the same shot. */
function variant(bytes: Uint8Array, i: number): Uint8Array {
  const text = Buffer.from(bytes).toString('utf8').trimEnd();
  const cut = text.lastIndexOf('\n') + 1;
  const fields = text.slice(cut).split(',');
  const last = Number(fields[fields.length - 1]) + i * 1e-6;
  fields[fields.length - 1] = last.toFixed(6);
  return new TextEncoder().encode(`${text.slice(0, cut)}${fields.join(',')}\n`);
}

/** The jobs per reading queue a worker last logged and the worker processes it counted on its host (worker/index.ts, info level). */
function lastShare(output: string): string {
  let last = '?';
  for (const match of output.matchAll(/"concurrency":(\d+),"workers":(\d+)/g)) last = `${match[1]} of ${match[2]} workers`;
  return last;
}

async function runPhase(clients: PipelineClient[], newShot: (c: PipelineClient) => Promise<string>, bytes: Uint8Array, offset: number, processes?: () => Record<string, number>) {
  const usage = processes ? await sampleUsage(processes) : null;
  let next = 0;
  const latencies: number[] = [];
  const started = performance.now();
  await Promise.all(clients.map(async (client) => {
    for (let i = next++; i < SHOTS; i = next++) {
      const shotId = await newShot(client);
      const t = performance.now();
      const up = await client.upload(shotId, [{ name: `throughput-${offset + i}.csv`, bytes: variant(bytes, offset + i) }]);
      if (up.status !== 202) throw new Error(`upload refused: HTTP ${up.status} ${JSON.stringify(up.body)}`);
      await pollUntil(async () => {
        const d = (await client.get<ShotView>(`/api/shots/${shotId}`)).body;
        const failed = d.captures.find((c) => c.state === 'failed') ?? d.analyses.find((a) => a.state === 'failed');
        if (failed) throw new Error(`shot ${offset + i} failed: ${failed.error}`);
        return d.currentAnalysis?.state === 'done' ? true : undefined;
      }, { timeoutMs: 600_000, intervalMs: 50, what: `shot ${offset + i}'s analysis` });
      latencies.push(performance.now() - t);
    }
  }));
  const seconds = (performance.now() - started) / 1000;
  const sorted = latencies.sort((a, b) => a - b);
  return { perSecond: SHOTS / seconds, seconds, p50: quantile(sorted, 0.5), p95: quantile(sorted, 0.95), usage: await usage?.stop() };
}

async function main(): Promise<void> {
  const csv = simulatedCsv({ gatePositions: [0, 0.15], speed: 300, length: SAMPLES, sampleInterval: 1e-8, t0: -1e-4, seed: 2031 });
  console.log(`capture: ${SAMPLES} samples × 2 channels, ${(csv.bytes.length / 1e6).toFixed(2)} MB of CSV; ${SHOTS} shots from ${CLIENTS} clients at once`);
  const loadBefore = loadavg();
  const bench = await startBenchApp();
  let second: ChildHandle | null = null;
  try {
    const account = demoAccounts.find((a) => a.lab === 'hollowmere' && a.role === 'experimenter')!;
    // One sign-in shared by the ten clients (ten sign-ins at once trip the sign-in limiter); each client is its own
    // loop of requests.
    const session = await signIn(bench.app.baseUrl, account.email, account.password, { timeoutMs: 600_000 });
    const clients = Array.from({ length: CLIENTS }, () => session);
    const newShot = async (client: PipelineClient) => {
      const created = await client.post<{ shot: { id: string } }>(`/api/labs/${bench.labId}/shots`, {
        campaignId: bench.campaignId, projectileId: bench.ballId, gateRigId: bench.rigId,
      });
      if (created.status !== 201) throw new Error(`could not log a shot: HTTP ${created.status} ${JSON.stringify(created.body)}`);
      return created.body.shot.id;
    };
    // One shot each first, so the worker threads are warm in every phase.
    const warmUp = () => runPhase(clients, newShot, csv.bytes, 10_000 + 100 * warmUps++).catch(() => undefined);
    let warmUps = 0;
    await runPhase(clients.slice(0, 1), newShot, csv.bytes, 9_000).catch(() => undefined);
    const processes = () => ({ api: bench.app.api.pid, worker: bench.app.worker!.pid, ...(second ? { 'worker-2': second.pid } : {}) });
    const one = await runPhase(clients, newShot, csv.bytes, 0, processes);
    // A second worker process beside it, started as an operator would (`npm run worker` on the same machine), each
    // phase after it said it was ready and after ten unmeasured shots, as the first worker had before its phase.
    let share = '?';
    const startSecond = async (env: NodeJS.ProcessEnv) => {
      const child = spawnChild({ name: 'worker-2', command: process.execPath, args: [path.join(NODE_BUILD_DIR, 'worker/index.js')], env: { ...bench.app.env, GATEPOST_LOG_LEVEL: 'info', ...env }, cwd: ROOT, echo: false });
      await pollUntil(async () => (child.output().includes('Gatepost worker ready') ? true : undefined), { timeoutMs: 60_000, what: 'the second worker to be ready' });
      // Heartbeats every 2 s (worker/host-share.ts): the first worker has counted the second after this.
      await new Promise((resolve) => setTimeout(resolve, 3000));
      // Read now: the output kept of a child is its last part, and its 'job done' lines follow.
      share = lastShare(child.output());
      return child;
    };
    second = await startSecond({});
    const twoShare = share;
    await warmUp();
    const two = await runPhase(clients, newShot, csv.bytes, SHOTS, processes);
    await second.stop();
    // As before issue 13: each worker process two jobs per queue whatever else runs on the machine (a worker with
    // a fixed GATEPOST_WORKER_CONCURRENCY does not register, so the first one counts itself alone again).
    second = await startSecond({ GATEPOST_WORKER_CONCURRENCY: '2' });
    await warmUp();
    const fixed = await runPhase(clients, newShot, csv.bytes, 2 * SHOTS, processes);
    const f = (x: { perSecond: number; seconds: number; p50: number; p95: number }) =>
      `${x.perSecond.toFixed(2)} shots/s (${x.seconds.toFixed(1)} s), upload → result p50 ${(x.p50 / 1000).toFixed(2)} s, p95 ${(x.p95 / 1000).toFixed(2)} s`;
    const load = (l: number[]) => l.map((x) => x.toFixed(2)).join(' ');
    console.log(`machine: ${cpus().length} cores, load average before ${load(loadBefore)}, after ${load(loadavg())}`);
    console.log(`one worker process:  ${f(one)}`);
    console.log(`two worker processes sharing the cores (the second's jobs per queue: ${twoShare}): ${f(two)}`);
    console.log(`two worker processes, two jobs per queue each (as before issue 13): ${f(fixed)}`);
    const costs = (name: string, u: PhaseUsage | undefined) => {
      if (!u) return;
      const perShot = (s: number | null) => (s === null ? '?' : `${((s * 1000) / SHOTS).toFixed(0)} ms`);
      const cpu = Object.entries(u.cpu).map(([p, s]) => `${p} ${perShot(s)}`).join(', ');
      const total = Object.values(u.cpu).reduce<number>((a, s) => a + (s ?? 0), 0);
      const threads = Object.entries(u.maxThreads).map(([p, t]) => `${p} ${t}`).join(', ');
      console.log(`  ${name}: processor time per shot ${cpu} (all ${perShot(total)}); threads at most: ${threads}; ` +
        `PostgreSQL connections at most ${u.maxPgConnections}, Redis clients at most ${u.maxRedisClients}; ` +
        `per shot ${(u.pgTransactions / SHOTS).toFixed(1)} PostgreSQL transactions, ${(u.redisCommands / SHOTS).toFixed(1)} Redis commands`);
    };
    console.log('what each phase cost (user + sys time from /proc, counters of PostgreSQL and Redis):');
    costs('one worker process', one.usage);
    costs('two worker processes sharing the cores', two.usage);
    costs('two worker processes, two jobs per queue each', fixed.usage);
    console.log(`ratio two / one (shots per second): ${(two.perSecond / one.perSecond).toFixed(2)}× (target ≥ 1: two workers not slower); ` +
      `two jobs per queue each / one: ${(fixed.perSecond / one.perSecond).toFixed(2)}×`);
  } finally {
    await second?.stop();
    await bench.close();
  }
}

await main();
