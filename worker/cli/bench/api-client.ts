/**
 * The bench uploader's only way to the server: the public HTTP API with a personal token (Bearer gpt_…).
 * Failures that may pass (the server not reachable, 5xx, 429) are TransientError and retried by `withRetry` with
 * backoff; everything else (a refused token, bad input) is ApiError and stops the one operation that met it.
 */
import { readFile } from 'node:fs/promises';

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
  /** POST /api/shots/:shotId/captures with the files' bytes, read from disk at the moment of sending. */
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
    const text = await response.text();
    let json: unknown;
    try {
      json = text ? JSON.parse(text) : {};
    } catch {
      json = undefined;
    }
    if (response.ok && json !== undefined) return json as T;
    const message = (json as { error?: { message?: string } } | undefined)?.error?.message ?? `HTTP ${response.status} ${response.statusText}`;
    if (response.status >= 500 || response.status === 429 || response.status === 408 || json === undefined) {
      throw new TransientError(`the server answered ${response.status}: ${message}`);
    }
    throw new ApiError(response.status, message);
  }
  return {
    baseUrl: root,
    get: (path) => send('GET', path),
    post: (path, body) => send('POST', path, JSON.stringify(body), { 'content-type': 'application/json' }),
    async upload(shotId, files) {
      const form = new FormData();
      for (const f of files) form.append('files', new Blob([await readFile(f.path)]), f.name);
      return send('POST', `/api/shots/${shotId}/captures`, form);
    },
  };
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
