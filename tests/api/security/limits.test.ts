// Issue 12, item 2: one file cannot fill the disk or hang the page. Channels per capture, samples per channel,
// bytes per upload and a storage quota per lab are settings (server/config.ts), each refused with a clear message
// before the work is done. The worker's limits are checked through real API and worker processes.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pollUntil, signIn, type PipelineClient } from '../../../bench/lib/pipeline-client.ts';
import { Capture } from '../../../server/db/models/index.ts';
import { labStorageUse } from '../../../server/modules/storage/service.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../../helpers/app-processes.ts';

let h: ApiHarness;
let demo: DemoWorld;
let app: AppProcesses;
let dataDir: string;
let experimenter: PipelineClient;
// Room for the files below, in order: ~3 kB, ~42 kB, ~13 kB with its channels, then ~84 kB whose channels (~163 kB) do not fit.
const QUOTA_HEADROOM = 150_000;
let quotaBytes: number;

/** A plain scope CSV: a time column and `channels` voltage columns (0 or 5 V) of `rows` rows, 1 µs apart. */
function wideCsv(channels: number, rows: number): Uint8Array {
  const header = ['Time (s)', ...Array.from({ length: channels }, (_, k) => `CH${k + 1} (V)`)].join(',');
  const lines = [header];
  for (let i = 0; i < rows; i++) {
    const values = Array.from({ length: channels }, (_, k) => ((i + k) % 7 === 0 ? '5' : '0'));
    lines.push([(i * 1e-6).toExponential(6), ...values].join(','));
  }
  return new TextEncoder().encode(`${lines.join('\n')}\n`);
}

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
  dataDir = mkdtempSync(path.join(tmpdir(), 'gatepost-limits-'));
  // The quota leaves room for the small files below but not for the channel files of the deep one.
  quotaBytes = (await labStorageUse(h.config, demo.labs.hollowmere.id)).usedBytes + QUOTA_HEADROOM;
  app = await startAppProcesses({
    env: {
      GATEPOST_DATA_DIR: dataDir, GATEPOST_LOG_LEVEL: 'warn',
      GATEPOST_MAX_SAMPLES_PER_CHANNEL: '2000', GATEPOST_LAB_STORAGE_QUOTA_BYTES: String(quotaBytes),
    },
  });
  experimenter = await signIn(app.baseUrl, demo.users.experimenter.email, demo.users.experimenter.password);
}, 120_000);

afterAll(async () => {
  await app?.stop();
  await h?.close();
  if (dataDir) rmSync(dataDir, { recursive: true, force: true });
});

async function newShot(): Promise<string> {
  const res = await experimenter.post<{ shot: { id: string } }>(`/api/labs/${demo.labs.hollowmere.id}/shots`, { campaignId: demo.hollowmere.campaignIds[0] });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.shot.id;
}

/** Uploads one file and waits until the worker has settled its capture; returns the capture's row. */
async function uploadAndSettle(name: string, bytes: Uint8Array): Promise<Capture> {
  const shotId = await newShot();
  const up = await experimenter.upload<{ captures: { id: string }[] }>(shotId, [{ name, bytes }]);
  expect(up.status, JSON.stringify(up.body)).toBe(202);
  const id = up.body.captures[0].id;
  return pollUntil(async () => {
    const capture = await Capture.findByPk(id, { rejectOnEmpty: true });
    return capture.state === 'ready' || capture.state === 'failed' ? capture : undefined;
  }, { timeoutMs: 60_000, what: `capture ${name} to settle` });
}

describe('When a capture file has more channels than the installation reads (GATEPOST_MAX_CHANNELS_PER_CAPTURE, 64)', () => {
  it('then the capture fails with a message naming the count and the limit, and no channel is written', async () => {
    // The file had 50 000 columns; 200 make the same point in a fraction of the time.
    const capture = await uploadAndSettle('two-hundred-columns.csv', wideCsv(200, 3));
    expect(capture.state).toBe('failed');
    expect(capture.error).toBe(
      'the file has 200 channels; this installation reads at most 64 per capture (setting GATEPOST_MAX_CHANNELS_PER_CAPTURE). ' +
        'Export only the channels of the gates, or split the file.',
    );
    expect(capture.channels).toBeNull();
  }, 90_000);
});

