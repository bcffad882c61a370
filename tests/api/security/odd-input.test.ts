// Issue 12, item 12: odd input gets a clear 400, never a 500: NUL or a lone surrogate in text, NUL in an upload's
// file name, a gzip-encoded multipart body.
import { gzipSync } from 'node:zlib';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Capture } from '../../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../../helpers/api-harness.ts';

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
