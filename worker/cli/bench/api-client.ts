/**
 * The bench uploader's only way to the server: the public HTTP API with a personal token (Bearer gpt_…).
 * Failures that may pass (the server not reachable, 5xx, 429) are TransientError and retried by `withRetry` with
 * backoff; everything else (a refused token, bad input) is ApiError and stops the one operation that met it.
 */
import { randomBytes } from 'node:crypto';
import { open, type FileHandle } from 'node:fs/promises';
import { request as httpRequest, type IncomingMessage } from 'node:http';
import { request as httpsRequest } from 'node:https';

export class ApiError extends Error {
  constructor(readonly status: number, message: string) {
    super(message);
    this.name = 'ApiError';
  }
}

export class TransientError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'TransientError';
  }
}

export interface UploadFile { path: string; name: string }

export interface BenchApi {
  baseUrl: string;
  get<T>(path: string): Promise<T>;
  post<T>(path: string, body: unknown): Promise<T>;
  /**
   * POST /api/shots/:shotId/captures with the files' bytes, streamed from disk as they are sent (multipart/form-data
   * with a Content-Length). A file whose size or modification time changes while it is sent is not sent: the
   * request is cut off before its end, so the server stores nothing, and a TransientError says why.
   */
  upload<T>(shotId: string, files: UploadFile[]): Promise<T>;
}

export interface BenchApiOptions {
  baseUrl: string;
  token: string;
  /** Give up on one request after this long (the retry loop then tries again). @default 120000 */
  timeoutMs?: number;
}

function reasonOf(err: unknown): string {
  const cause = (err as { cause?: { code?: string; message?: string } }).cause;
  return cause?.code ?? cause?.message ?? (err as Error).message;
}

export function createBenchApi({ baseUrl, token, timeoutMs = 120_000 }: BenchApiOptions): BenchApi {
  const root = baseUrl.replace(/\/+$/, '');
  async function send<T>(method: string, path: string, body?: BodyInit, headers: Record<string, string> = {}): Promise<T> {
    let response: Response;
    try {
      response = await fetch(`${root}${path}`, {
        method,
        headers: { authorization: `Bearer ${token}`, accept: 'application/json', ...headers },
        body,
        signal: AbortSignal.timeout(timeoutMs),
      });
    } catch (err) {
      throw new TransientError(`the server at ${root} cannot be reached (${reasonOf(err)})`);
    }
    return answer<T>(response.status, response.statusText, await response.text());
  }
  function answer<T>(status: number, statusText: string, text: string): T {
    let json: unknown;
    try {
      json = text ? JSON.parse(text) : {};
    } catch {
      json = undefined;
    }
    if (status >= 200 && status < 300 && json !== undefined) return json as T;
    const message = (json as { error?: { message?: string } } | undefined)?.error?.message ?? `HTTP ${status} ${statusText}`;
    if (status >= 500 || status === 429 || status === 408 || json === undefined) {
      throw new TransientError(`the server answered ${status}: ${message}`);
    }
    throw new ApiError(status, message);
  }
  async function upload<T>(path: string, files: UploadFile[]): Promise<T> {
    const { status, statusText, text } = await sendMultipart(new URL(`${root}${path}`), files, { authorization: `Bearer ${token}`, accept: 'application/json' }, timeoutMs)
      .catch((err: unknown) => {
        if (err instanceof NetworkError) throw new TransientError(`the server at ${root} cannot be reached (${reasonOf(err.cause)})`);
        throw err;
      });
    return answer<T>(status, statusText, text);
  }
  return {
    baseUrl: root,
    get: (path) => send('GET', path),
    post: (path, body) => send('POST', path, JSON.stringify(body), { 'content-type': 'application/json' }),
    upload: (shotId, files) => upload(`/api/shots/${shotId}/captures`, files),
  };
}

/** The request failed on its way (no connection, reset, timed out); a file that cannot be read is not this. */
class NetworkError extends Error {}

/** Bytes read from a file and written to the request at a time. */
const UPLOAD_READ_BYTES = 1 << 20;