describe('When a capture file has more samples per channel than the installation reads', () => {
  it('then the capture fails saying so, and no channel is written', async () => {
    const capture = await uploadAndSettle('deep.csv', wideCsv(2, 2_500));
    expect(capture.state).toBe('failed');
    expect(capture.error).toBe(
      'the file holds more than 2,000 samples per channel, the most this installation reads (setting GATEPOST_MAX_SAMPLES_PER_CHANNEL). ' +
        'Export a shorter record or a lower sample rate.',
    );
    expect(capture.channels).toBeNull();
  }, 90_000);
});

describe('When reading a file into channels would take the lab past its storage quota', () => {
  it('then the raw file is kept, the capture fails naming the quota, and a file that fits is read', async () => {
    const small = await uploadAndSettle('fits.csv', wideCsv(2, 500));
    expect(small.state).toBe('ready');
    // 40 channels × 900 samples: ~84 kB of CSV fit, ~163 kB of channel files (Float32 and pyramids) do not.
    const big = await uploadAndSettle('too-big-for-the-quota.csv', wideCsv(40, 900));
    expect(big.state).toBe('failed');
    expect(big.error).toMatch(/^Reading this file into channels \(\d+ kB\) would take the lab past its storage quota: [\d.]+ kB of [\d.]+ kB used\. Ask the installation's administrator for more room\. Nothing was stored\.$/);
    expect(big.channels).toBeNull();
  }, 90_000);
});

describe('Upload limits in the API', () => {
  it('When an upload is larger than GATEPOST_UPLOAD_REQUEST_LIMIT_BYTES, then 413 says so before anything is stored', async () => {
    const shotId = demo.hollowmere.shotIds[0];
    const before = await Capture.count();
    const small = h.appWithConfig({ uploadRequestLimitBytes: 10_000 });
    const res = await request(small)
      .post(`/api/shots/${shotId}/captures`)
      .set('Cookie', h.sessionCookie(demo.users.experimenter.id))
      .attach('files', Buffer.from(wideCsv(2, 1_000)), 'twenty-kilobytes.csv');
    expect(res.status).toBe(413);
    expect(res.body.error.message).toMatch(/^This upload is [\d.]+ kB; this installation accepts at most 10\.0 kB per upload\. Send the files in several uploads\. Nothing was stored\.$/);
    expect(await Capture.count()).toBe(before);
  });

  it('When the lab\'s quota is used up, then an upload gets 413 naming what is used, and nothing is stored', async () => {
    const shotId = demo.hollowmere.shotIds[0];
    const before = await Capture.count();
    const used = (await labStorageUse(h.config, demo.labs.hollowmere.id)).usedBytes;
    const full = h.appWithConfig({ labStorageQuotaBytes: used + 100 });
    const res = await request(full)
      .post(`/api/shots/${shotId}/captures`)
      .set('Cookie', h.sessionCookie(demo.users.experimenter.id))
      .attach('files', Buffer.from(wideCsv(2, 100)), 'one-too-many.csv');
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('storage_quota');
    expect(res.body.error.message).toMatch(/^This upload \([\d.]+ kB\) would take the lab past its storage quota: .* used\. Ask the installation's administrator for more room\. Nothing was stored\.$/);
    expect(await Capture.count()).toBe(before);
  });

  it('When a lab admin asks, then the storage in use, the quota and the limits are shown; other roles get 403', async () => {
    const quota = h.appWithConfig({ labStorageQuotaBytes: 5e9 });
    const url = `/api/labs/${demo.labs.hollowmere.id}/storage`;
    const res = await request(quota).get(url).set('Cookie', h.sessionCookie(demo.users.admin.id));
    expect(res.status).toBe(200);
    const use = await labStorageUse(h.config, demo.labs.hollowmere.id);
    expect(res.body).toEqual({
      storage: { rawBytes: use.rawBytes, channelBytes: use.channelBytes, usedBytes: use.usedBytes, quotaBytes: 5e9 },
      limits: { fileBytes: 2 * 1024 ** 3, requestBytes: 4 * 1024 ** 3, channelsPerCapture: 64, samplesPerChannel: 50_000_000 },
    });
    expect(use.usedBytes).toBeGreaterThan(0);
    expect((await request(quota).get(url).set('Cookie', h.sessionCookie(demo.users.experimenter.id))).status).toBe(403);
  });
});
