// The bench uploader's upload request (worker/cli/bench/api-client.ts): the multipart body it streams from disk is
// parsed by multer, the package the API server itself parses uploads with (server/modules/shots/uploads.ts), and the
// bytes and names that arrive are compared with the files on disk.
import { randomBytes } from 'node:crypto';
import { appendFileSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';
import express from 'express';
import multer from 'multer';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ApiError, TransientError, createBenchApi } from '../../../../worker/cli/bench/api-client.ts';

let dir: string;
const servers: Server[] = [];

async function listen(handler: Parameters<typeof createServer>[1]): Promise<string> {
  const server = createServer(handler);
  servers.push(server);
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  return `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
}

beforeAll(() => {
  dir = mkdtempSync(path.join(tmpdir(), 'gatepost-uploader-'));
});
afterAll(async () => {
  await Promise.all(servers.map((s) => new Promise((resolve) => { s.closeAllConnections(); s.close(resolve); })));
  rmSync(dir, { recursive: true, force: true });
});

describe('bench uploader: upload', () => {
  it('When two files are uploaded, then the server receives each byte for byte under its name, in the field "files"', async () => {
    // Binary content holding CR LF and dashes (what a boundary is made of), several reads long, and a short file.
    const big = randomBytes(3 * (1 << 20) + 12_345);
    big.set(Buffer.from('\r\n------gatepost-\r\n--\r\n'), 1000);
    const small = Buffer.from('Time (s),CH1 (V)\r\n0,1\r\n');
    writeFileSync(path.join(dir, 'big.bin'), big);
    writeFileSync(path.join(dir, 'small.csv'), small);
    const app = express();
    let seen: { field: string; name: string; bytes: Buffer }[] = [];
    let auth = '';
    app.post('/api/shots/:id/captures', multer({ storage: multer.memoryStorage() }).array('files', 32), (req, res) => {
      auth = req.headers.authorization ?? '';
      seen = (req.files as Express.Multer.File[]).map((f) => ({ field: f.fieldname, name: Buffer.from(f.originalname, 'latin1').toString('utf8'), bytes: f.buffer }));
      res.status(202).json({ captures: seen.map((s) => ({ fileName: s.name, size: s.bytes.length })) });
    });
    const baseUrl = await listen(app);
    const api = createBenchApi({ baseUrl, token: 'gpt_test' });
    const answer = await api.upload<{ captures: { fileName: string; size: number }[] }>('s1', [
      { path: path.join(dir, 'big.bin'), name: 'µs "run" 1.csv' },
      { path: path.join(dir, 'small.csv'), name: 'b.csv' },
    ]);
    expect(auth).toBe('Bearer gpt_test');
    expect(seen.map((s) => s.field)).toEqual(['files', 'files']);
    // A quote in a name travels as %22, as browsers and Node's FormData send it; the parser turns it back.
    expect(seen.map((s) => s.name)).toEqual(['µs "run" 1.csv', 'b.csv']);
    expect(seen[0].bytes.equals(big)).toBe(true);
    expect(seen[1].bytes.equals(small)).toBe(true);
    expect(answer.captures.map((c) => c.size)).toEqual([big.length, small.length]);
  });

  it('When the server answers before reading the body (as the API does to a refused token), then its answer is the error, not a hang', async () => {
    writeFileSync(path.join(dir, 'refused.bin'), randomBytes(8 << 20));
    const baseUrl = await listen((_req, res) => {
      // Node's server then reads the rest of the body and drops it.
      res.writeHead(401, { 'content-type': 'application/json' });
      res.end(JSON.stringify({ error: { message: 'This token was revoked.' } }));
    });
    const api = createBenchApi({ baseUrl, token: 'gpt_x', timeoutMs: 20_000 });
    const error = await api.upload('s1', [{ path: path.join(dir, 'refused.bin'), name: 'r.bin' }]).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiError);
    expect((error as ApiError).status).toBe(401);
    expect((error as ApiError).message).toBe('This token was revoked.');
  });

  it('When nothing listens, then the failure may pass (TransientError); a missing file is not one', async () => {
    const closed = createServer();
    await new Promise<void>((resolve) => closed.listen(0, '127.0.0.1', resolve));
    const port = (closed.address() as AddressInfo).port;
    await new Promise((resolve) => closed.close(resolve));
    writeFileSync(path.join(dir, 'x.csv'), 'a,b\n');
    const api = createBenchApi({ baseUrl: `http://127.0.0.1:${port}`, token: 'gpt_x' });
    const unreachable = await api.upload('s1', [{ path: path.join(dir, 'x.csv'), name: 'x.csv' }]).catch((e: unknown) => e);
    expect(unreachable).toBeInstanceOf(TransientError);
    expect((unreachable as Error).message).toContain('ECONNREFUSED');
    const missing = await api.upload('s1', [{ path: path.join(dir, 'gone.csv'), name: 'gone.csv' }]).catch((e: unknown) => e);
    expect(missing).not.toBeInstanceOf(TransientError);
    expect((missing as NodeJS.ErrnoException).code).toBe('ENOENT');
  });

  it('When the file grows while it is sent, then the body is cut off before its closing boundary and the upload is to be sent again', async () => {
    const file = path.join(dir, 'growing.csv');
    writeFileSync(file, randomBytes(6 << 20));
    let received = 0;
    let appended = false;
    let ended = false;
    const baseUrl = await listen((req, res) => {
      req.on('data', (d: Buffer) => {
        received += d.length;
        if (!appended) {
          appended = true;
          appendFileSync(file, 'more,rows\n');
        }
      });
      req.on('end', () => {
        ended = true;
        res.end('{}');
      });
    });
    const api = createBenchApi({ baseUrl, token: 'gpt_x' });
    const error = await api.upload('s1', [{ path: file, name: 'growing.csv' }]).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(TransientError);
    expect((error as Error).message).toBe('growing.csv changed while it was being sent; it is sent again once it is stable');
    await new Promise((resolve) => setTimeout(resolve, 100));
    expect(received).toBeGreaterThan(0);
    expect(ended).toBe(false);
  });
});
