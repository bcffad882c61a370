/**
 * `npm run bench:pipeline -- --deep [--rounds N] [--clients curl-body,curl,fetch-body,fetch]`: the 10-million-sample
 * capture (bench/lib/big-capture.ts, 330 MB) uploaded to a shot through the real API server and worker, timed from the
 * start of the upload to the analysed result seen by a poll every 20 ms. Baselines in the same run, before each shot,
 * each a process of its own (wall time) on the same file: the CLI as users run it (`npm run --silent analyze -- FILE
 * --gate …`: npm, then the compiled bundle), the compiled bundle alone (`node dist/node/worker/cli/analyze.js`), and
 * the TypeScript through tsx (how `npm run analyze` ran when issue 13 set the target). Three rounds (or N); medians.
 * Each timing starts once the API server and the worker are idle. Targets (issue 13): pipeline ≤ 1.5× the CLI, and the
 * result ≤ 1 s after the upload's response (which comes after the server has the last byte). Run in one command with
 * the API reading the file while it arrives, and with the worker reading it afterwards. Two clients send the file: curl
 * (Debian's, as a lab script would) and Node's fetch (undici copies every chunk through web streams), each both ways
 * the upload route takes it: as the whole request body named by ?fileName= (no multipart encoding or parsing; the way
 * for scripts) and as multipart/form-data (field "files", as browsers send it); `--clients` picks some of the four (the
 * worker-reads mode runs when its client, curl, is picked). The ratio is printed for each, with the processor seconds
 * the client, the API server and the worker used during the upload request; without curl only fetch runs. On the lab
 * machine (2 December 2026, load average 4–5) curl used 0.11–0.14 CPU-s for the whole file and fetch 2.6–2.75 CPU-s,
 * taken from the same two cores the server uses, while the API server used about the same for both (2.4–4.7 CPU-s, its
 * reading thread included; it receives both in the same 64 KiB socket reads, about 5 040 for the file): the gap between
 * the two clients' ratios is the client's own work.
 * Figures only, no pass/fail.
 */
import { spawn, spawnSync } from 'node:child_process';
import { openAsBlob } from 'node:fs';
import { stat } from 'node:fs/promises';
import { cpus, loadavg } from 'node:os';
import { performance } from 'node:perf_hooks';
import { demoAccounts } from '../server/db/seeders/demo.ts';
import { BIG_CAPTURE_SHOT, ensureBigCapture } from './lib/big-capture.ts';
import { startBenchApp } from './lib/bench-app.ts';
import { pollUntil, signIn } from './lib/pipeline-client.ts';
import { cpuSeconds } from './lib/process-usage.ts';
import { timeCli } from './lib/time-process.ts';

/** Rounds per mode: `--rounds N`, default 3. */
const ROUNDS = roundsArgument(process.argv);
const POLL_MS = 20;
/** curl or Node's fetch, sending the file as multipart/form-data (field "files", as browsers do) or, with `body`,
 * as the whole request body named by ?fileName= (no multipart encoding or parsing). */
const CLIENT_NAMES = ['curl body', 'curl', 'fetch body', 'fetch'] as const;
type Client = (typeof CLIENT_NAMES)[number];
/** Clients to run: `--clients a,b` (curl-body, curl, fetch-body, fetch), default all. */
const CLIENTS = clientsArgument(process.argv);

function clientsArgument(argv: string[]): Set<string> | null {
  const at = argv.indexOf('--clients');
  if (at < 0) return null;
  const names = (argv[at + 1] ?? '').split(',').map((n) => n.trim().replace('-', ' '));
  const unknown = names.filter((n) => !(CLIENT_NAMES as readonly string[]).includes(n));
  if (unknown.length > 0 || names.length === 0) throw new Error(`--clients takes some of curl-body, curl, fetch-body, fetch (comma-separated), got '${argv[at + 1] ?? ''}'`);
  return new Set(names);
}

function roundsArgument(argv: string[]): number {
  const at = argv.indexOf('--rounds');
  if (at < 0) return 3;
  const n = Number(argv[at + 1]);
  if (!Number.isInteger(n) || n < 1) throw new Error(`--rounds needs a whole number of rounds, got '${argv[at + 1] ?? ''}'`);
  return n;
}

