// The bench uploader (worker/cli/bench) against a real running server and worker, spoken to over HTTP only with a
// personal API token: a file written in chunks, two files of one shot, the server stopped and restarted during a
// watch, and a file never sent twice. Truth comes from outside the uploader: the fixture generator's recorded values
// (fixtures/generate.ts: the per-channel pair at 312 m/s through gates 100 mm apart), the shot model's input speed
// (shared/simulate/simulate-shot.ts) and the bytes written to the folder.
import { spawn, type ChildProcessWithoutNullStreams } from 'node:child_process';
import { createHash } from 'node:crypto';
import { appendFileSync, copyFileSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Campaign, GateRig, Projectile, Shot } from '../../server/db/models/index.ts';
import { pollUntil, signIn, simulatedCsv, type PipelineClient } from '../../bench/lib/pipeline-client.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';

const root = path.resolve(import.meta.dirname, '../..');
const fixturePath = (name: string) => path.join(root, 'fixtures/captures', name);
const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

let h: ApiHarness;
let demo: DemoWorld;
let app: AppProcesses;
let dataDir: string;
let work: string;
let experimenter: PipelineClient;
let token: string;
let campaignId: string;

interface Watcher { child: ChildProcessWithoutNullStreams; out: string[]; err: string[]; exited: Promise<number | null> }

function startWatch(folder: string, extra: string[] = []): Watcher {
  const child = spawn(path.join(root, 'node_modules/.bin/tsx'), ['worker/cli/bench/main.ts', 'watch', folder, '--campaign', 'Bench uploader trial', '--server', app.baseUrl, '--settle', '0.8', '--group', '1.5', ...extra], {
    cwd: root, env: { ...process.env, GATEPOST_TOKEN: token }, stdio: 'pipe',
  });
  const w: Watcher = { child, out: [], err: [], exited: new Promise((resolve) => child.on('exit', (code) => resolve(code))) };
  let buffer = '';
  child.stdout.on('data', (d: Buffer) => {
    buffer += d.toString();
    const lines = buffer.split('\n');
    buffer = lines.pop()!;
    w.out.push(...lines);
  });
  child.stderr.on('data', (d: Buffer) => w.err.push(...d.toString().split('\n').filter(Boolean)));
  return w;
}

const lineFor = (w: Watcher, number: number) =>
  pollUntil(async () => w.out.find((l) => l.startsWith(`shot #${number} `)), { timeoutMs: 90_000, intervalMs: 100, what: `the line of shot #${number}; stdout: ${w.out.join(' | ')}; stderr: ${w.err.join(' | ')}` });

/** "312.41 ± 0.52 m/s" in a result line → [312.41, 0.52]. */
function speedOf(line: string): [number, number] {
  const m = /([\d.]+) ± ([\d.]+) m\/s/.exec(line);
  if (!m) throw new Error(`no speed in "${line}"`);
  return [Number(m[1]), Number(m[2])];
}

interface Detail { shot: { number: number; notes: string; projectileId: string | null; gateRigId: string | null }; captures: { fileName: string; sha256: string; sizeBytes: number }[] }

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
  dataDir = mkdtempSync(path.join(tmpdir(), 'gatepost-bench-data-'));
  work = mkdtempSync(path.join(tmpdir(), 'gatepost-bench-'));
  app = await startAppProcesses({ env: { GATEPOST_DATA_DIR: dataDir } });
  experimenter = await signIn(app.baseUrl, demo.users.experimenter.email, demo.users.experimenter.password);
  const created = await experimenter.post<{ secret: string }>('/api/me/tokens', { name: 'bench PC', password: demo.users.experimenter.password });
  expect(created.status).toBe(201);
  token = created.body.secret;
  // A campaign whose first shot was logged by hand with the ball and a two-gate rig 100 mm apart: the uploader's
  // shots take that set-up over.
  const labId = demo.labs.hollowmere.id;
  const rig = await GateRig.create({
    labId, name: 'Bench pair, 100 mm', beamWidthM: 0.001, sensorType: 'photodiode',
    gates: [{ label: 'A', position_m: 0, position_uncertainty_m: 0.0002 }, { label: 'B', position_m: 0.1, position_uncertainty_m: 0.0002 }],
  });
  const ball = await Projectile.findOne({ where: { labId, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true });
  campaignId = (await Campaign.create({ labId, name: 'Bench uploader trial', startedOn: null, createdBy: demo.users.experimenter.id })).id;
  const first = await experimenter.post(`/api/labs/${labId}/shots`, { campaignId, projectileId: ball.id, gateRigId: rig.id, sealType: 'Mylar 50 µm' });
  expect(first.status).toBe(201);
}, 120_000);

afterAll(async () => {
  await app?.stop();
  await h?.close();
  for (const dir of [dataDir, work]) if (dir) rmSync(dir, { recursive: true, force: true });
  rmSync(path.join(path.dirname(work ?? '/nonexistent'), `.${path.basename(work ?? 'x')}.gatepost-journal`), { force: true });
});

