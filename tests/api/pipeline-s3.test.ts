// One upload-to-result run with object storage: the API server and the worker (real processes) keep raw files and
// channel files in an S3 bucket served by s3rver (a fake S3 server, started here on a free loopback port) instead
// of on local disk. Truth: the uploaded bytes and the speed the shot model was given.
import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Readable } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Projectile } from '../../server/db/models/index.ts';
import { S3Store } from '../../server/storage/s3-store.ts';
import { pollUntil, signIn, simulatedCsv } from '../../bench/lib/pipeline-client.ts';
import { createApiHarness, freeLoopbackPort, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';

// s3rver ships no type declarations; this is the part of its API the test uses.
interface S3rverInstance { run(): Promise<unknown>; close(): Promise<void> }
type S3rverClass = new (options: Record<string, unknown>) => S3rverInstance;
const S3rver = createRequire(import.meta.url)('s3rver') as S3rverClass;

const BUCKET = 'gatepost-pipeline';
let h: ApiHarness;
let demo: DemoWorld;
let app: AppProcesses;
let work: string;
let s3rver: S3rverInstance;
let s3: S3Store;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
  work = mkdtempSync(path.join(tmpdir(), 'gatepost-pipeline-s3-'));
  const port = await freeLoopbackPort();
  s3rver = new S3rver({ address: '127.0.0.1', port, silent: true, directory: path.join(work, 's3rver'), configureBuckets: [{ name: BUCKET }] });
  await s3rver.run();
  // s3rver's built-in account: access key and secret are both "S3RVER".
  const endpoint = `http://127.0.0.1:${port}`;
  s3 = new S3Store({ endpoint, region: 'us-east-1', bucket: BUCKET, accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER', forcePathStyle: true });
  app = await startAppProcesses({
    env: {
      GATEPOST_DATA_DIR: path.join(work, 'data'), GATEPOST_STORAGE: 's3', GATEPOST_S3_ENDPOINT: endpoint, GATEPOST_S3_BUCKET: BUCKET,
      GATEPOST_S3_ACCESS_KEY_ID: 'S3RVER', GATEPOST_S3_SECRET_ACCESS_KEY: 'S3RVER', GATEPOST_S3_FORCE_PATH_STYLE: 'true',
    },
  });
}, 120_000);

afterAll(async () => {
  await app?.stop();
  s3?.close();
  await s3rver?.close();
  await h?.close();
  if (work) rmSync(work, { recursive: true, force: true });
});

async function readAll(stream: Readable): Promise<Buffer> {
  const parts: Buffer[] = [];
  for await (const chunk of stream) parts.push(chunk as Buffer);
  return Buffer.concat(parts);
}

describe('When the pipeline stores its files in S3', () => {
  it('then an upload is stored byte for byte in the bucket, read and analysed from there, and its windows are served', async () => {
    const client = await signIn(app.baseUrl, demo.users.experimenter.email, demo.users.experimenter.password);
    const ball = await Projectile.findOne({ where: { labId: demo.labs.hollowmere.id, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true });
    const created = await client.post<{ shot: { id: string } }>(`/api/labs/${demo.labs.hollowmere.id}/shots`, {
      campaignId: demo.hollowmere.campaignIds[0], projectileId: ball.id, gateRigId: demo.hollowmere.gateRigIds[0],
    });
    expect(created.status).toBe(201);
    const shotId = created.body.shot.id;
    // The demo exit rig (0, 0.15, 0.3 m) and the shot model at 290 m/s.
    const csv = simulatedCsv({ speed: 290, seed: 21 });
    const up = await client.upload<{ captures: { id: string; sha256: string }[] }>(shotId, [{ name: 's3-run.csv', bytes: csv.bytes }]);
    expect(up.status).toBe(202);
    const { id: captureId, sha256 } = up.body.captures[0];
    expect(sha256).toBe(createHash('sha256').update(csv.bytes).digest('hex'));

    const shot = await pollUntil(async () => {
      const d = (await client.get<{ currentAnalysis: { state: string; results: { speed: { value: number; uncertainty: number } } } | null; captures: { state: string }[] }>(`/api/shots/${shotId}`)).body;
      if (d.captures[0]?.state === 'failed') throw new Error(`the capture failed: ${JSON.stringify(d.captures[0])}`);
      return d.currentAnalysis?.state === 'done' ? d : undefined;
    }, { timeoutMs: 60_000, intervalMs: 50, what: 'the analysis on S3 storage' });
    const speed = shot.currentAnalysis!.results.speed;
    expect(Math.abs(speed.value - 290)).toBeLessThanOrEqual(speed.uncertainty);

    // The raw object in the bucket is the uploaded file, byte for byte.
    const raw = await readAll(s3.openRead(`labs/${demo.labs.hollowmere.id}/raw/${sha256}`));
    expect(Buffer.compare(raw, Buffer.from(csv.bytes))).toBe(0);
    // The channel files went to the bucket too, and nothing to the local data folder.
    expect(await s3.exists(`labs/${demo.labs.hollowmere.id}/captures/${captureId}/ch0/samples.f32`)).toBe(true);
    expect(existsSync(path.join(work, 'data', 'blobs'))).toBe(false);

    // A full-zoom window read back from S3 holds the simulated samples (6 decimals as printed, Float32 as stored).
    const { t0, dt } = csv.shot.time;
    const win = await client.get<{ raw: boolean; v: number[] }>(`/api/captures/${captureId}/window?channel=0&from=${t0 + 500 * dt}&to=${t0 + 519 * dt}&points=50`);
    expect(win.status).toBe(200);
    expect(win.body.raw).toBe(true);
    expect(win.body.v).toHaveLength(20);
    for (let k = 0; k < 20; k++) expect(Math.abs(win.body.v[k] - csv.shot.channels[0].values[500 + k])).toBeLessThan(1.5e-6);
  }, 90_000);
});
