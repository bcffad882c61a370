// One file sent as the whole request body of POST /api/shots/:shotId/captures, named by ?fileName= (beside the
// multipart upload, which these tests leave as it was): stored byte for byte under its hash like a multipart file,
// and every way such a request can be wrong answered with a message, nothing stored. The whole pipeline on a file
// sent this way (read on arrival, analysed) is in read-during-upload.test.ts.
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { request as httpRequest } from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Capture } from '../../server/db/models/index.ts';
import type { LocalDiskStore } from '../../server/storage/local-disk-store.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';

let h: ApiHarness;
let demo: DemoWorld;
let shotId: string;
let cookie: string;

const csv = (rows: number, seed: number) => {
  const lines = ['Time (s),CH1 (V),CH2 (V)'];
  for (let i = 0; i < rows; i++) lines.push(`${(i * 1e-6).toExponential(6)},${((i * seed) % 11 === 0 ? 5 : 0).toFixed(3)},${(i % 13 === 0 ? 5 : 0).toFixed(3)}`);
  return Buffer.from(`${lines.join('\r\n')}\r\n`);
};
const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');
const staged = () => {
  const dir = path.join((h.deps.blobStore as LocalDiskStore).rootDir, '.incoming');
  return existsSync(dir) ? readdirSync(dir) : [];
};
const url = (query = '') => `/api/shots/${shotId}/captures${query}`;

/**
 * Sends `chunks` to `app` as a request body written piece by piece: chunked transfer encoding when no
 * `content-length` header is given (a script piping a file of unknown size). Resolves with the answer.
 */
async function sendRaw(app: Express, pathAndQuery: string, headers: Record<string, string>, chunks: Buffer[]): Promise<{ status: number; body: { error?: { message: string } } }> {
  const server = app.listen(0, '127.0.0.1');
  await new Promise((resolve) => server.once('listening', resolve));
  try {
    const { port } = server.address() as AddressInfo;
    return await new Promise((resolve, reject) => {
      const req = httpRequest({ host: '127.0.0.1', port, method: 'POST', path: pathAndQuery, headers: { cookie, ...headers } }, (res) => {
        let text = '';
        res.setEncoding('utf8').on('data', (d: string) => { text += d; }).on('end', () => resolve({ status: res.statusCode ?? 0, body: JSON.parse(text) as never }));
      });
      // The server may answer (and stop reading) before every chunk is written: that is not a failure here.
      req.on('error', (error: NodeJS.ErrnoException) => { if (error.code !== 'EPIPE' && error.code !== 'ECONNRESET') reject(error); });
      for (const chunk of chunks) req.write(chunk);
      req.end();
    });
  } finally {
    server.close();
  }
}

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
  shotId = demo.hollowmere.shotIds[0];
  cookie = h.sessionCookie(demo.users.experimenter.id);
});
afterAll(() => h?.close());

describe('When a file is sent as the request body with ?fileName=', () => {
  const bytes = csv(2_000, 3);

  it('then it is stored byte for byte under its hash and recorded under that name, as a multipart file would be', async () => {
    // A name a lab would give, with letters outside ASCII: the URL carries it as UTF-8 (no Latin-1 detour).
    const name = 'µs-run Lauf 7, Schräge.csv';
    const res = await request(h.app).post(url(`?fileName=${encodeURIComponent(name)}`)).set('Cookie', cookie).set('Content-Type', 'text/csv').send(bytes);
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    expect(res.body.captures).toEqual([{ id: expect.any(String), fileName: name, sizeBytes: bytes.length, sha256: sha256(bytes), state: 'queued', duplicate: false }]);
    const row = await Capture.findByPk(res.body.captures[0].id as string, { rejectOnEmpty: true });
    expect(row).toMatchObject({ shotId, fileName: name, sha256: sha256(bytes), sizeBytes: String(bytes.length) });
    const stored = readFileSync((h.deps.blobStore as LocalDiskStore).localPathOf(row.storageKey));
    expect(Buffer.compare(stored, bytes)).toBe(0);
    expect(staged()).toEqual([]);
  });

  it('then the same bytes sent again, either way, are the same capture (duplicate), and nothing new is stored', async () => {
    const before = await Capture.count();
    const again = await request(h.app).post(url('?fileName=again.csv')).set('Cookie', cookie).set('Content-Type', 'application/octet-stream').send(bytes);
    expect(again.status, JSON.stringify(again.body)).toBe(202);
    expect(again.body.captures[0]).toMatchObject({ sha256: sha256(bytes), duplicate: true });
    const multipart = await request(h.app).post(url()).set('Cookie', cookie).attach('files', bytes, 'as-multipart.csv');
    expect(multipart.status, JSON.stringify(multipart.body)).toBe(202);
    expect(multipart.body.captures[0]).toMatchObject({ id: again.body.captures[0].id, duplicate: true });
    expect(await Capture.count()).toBe(before);
  });

  it('then a body without a media type (curl -T) or sent in chunks of unknown length is taken the same way', async () => {
    const other = csv(1_500, 5);
    const res = await sendRaw(h.app, url('?fileName=chunked.csv'), {}, [other.subarray(0, 1000), other.subarray(1000, 20_000), other.subarray(20_000)]);
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    const row = await Capture.findOne({ where: { shotId, fileName: 'chunked.csv' }, rejectOnEmpty: true });
    expect(row.sha256).toBe(sha256(other));
    expect(Buffer.compare(readFileSync((h.deps.blobStore as LocalDiskStore).localPathOf(row.storageKey)), other)).toBe(0);
  });
});