/** A file name as a multipart header carries it: UTF-8, with CR, LF and `"` escaped as browsers and Node's FormData do. */
const quotedName = (name: string) => name.replace(/\r/g, '%0D').replace(/\n/g, '%0A').replace(/"/g, '%22');

/**
 * The files as one multipart/form-data body (field "files", as the web page sends them), streamed from disk in
 * 1 MiB reads through node:http. Measured on a 330 MB capture sent to a server that discards it (two cores, Node 20),
 * fetch with a FormData of the file (read whole with readFile, as this client did before) took 1.4 CPU-seconds and
 * 1.4 GB of memory, this 0.25 CPU-seconds and under 0.1 GB: the client shares the lab PC with the scope software.
 */
async function sendMultipart(url: URL, files: UploadFile[], headers: Record<string, string>, timeoutMs: number): Promise<{ status: number; statusText: string; text: string }> {
  const boundary = `----gatepost-${randomBytes(12).toString('hex')}`;
  const handles: { file: UploadFile; fh: FileHandle; size: number; mtimeMs: number; head: Buffer }[] = [];
  try {
    for (const file of files) {
      const fh = await open(file.path, 'r');
      const { size, mtimeMs } = await fh.stat();
      const head = Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="files"; filename="${quotedName(file.name)}"\r\nContent-Type: application/octet-stream\r\n\r\n`);
      handles.push({ file, fh, size, mtimeMs, head });
    }
    const tail = Buffer.from(`--${boundary}--\r\n`);
    const length = handles.reduce((sum, h) => sum + h.head.length + h.size + 2, tail.length);
    const request = (url.protocol === 'https:' ? httpsRequest : httpRequest)(url, {
      method: 'POST',
      headers: { ...headers, 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': String(length) },
      signal: AbortSignal.timeout(timeoutMs),
    });
    const response = new Promise<IncomingMessage>((resolve, reject) => {
      request.on('response', resolve);
      request.on('error', (err) => reject(new NetworkError(err.message, { cause: err })));
    });
    // A refusal the server sends before reading the whole body (a 401, 413) is still read below.
    response.catch(() => {});
    // Set once the server has answered: it may do so before taking the whole body (a refused token, a full disk),
    // and then stops reading it; nothing more is sent.
    let answered = false;
    let wake: (() => void) | null = null;
    void response.then(() => { answered = true; wake?.(); }, () => {});
    const write = (bytes: Uint8Array) => new Promise<void>((resolve, reject) => {
      if (request.destroyed) return reject(new NetworkError('the connection closed while sending'));
      if (request.write(bytes) || answered) return resolve();
      const done = (err?: Error) => {
        wake = null;
        request.off('drain', drained);
        request.off('close', closed);
        if (err) reject(err);
        else resolve();
      };
      const drained = () => done();
      const closed = () => done(answered ? undefined : new NetworkError('the connection closed while sending'));
      wake = drained;
      request.once('drain', drained);
      request.once('close', closed);
    });
    try {
      for (const h of handles) {
        await write(h.head);
        let at = 0;
        while (at < h.size && !answered) {
          // A fresh buffer per read: request.write keeps a reference until the bytes are on the socket.
          const buffer = Buffer.allocUnsafe(Math.min(UPLOAD_READ_BYTES, h.size - at));
          const { bytesRead } = await h.fh.read(buffer, 0, buffer.length, at);
          if (bytesRead === 0) break;
          await write(bytesRead === buffer.length ? buffer : buffer.subarray(0, bytesRead));
          at += bytesRead;
        }
        if (answered) break;
        const now = await h.fh.stat();
        if (at !== h.size || now.size !== h.size || now.mtimeMs !== h.mtimeMs) {
          // Never send the closing boundary: the server sees a cut-off body and stores nothing of this upload.
          request.destroy();
          throw new TransientError(`${h.file.name} changed while it was being sent; it is sent again once it is stable`);
        }
        await write(Buffer.from('\r\n'));
      }
      if (!answered) request.end(tail);
    } catch (err) {
      if (!(err instanceof NetworkError)) {
        request.destroy();
        throw err;
      }
      // The server may have answered and closed the connection before taking the whole body (a refused token): then
      // its answer is the reason; else the request's own error (refused, reset, timed out) says why.
      const early = await Promise.race([response.catch(() => null), new Promise<null>((resolve) => setTimeout(() => resolve(null), 1000))]);
      if (early === null) {
        request.destroy();
        throw await response.then(() => err, (reason: unknown) => reason);
      }
    }
    const res = await response;
    const chunks: Buffer[] = [];
    try {
      for await (const chunk of res) chunks.push(chunk as Buffer);
    } catch (err) {
      throw new NetworkError((err as Error).message, { cause: err });
    }
    return { status: res.statusCode ?? 0, statusText: res.statusMessage ?? '', text: Buffer.concat(chunks).toString('utf8') };
  } finally {
    await Promise.allSettled(handles.map((h) => h.fh.close()));
  }
}

export interface RetryOptions {
  /** First wait, ms; doubled after each failure. @default 500 */
  initialDelayMs?: number;
  /** Longest wait, ms. @default 30000 */
  maxDelayMs?: number;
  /** Called before each wait with the reason and the wait. */
  onRetry?: (reason: string, delayMs: number, attempt: number) => void;
  /** Stops the waiting (the watch is shutting down): the last TransientError is thrown. */
  signal?: AbortSignal;
}

/** Runs `task` until it succeeds or fails for good, waiting with exponential backoff after each TransientError. */
export async function withRetry<T>(task: () => Promise<T>, options: RetryOptions = {}): Promise<T> {
  const { initialDelayMs = 500, maxDelayMs = 30_000, onRetry, signal } = options;
  let delay = initialDelayMs;
  for (let attempt = 1; ; attempt++) {
    try {
      return await task();
    } catch (err) {
      if (!(err instanceof TransientError) || signal?.aborted) throw err;
      onRetry?.(err.message, delay, attempt);
      await new Promise<void>((resolve) => {
        const timer = setTimeout(resolve, delay);
        signal?.addEventListener('abort', () => { clearTimeout(timer); resolve(); }, { once: true });
      });
      if (signal?.aborted) throw err;
      delay = Math.min(maxDelayMs, delay * 2);
    }
  }
}