describe('When the bench uploader watches a folder', () => {
  let watcher: Watcher;
  let folder: string;

  beforeAll(() => {
    folder = path.join(work, 'scope');
    rmSync(folder, { recursive: true, force: true });
    mkdirSync(folder);
    watcher = startWatch(folder);
  });

  afterAll(async () => {
    watcher?.child.kill('SIGINT');
    await watcher?.exited;
  });

  it('then two files saved together, one written in chunks, go to one new shot with the last set-up and give 312 m/s', async () => {
    const a = readFileSync(fixturePath('per-channel-gate-a.csv'));
    // Written in five chunks 300 ms apart: the uploader must wait for the whole file, not send its first part.
    const target = path.join(folder, 'gate-a.csv');
    const step = Math.ceil(a.length / 5);
    writeFileSync(target, a.subarray(0, step));
    for (let i = step; i < a.length; i += step) {
      await sleep(300);
      appendFileSync(target, a.subarray(i, i + step));
    }
    copyFileSync(fixturePath('per-channel-gate-b.csv'), path.join(folder, 'gate-b.csv'));

    const line = await lineFor(watcher, 2);
    expect(line).toContain('2 files (gate-a.csv, gate-b.csv)');
    const [value, u] = speedOf(line);
    expect(Math.abs(value - 312)).toBeLessThanOrEqual(u);

    const shot = await Shot.findOne({ where: { campaignId, number: 2 }, rejectOnEmpty: true });
    const d = (await experimenter.get<Detail>(`/api/shots/${shot.id}`)).body;
    expect(d.captures.map((c) => c.fileName).sort()).toEqual(['gate-a.csv', 'gate-b.csv']);
    // Byte for byte: the chunked file arrived whole.
    expect(d.captures.find((c) => c.fileName === 'gate-a.csv')!.sha256).toBe(sha256(a));
    const firstShot = await Shot.findOne({ where: { campaignId, number: 1 }, rejectOnEmpty: true });
    expect(d.shot).toMatchObject({ projectileId: firstShot.projectileId, gateRigId: firstShot.gateRigId });
  }, 120_000);

  it('then a file saved while the server is down is sent once it is back, and its result printed', async () => {
    await app.api.stop();
    const sim = simulatedCsv({ gatePositions: [0, 0.1], speed: 280, seed: 11 });
    writeFileSync(path.join(folder, 'while-down.csv'), sim.bytes);
    await pollUntil(async () => (watcher.err.some((l) => /cannot be reached/.test(l)) ? true : undefined), { timeoutMs: 30_000, what: 'the uploader to notice the outage' });
    await sleep(1500);
    await app.restartApi();
    const line = await lineFor(watcher, 3);
    expect(line).toContain('1 file (while-down.csv)');
    const [value, u] = speedOf(line);
    expect(Math.abs(value - 280)).toBeLessThanOrEqual(u);
    expect(await Shot.count({ where: { campaignId } })).toBe(3);
  }, 120_000);

  it('then the same content saved again under another name is not sent twice, nor after a restart of the uploader', async () => {
    copyFileSync(path.join(folder, 'while-down.csv'), path.join(folder, 'while-down-copy.csv'));
    await pollUntil(async () => (watcher.err.some((l) => l.includes('while-down-copy.csv: the same content was sent before')) ? true : undefined), { timeoutMs: 30_000, what: 'the duplicate to be noticed' });
    watcher.child.kill('SIGINT');
    expect(await watcher.exited, `stdout: ${watcher.out.join(' | ')}; stderr: ${watcher.err.join(' | ')}`).toBe(0);
    expect(watcher.out.filter((l) => !/^shot #[23] /.test(l)), 'only the two shots’ lines').toEqual([]);
    // A new watch of the same folder reads the journal beside it: nothing there is new.
    watcher = startWatch(folder);
    await pollUntil(async () => (watcher.err.filter((l) => l.includes('sent before')).length >= 4 ? true : undefined), { timeoutMs: 30_000, what: `every file to be recognised: ${watcher.err.join(' | ')}` });
    await sleep(2000);
    expect(watcher.out).toEqual([]);
    expect(await Shot.count({ where: { campaignId } })).toBe(3);
  }, 120_000);
});

describe('When one file is uploaded to an existing shot from the command line', () => {
  it('then it prints the shot line with the speed, and a refused token is said plainly', async () => {
    const labId = demo.labs.hollowmere.id;
    const ball = await Projectile.findOne({ where: { labId, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true });
    const created = await experimenter.post<{ shot: { id: string; number: number } }>(`/api/labs/${labId}/shots`, { campaignId, projectileId: ball.id, gateRigId: demo.hollowmere.gateRigIds[0] });
    const sim = simulatedCsv({ gatePositions: [0, 0.15, 0.3], speed: 300 });
    const file = path.join(work, 'single.csv');
    writeFileSync(file, sim.bytes);
    const run = (env: NodeJS.ProcessEnv) => new Promise<{ code: number | null; out: string; err: string }>((resolve) => {
      const child = spawn(path.join(root, 'node_modules/.bin/tsx'), ['worker/cli/bench/main.ts', 'upload', file, '--shot', created.body.shot.id, '--server', app.baseUrl], { cwd: root, env: { ...process.env, ...env } });
      let out = '';
      let err = '';
      child.stdout.on('data', (d: Buffer) => (out += d.toString()));
      child.stderr.on('data', (d: Buffer) => (err += d.toString()));
      child.on('exit', (code) => resolve({ code, out, err }));
    });
    const bad = await run({ GATEPOST_TOKEN: 'gpt_not-a-real-token' });
    expect(bad.code).toBe(1);
    expect(bad.err).toMatch(/the server refused: .*token/i);
    const ok = await run({ GATEPOST_TOKEN: token });
    expect(ok.code, ok.err).toBe(0);
    expect(ok.out).toMatch(new RegExp(`^shot #${created.body.shot.number}  1 file \\(single.csv\\)  `));
    const [value, u] = speedOf(ok.out);
    expect(Math.abs(value - 300)).toBeLessThanOrEqual(u);
  }, 120_000);
});