describe('When a file body is wrong', () => {
  const bytes = csv(200, 7);

  it('then one without ?fileName= is 400 saying how to name it, and nothing is stored', async () => {
    const before = await Capture.count();
    const res = await request(h.app).post(url()).set('Cookie', cookie).set('Content-Type', 'text/csv').send(bytes);
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe('Name the file sent as the request body: add ?fileName=… (for example ?fileName=shot-12.csv) to the URL. Nothing was stored.');
    expect(await Capture.count()).toBe(before);
  });

  it('then a request with no body at all is 400 "no file received", naming both ways to send files', async () => {
    const res = await request(h.app).post(url()).set('Cookie', cookie);
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe('No file received: send one or more scope CSV files in the multipart field "files", or one file as the request body with ?fileName=… in the URL.');
  });

  it('then a JSON or form body with ?fileName= is 415: it holds no file', async () => {
    const before = await Capture.count();
    const json = await request(h.app).post(url('?fileName=a.csv')).set('Cookie', cookie).send({ file: 'Time,CH1\n0,1\n' });
    expect(json.status).toBe(415);
    expect(json.body.error.message).toMatch(/^A application\/json body holds no file\. Send the scope CSV file itself as the request body/);
    const form = await request(h.app).post(url('?fileName=a.csv')).set('Cookie', cookie).type('form').send('file=Time,CH1');
    expect(form.status).toBe(415);
    expect(await Capture.count()).toBe(before);
  });

  it('then a name that is empty, too long, repeated or holds a control character is 400 naming fileName', async () => {
    const before = await Capture.count();
    for (const query of ['?fileName=', `?fileName=${'a'.repeat(256)}`, '?fileName=a%00b.csv', '?fileName=line%0Abreak.csv', '?fileName=a.csv&fileName=b.csv']) {
      const res = await request(h.app).post(url(query)).set('Cookie', cookie).set('Content-Type', 'text/csv').send(bytes);
      expect(res.status, query).toBe(400);
      expect(res.body.error.message, query).toMatch(/fileName/);
    }
    expect(await Capture.count()).toBe(before);
  });

  it('then a body declared larger than a file may be is 413 before a byte is read', async () => {
    const before = await Capture.count();
    const small = h.appWithConfig({ uploadLimitBytes: 10_000 });
    const res = await request(small).post(url('?fileName=big.csv')).set('Cookie', cookie).set('Content-Type', 'text/csv').send(csv(1_000, 11));
    expect(res.status).toBe(413);
    expect(res.body.error.message).toBe('A file is larger than this installation accepts (0.00000931 GB). Nothing was stored.');
    expect(await Capture.count()).toBe(before);
  });

  it('then a chunked body that grows past the limit is 413 once it does, and nothing is stored or left staged', async () => {
    const before = await Capture.count();
    const small = h.appWithConfig({ uploadLimitBytes: 10_000 });
    const big = csv(1_000, 13);
    const res = await sendRaw(small, url('?fileName=grows.csv'), { 'content-type': 'text/csv' }, [big.subarray(0, 8_000), big.subarray(8_000)]);
    expect(res.status).toBe(413);
    expect(res.body.error?.message).toBe('A file is larger than this installation accepts (0.00000931 GB). Nothing was stored.');
    expect(await Capture.count()).toBe(before);
    expect(staged()).toEqual([]);
  });
});

describe('The OpenAPI document', () => {
  it('lists both ways to send files to the upload route, and its fileName parameter', async () => {
    const doc = (await request(h.app).get('/api/openapi.json')).body as { paths: Record<string, Record<string, { requestBody: { content: Record<string, unknown> }; parameters: { name: string; in: string }[] }>> };
    const upload = doc.paths['/api/shots/{shotId}/captures'].post;
    expect(Object.keys(upload.requestBody.content)).toEqual(['multipart/form-data', 'text/csv', 'text/plain', 'application/octet-stream']);
    expect(upload.parameters).toContainEqual(expect.objectContaining({ name: 'fileName', in: 'query' }));
  });
});