/**
 * Waits until the API server and the worker have used at most one 10 ms tick of processor time in 250 ms (at most 15 s),
 * so that what they still do after a result (channel files written, a reading thread started ahead for the next
 * upload) is not counted in the next timing: neither against the CLI, nor for the next upload.
 */
async function untilIdle(pids: number[]): Promise<void> {
  const used = () => pids.reduce((sum, pid) => sum + (cpuSeconds(pid) ?? 0), 0);
  const until = performance.now() + 15_000;
  let before = used();
  while (performance.now() < until) {
    await new Promise((resolve) => setTimeout(resolve, 250));
    const now = used();
    if (now - before < 0.015) return;
    before = now;
  }
}

interface ShotView {
  captures: { state: string; error: string | null }[];
  currentAnalysis: { state: string; startedAt: string; completedAt: string; results: { speed: { value: number; uncertainty: number } | null } | null } | null;
  analyses: { state: string; error: string | null }[];
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const s = (ms: number) => `${(ms / 1000).toFixed(2)} s`;
const cpuS = (xs: number[]) => (xs.length > 0 ? `${median(xs).toFixed(2)} s [${xs.map((x) => x.toFixed(2)).join(', ')}]` : 'not measured');

interface Mode {
  label: string;
  env: NodeJS.ProcessEnv;
  client: Client;
}

const HAS_CURL = spawnSync('curl', ['--version'], { stdio: 'ignore' }).status === 0;

/**
 * Uploads `file` in the multipart field "files" with the session cookie; resolves when the answer is in, with the
 * processor seconds the client used for it: this process's own for fetch (process.cpuUsage), curl's read from /proc
 * every 20 ms while it runs (so up to 20 ms of it may be missed; null where /proc cannot say).
 */
async function send(client: Client, url: string, cookie: string, file: string, name: string): Promise<{ status: number; text: string; clientCpuS: number | null }> {
  const bodyUrl = `${url}?fileName=${encodeURIComponent(name)}`;
  if (client === 'fetch' || client === 'fetch body') {
    const before = process.cpuUsage();
    const blob = await openAsBlob(file, { type: 'text/csv' });
    let response: Response;
    if (client === 'fetch body') response = await fetch(bodyUrl, { method: 'POST', headers: { cookie, 'content-type': 'text/csv' }, body: blob });
    else {
      const form = new FormData();
      form.append('files', blob, name);
      response = await fetch(url, { method: 'POST', headers: { cookie }, body: form });
    }
    const text = await response.text();
    const used = process.cpuUsage(before);
    return { status: response.status, text, clientCpuS: (used.user + used.system) / 1e6 };
  }
  const what = client === 'curl body'
    ? ['-H', 'content-type: text/csv', '-X', 'POST', '-T', file, bodyUrl] // -T streams the file (--data-binary would load it whole first)
    : ['-F', `files=@${file};type=text/csv;filename=${name}`, url];
  const curl = spawn('curl', ['-sS', '-o', '-', '-w', '\\n%{http_code}', '-H', `cookie: ${cookie}`, ...what]);
  let clientCpuS: number | null = null;
  const sampler = setInterval(() => { clientCpuS = cpuSeconds(curl.pid!) ?? clientCpuS; }, 20);
  let out = '';
  curl.stdout.setEncoding('utf8').on('data', (d: string) => { out += d; });
  curl.stderr.setEncoding('utf8').on('data', (d: string) => { out += d; });
  const code = await new Promise<number | null>((resolve) => curl.on('close', resolve));
  clearInterval(sampler);
  if (code !== 0) throw new Error(`curl failed (exit ${code}): ${out}`);
  const cut = out.lastIndexOf('\n');
  return { status: Number(out.slice(cut + 1)), text: out.slice(0, cut), clientCpuS };
}

/** The API reads the upload while it arrives (the default for a file this large), and, for comparison, the worker
 * reads it after the upload (the way before issue 13, with the one-pass store kept). */
const READ_MODES = [
  { label: 'the API reads the file while it arrives (default)', env: {} },
  { label: 'the worker reads it after the upload (GATEPOST_READ_UPLOADS_FROM_BYTES=-1)', env: { GATEPOST_READ_UPLOADS_FROM_BYTES: '-1' } },
];
const MODES: Mode[] = [
  ...(HAS_CURL ? [
    { ...READ_MODES[0], client: 'curl body' as const, label: `${READ_MODES[0].label}, sent by curl as the request body (?fileName=)` },
    { ...READ_MODES[0], client: 'curl' as const, label: `${READ_MODES[0].label}, sent by curl as multipart/form-data` },
  ] : []),
  { ...READ_MODES[0], client: 'fetch body', label: `${READ_MODES[0].label}, sent by Node's fetch as the request body (?fileName=)` },
  { ...READ_MODES[0], client: 'fetch', label: `${READ_MODES[0].label}, sent by Node's fetch as multipart/form-data` },
  { ...READ_MODES[1], client: HAS_CURL ? 'curl' : 'fetch', label: `${READ_MODES[1].label}, sent by ${HAS_CURL ? 'curl' : "Node's fetch"}` },
];

export async function runDeepPipelineBench(): Promise<void> {
  const file = await ensureBigCapture();
  if (!HAS_CURL) console.log('curl is not installed (apt-get install -y curl): only Node\'s fetch sends the file');
  const bytes = (await stat(file)).size;
  console.log(`capture: ${file}, ${(bytes / 1e6).toFixed(0)} MB, 10 000 000 samples × 2 channels`);
  const loadBefore = loadavg();
  const lines: string[] = [];
  for (const [k, mode] of MODES.entries()) {
    if (CLIENTS === null || CLIENTS.has(mode.client)) lines.push(...(await runMode(file, mode, k)));
  }
  const load = (l: number[]) => l.map((x) => x.toFixed(2)).join(' ');
  console.log(`machine: ${cpus().length} cores, load average before ${load(loadBefore)}, after ${load(loadavg())}`);
  for (const line of lines) console.log(line);
}

async function runMode(file: string, mode: Mode, k: number): Promise<string[]> {
  const bench = await startBenchApp({ env: mode.env });
  try {
    const account = demoAccounts.find((a) => a.lab === 'hollowmere' && a.role === 'experimenter')!;
    const admin = demoAccounts.find((a) => a.lab === 'hollowmere' && a.role === 'admin') ?? account;
    const adminClient = await signIn(bench.app.baseUrl, admin.email, admin.password, { timeoutMs: 600_000 });
    // A rig matching the capture's two gates (the demo rigs have other spacings).
    const rig = await adminClient.post<{ gateRig: { id: string } }>(`/api/labs/${bench.labId}/gate-rigs`, {
      name: `Bench rig ${k + 1}, two gates 0.1 m apart`, beamWidthM: 0.001, sensorType: 'photodiode',
      gates: BIG_CAPTURE_SHOT.gatePositions.map((p, i) => ({ label: String.fromCharCode(65 + i), position_m: p, position_uncertainty_m: 0.0005 })),
    });
    if (rig.status !== 201) throw new Error(`could not add the bench rig: HTTP ${rig.status} ${JSON.stringify(rig.body)}`);
    const client = await signIn(bench.app.baseUrl, account.email, account.password, { timeoutMs: 600_000 });
    const cli: number[] = [];
    const compiledCli: number[] = [];
    const tsxCli: number[] = [];
    const total: number[] = [];
    const upload: number[] = [];
    const afterUpload: number[] = [];
    const analysis: number[] = [];
    // Processor seconds during the upload request: the client's, the API server's (all its threads: the reading
    // thread too) and the worker's.
    const cpu = { client: [] as number[], api: [] as number[], worker: [] as number[] };
    let speed = '';
    const serverPids = [bench.app.api.pid!, ...(bench.app.worker?.pid !== undefined ? [bench.app.worker.pid] : [])];
    for (let round = 0; round < ROUNDS; round++) {
      await untilIdle(serverPids);
      cli.push((await timeCli(file, 'npm')).ms);
      compiledCli.push((await timeCli(file, 'compiled')).ms);
      tsxCli.push((await timeCli(file, 'tsx')).ms);
      const created = await client.post<{ shot: { id: string } }>(`/api/labs/${bench.labId}/shots`, {
        campaignId: bench.campaignId, projectileId: bench.ballId, gateRigId: rig.body.gateRig.id,
      });
      if (created.status !== 201) throw new Error(`could not log a shot: HTTP ${created.status} ${JSON.stringify(created.body)}`);
      const shotId = created.body.shot.id;
      const url = `${bench.app.baseUrl}/api/shots/${shotId}/captures`;
      await untilIdle(serverPids);
      const apiBefore = cpuSeconds(bench.app.api.pid);
      const workerBefore = bench.app.worker ? cpuSeconds(bench.app.worker.pid) : null;
      const started = performance.now();
      const answer = await send(mode.client, url, client.cookie, file, `deep-${round}.csv`);
      const uploaded = performance.now();
      const apiAfter = cpuSeconds(bench.app.api.pid);
      const workerAfter = bench.app.worker ? cpuSeconds(bench.app.worker.pid) : null;
      if (answer.clientCpuS !== null) cpu.client.push(answer.clientCpuS);
      if (apiBefore !== null && apiAfter !== null) cpu.api.push(apiAfter - apiBefore);
      if (workerBefore !== null && workerAfter !== null) cpu.worker.push(workerAfter - workerBefore);
      if (answer.status !== 202) throw new Error(`upload refused: HTTP ${answer.status} ${answer.text}`);
      const shot = await pollUntil(async () => {
        const d = (await client.get<ShotView>(`/api/shots/${shotId}`)).body;
        const failed = d.captures.find((c) => c.state === 'failed') ?? d.analyses.find((a) => a.state === 'failed');
        if (failed) throw new Error(`shot ${round} failed: ${failed.error}`);
        return d.currentAnalysis?.state === 'done' ? d : undefined;
      }, { timeoutMs: 600_000, intervalMs: POLL_MS, what: `round ${round}'s analysis` });
      const done = performance.now();
      total.push(done - started);
      upload.push(uploaded - started);
      afterUpload.push(done - uploaded);
      const a = shot.currentAnalysis!;
      analysis.push(new Date(a.completedAt).getTime() - new Date(a.startedAt).getTime());
      const v = a.results?.speed;
      speed = v ? `${v.value.toFixed(2)} ± ${v.uncertainty.toFixed(2)} m/s` : 'no speed';
    }
    // Each round's pipeline against the CLI timed just before it: on a machine whose speed drifts (a shared VM), the
    // pairs keep what the two had in common.
    const byRound = total.map((t, i) => t / cli[i]);
    return [
      `${mode.label}:`,
      `  CLI (npm run analyze, own process, wall), median of ${ROUNDS}: ${s(median(cli))}   [${cli.map(s).join(', ')}]`,
      `  pipeline, upload start → analysed result seen, median of ${ROUNDS}: ${s(median(total))}   [${total.map(s).join(', ')}]`,
      `    upload request (until its 202 response): ${s(median(upload))}`,
      `    upload response → result seen: ${s(median(afterUpload))} (target ≤ 1 s); analysis job alone ${s(median(analysis))}`,
      `    processor seconds during the upload request (medians; ${cpus().length} cores shared): client (${mode.client}) ${cpuS(cpu.client)}, ` +
        `API server ${cpuS(cpu.api)}, worker ${cpuS(cpu.worker)}`,
      `  ratio pipeline / CLI (medians): ${(median(total) / median(cli)).toFixed(2)}× (target ≤ 1.5×); round by round ` +
        `${byRound.map((r) => r.toFixed(2)).join(', ')}, median ${median(byRound).toFixed(2)}×; against the compiled bundle ` +
        `alone (node dist/node/…, median ${s(median(compiledCli))}): ${(median(total) / median(compiledCli)).toFixed(2)}×; against the CLI ` +
        `through tsx (as when the target was set, median ${s(median(tsxCli))}): ${(median(total) / median(tsxCli)).toFixed(2)}×`,
      `  check: stored speed ${speed} (simulated truth ${BIG_CAPTURE_SHOT.speed} m/s)`,
    ];
  } finally {
    await bench.close();
  }
}
