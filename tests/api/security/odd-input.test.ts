// Issue 12, item 12: odd input gets a clear 400, never a 500: NUL or a lone surrogate in text, NUL in an upload's
// file name, a gzip-encoded multipart body, a report of a capture with ±1e308 samples (the importer's side, and the
// 1e300 s interval, are in tests/unit/import/value-limits.test.ts).
import { createHash } from 'node:crypto';
import { gzipSync } from 'node:zlib';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeShot } from '../../../shared/analysis/analyze-shot.ts';
import { ENGINE_VERSION } from '../../../shared/analysis/engine-version.ts';
import { analysisOptionsSchema } from '../../../shared/contracts/analysis.ts';
import type { ImportedCapture } from '../../../shared/contracts/capture.ts';
import { parseScopeCsv } from '../../../shared/import/parse-scope-csv.ts';
import { simulateShot } from '../../../shared/simulate/simulate-shot.ts';
import { simulatedShotToCapture } from '../../../shared/simulate/simulated-shot-to-capture.ts';
import { Analysis, Capture, Shot } from '../../../server/db/models/index.ts';
import { writeChannelFiles } from '../../../server/traces/write-channel-files.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../../helpers/api-harness.ts';
import { binaryBody } from '../../helpers/binary-body.ts';

let h: ApiHarness;
let demo: DemoWorld;
const csv = 'Time (s),CH1 (V)\n0,0\n1e-6,5\n2e-6,0\n';

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
});
afterAll(() => h?.close());

