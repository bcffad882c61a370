/**
 * `npm run bench:api`: autocannon against the real API server (a separate process, loopback only) with a signed-in
 * cookie: GET /api/shots/:id (a shot with one analysed capture) and GET /api/labs/:labId/shots (the lab's list),
 * 10 s each, 10 connections. Baseline in the same run: GET /api/health (one SELECT 1 and one Redis PING, no auth).
 * Figures only, no pass/fail. autocannon runs in this process, on the same two cores as the server.
 */
import { cpus, loadavg } from 'node:os';
import autocannon from 'autocannon';
import { demoAccounts } from '../server/db/seeders/demo.ts';
import { startBenchApp } from './lib/bench-app.ts';
import { pollUntil, signIn, simulatedCsv } from './lib/pipeline-client.ts';

const CONNECTIONS = 10;
const SECONDS = 10;

interface Figures { name: string; reqPerSec: number; p50: number; p99: number; non2xx: number; errors: number; bytesPerReq: number }

async function hammer(name: string, url: string, cookie: string | null, seconds = SECONDS): Promise<Figures> {
  const result = await autocannon({ url, connections: CONNECTIONS, duration: seconds, headers: cookie ? { cookie } : {} });
  return {
    name,
    reqPerSec: result.requests.average,
    p50: result.latency.p50,
    p99: result.latency.p99,
    non2xx: result.non2xx,
    errors: result.errors,
    bytesPerReq: result.throughput.total / Math.max(1, result.requests.total),
  };
}

async function main(): Promise<void> {
  const bench = await startBenchApp();
  try {
    const account = demoAccounts.find((a) => a.lab === 'hollowmere' && a.role === 'experimenter')!;
    const client = await signIn(bench.app.baseUrl, account.email, account.password);
    // One shot with a capture read and analysed, so GET /api/shots/:id returns the full current analysis.
    const created = await client.post<{ shot: { id: string } }>(`/api/labs/${bench.labId}/shots`, {
      campaignId: bench.campaignId, projectileId: bench.ballId, gateRigId: bench.rigId,
    });
    if (created.status !== 201) throw new Error(`could not log a shot: HTTP ${created.status}`);
    const shotId = created.body.shot.id;
    await client.upload(shotId, [{ name: 'bench-api.csv', bytes: simulatedCsv({ seed: 31 }).bytes }]);
    await pollUntil(async () => {
      const d = (await client.get<{ currentAnalysis: { state: string } | null }>(`/api/shots/${shotId}`)).body;
      return d.currentAnalysis?.state === 'done' ? true : undefined;
    }, { timeoutMs: 60_000, what: 'the analysis of the benchmark shot' });
    // The worker is idle from here on; stop it so the server has the cores to itself.
    await bench.app.worker?.stop();

    const base = bench.app.baseUrl;
    const targets: [string, string, string | null][] = [
      ['GET /api/health (baseline)', `${base}/api/health`, null],
      ['GET /api/shots/:id', `${base}/api/shots/${shotId}`, client.cookie],
      ['GET /api/labs/:labId/shots', `${base}/api/labs/${bench.labId}/shots`, client.cookie],
    ];
    // A short unreported run of each first, so the JIT and the pools are warm for the measured ones.
    for (const [name, url, cookie] of targets) await hammer(name, url, cookie, 2);
    const figures: Figures[] = [];
    for (const [name, url, cookie] of targets) figures.push(await hammer(name, url, cookie));

    console.log(`machine: ${cpus().length} cores, load average ${loadavg().map((l) => l.toFixed(2)).join(' ')}; ${CONNECTIONS} connections, ${SECONDS} s each, loopback`);
    const baseline = figures[0];
    for (const r of figures) {
      console.log(
        `${r.name.padEnd(30)} ${r.reqPerSec.toFixed(0).padStart(6)} req/s (${(r.reqPerSec / baseline.reqPerSec).toFixed(2)}× baseline)` +
          `  p50 ${String(r.p50).padStart(4)} ms  p99 ${String(r.p99).padStart(4)} ms  ${(r.bytesPerReq / 1024).toFixed(1)} KiB/response` +
          `  non-2xx ${r.non2xx}  errors ${r.errors}`,
      );
    }
  } finally {
    await bench.close();
  }
}

await main();