describe('odd input', () => {
  it('When notes hold a NUL or a lone surrogate, then 400 names the field', async () => {
    const cookie = h.sessionCookie(demo.users.analyst.id);
    for (const notes of ['before\u0000after', 'broken \ud800 pair', 'reversed \udc00\ud800']) {
      // Sent as raw JSON text, as a script would: \\u escapes survive JSON.stringify only for the lone surrogates.
      const res = await request(h.app).post(`/api/labs/${demo.labs.hollowmere.id}/projectiles`).set('Cookie', cookie)
        .set('Content-Type', 'application/json').send(JSON.stringify({ name: 'Odd ball', shape: 'sphere', massKg: 0.0027, diameterM: 0.04, notes }));
      expect(res.status, JSON.stringify(res.body)).toBe(400);
      expect(res.body.error.message).toBe('The text of notes holds a NUL character or a broken Unicode character (a lone surrogate), which cannot be stored. Remove it and send again.');
    }
  });

  it('When an upload\'s file name holds a NUL, then 400 says so and nothing is stored', async () => {
    const before = await Capture.count();
    const res = await request(h.app).post(`/api/shots/${demo.hollowmere.shotIds[0]}/captures`).set('Cookie', h.sessionCookie(demo.users.experimenter.id))
      .attach('files', Buffer.from(csv), 'fine.csv')
      .attach('files', Buffer.from(`${csv}\n`), 'gate\u0000b.csv');
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expect(res.body.error.message).toBe('The upload is not well-formed multipart/form-data (malformed part header); a file name holding a NUL or another control character does this. Nothing was stored.');
    expect(await Capture.count()).toBe(before);
  });

  it('When a multipart upload comes gzip-encoded, then 400 says to send it plain', async () => {
    const boundary = 'gatepost-odd-input';
    const body = Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="files"; filename="g.csv"\r\nContent-Type: text/csv\r\n\r\n${csv}\r\n--${boundary}--\r\n`);
    const res = await request(h.app).post(`/api/shots/${demo.hollowmere.shotIds[0]}/captures`).set('Cookie', h.sessionCookie(demo.users.experimenter.id))
      .set('Content-Type', `multipart/form-data; boundary=${boundary}`).set('Content-Encoding', 'gzip').send(gzipSync(body));
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expect(res.body.error.message).toBe('Send the files without Content-Encoding (this upload came as gzip); scope CSV files are taken as they are. Nothing was stored.');
  });
});

describe('a report of a capture with values out of range', () => {
  /** A shot analysed on `capture` and stored the way the worker stores it: what a file read before the importer's bounds left. */
  async function storedShot(capture: ImportedCapture, number: number) {
    const labId = demo.labs.hollowmere.id;
    const shot = await Shot.create({ labId, campaignId: demo.hollowmere.campaignIds[0], number, firedAt: new Date('2026-10-14T09:30:00Z'), createdBy: demo.users.experimenter.id });
    const sha256 = createHash('sha256').update(`out-of-range-${shot.id}`).digest('hex');
    const row = await Capture.create({ labId, shotId: shot.id, fileName: 'huge.csv', sizeBytes: 1000, sha256, storageKey: `labs/${labId}/raw/${sha256}`, uploadedBy: shot.createdBy, state: 'ready' });
    const descriptor = await writeChannelFiles(h.deps.blobStore, labId, row.id, capture);
    await row.update({ channels: descriptor, sampleCount: capture.length, timeBase: descriptor.time, warnings: capture.warnings });
    const parameters = analysisOptionsSchema.parse({ gates: [0, 0.15, 0.3].map((position, i) => ({ channel: capture.channels[i].name, position })) });
    // Stored as JSON, as the worker stores it: infinities become null.
    const results = JSON.parse(JSON.stringify(analyzeShot(capture, parameters))) as object;
    const analysis = await Analysis.create({ labId, shotId: shot.id, version: 1, parameters, engineVersion: ENGINE_VERSION, jobKey: `out-of-range-${shot.id}`, requestedBy: null, state: 'done', results, captureIds: [row.id], completedAt: new Date() });
    await shot.update({ status: 'analysed', currentAnalysisId: analysis.id });
    return shot.id;
  }

  const model = () => simulatedShotToCapture(simulateShot({
    speed: 300, diameter: 0.04, sampleInterval: 2e-7, length: 4000, t0: -1e-4, arrivalTime: 1e-4, noiseRms: 0.01,
    responseTime: 1e-6, seed: 7, gatePositions: [0, 0.15, 0.3], channelNames: ['Gate A', 'Gate B', 'Gate C'],
  }));

  it('When a stored capture holds ±1e308 samples, then the PDF report is a clear 400, not a 500', async () => {
    const capture = model();
    // The probe's file: +1e308 while the beam is clear, -1e308 while it is cut.
    capture.channels[0] = { ...capture.channels[0], values: Float64Array.from(capture.channels[0].values, (v) => (v > 0.5 ? 1e308 : -1e308)) };
    const shotId = await storedShot(capture, 880);
    const res = await request(h.app).get(`/api/shots/${shotId}/report.pdf`).set('Cookie', h.sessionCookie(demo.users.reviewer.id));
    expect(res.status, String(res.text)).toBe(400);
    expect(res.body.error.message).toBe('The report of shot 880 cannot be drawn: channel Gate A holds samples beyond what can be stored as numbers (±3.4e38 V or more). Its file was read before Gatepost refused samples at or beyond ±9.9e37 and times beyond ±1e12 s: check that file\'s values and its time column.');
  });

  it('When the same file is read now, then the out-of-range samples are invalid gaps and the report is drawn', async () => {
    const lines = ['Time (s),Gate A (V),Gate B (V),Gate C (V)'];
    const m = model();
    for (let i = 0; i < m.length; i++) {
      lines.push([(-1e-4 + i * 2e-7).toPrecision(8), m.channels[0].values[i] > 0.5 ? '1e308' : '-1e308', m.channels[1].values[i].toFixed(5), m.channels[2].values[i].toFixed(5)].join(','));
    }
    const capture = parseScopeCsv(new TextEncoder().encode(`${lines.join('\n')}\n`));
    expect(capture.channels[0].invalidCount).toBe(m.length);
    const shotId = await storedShot(capture, 881);
    const res = await request(h.app).get(`/api/shots/${shotId}/report.pdf`).set('Cookie', h.sessionCookie(demo.users.reviewer.id)).buffer(true).parse(binaryBody);
    expect(res.status, String(res.body)).toBe(200);
    expect((res.body as Buffer).subarray(0, 5).toString()).toBe('%PDF-');
  });
});
