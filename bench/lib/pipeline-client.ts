/**
 * A small HTTP client of the upload-to-result pipeline, shared by the pipeline API tests (tests/api/pipeline*.test.ts)
 * and the benchmarks (bench/pipeline.ts, bench/api.ts): sign in, send JSON, upload files, poll until the work is
 * done; and a simulated capture with its truth. It speaks only HTTP to a running API server, as a lab script would.
 */
import { writeCaptureLayout, type WrittenCapture } from '../../fixtures/lib/write-capture-layout.ts';
import { simulateShot, type SimulateShotOptions, type SimulatedShot } from '../../shared/simulate/simulate-shot.ts';

export interface JsonResponse<T = Record<string, unknown>> {
  status: number;
  body: T;
  headers: Headers;
}

/** One signed-in user against one API server. */
export interface PipelineClient {
  baseUrl: string;
  /** `gp_session=…`, ready to send as a Cookie header (autocannon, supertest). */
  cookie: string;
  get<T = Record<string, unknown>>(path: string): Promise<JsonResponse<T>>;
  post<T = Record<string, unknown>>(path: string, body: unknown, headers?: Record<string, string>): Promise<JsonResponse<T>>;
  /** POST multipart to /api/shots/:shotId/captures, field "files". */
  upload<T = Record<string, unknown>>(shotId: string, files: { name: string; bytes: Uint8Array }[]): Promise<JsonResponse<T>>;
  /** POST one file as the whole request body to /api/shots/:shotId/captures?fileName=… (text/csv). */
  uploadBody<T = Record<string, unknown>>(shotId: string, file: { name: string; bytes: Uint8Array }): Promise<JsonResponse<T>>;
}

export interface SignInOptions {
  /**
   * Abort one request after this long (a hung server fails the caller instead of hanging it).
   * @default 60000
   */
  timeoutMs?: number;
}

async function asJson<T>(response: Response): Promise<JsonResponse<T>> {
  const text = await response.text();
  let body: unknown;
  try {
    body = text.length > 0 ? JSON.parse(text) : {};
  } catch {
    body = { nonJson: text.slice(0, 500) };
  }
  return { status: response.status, body: body as T, headers: response.headers };
}

/** Signs in with POST /api/auth/login and returns a client carrying the session cookie. */
export async function signIn(baseUrl: string, email: string, password: string, options: SignInOptions = {}): Promise<PipelineClient> {
  const { timeoutMs = 60_000 } = options;
  const login = await fetch(`${baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password }),
    signal: AbortSignal.timeout(timeoutMs),
  });
  const setCookie = login.headers.getSetCookie().find((c) => c.startsWith('gp_session='));
  if (login.status !== 200 || !setCookie) throw new Error(`sign-in of ${email} failed: HTTP ${login.status} ${await login.text()}`);
  const cookie = setCookie.split(';')[0];
  const send = async <T>(method: string, path: string, body?: BodyInit, headers: Record<string, string> = {}) =>
    asJson<T>(await fetch(`${baseUrl}${path}`, { method, headers: { cookie, ...headers }, body, signal: AbortSignal.timeout(timeoutMs) }));
  return {
    baseUrl,
    cookie,
    get: (path) => send('GET', path),
    post: (path, body, headers = {}) => send('POST', path, JSON.stringify(body), { 'content-type': 'application/json', ...headers }),
    upload: (shotId, files) => {
      const form = new FormData();
      for (const f of files) form.append('files', new Blob([f.bytes as Uint8Array<ArrayBuffer>], { type: 'text/csv' }), f.name);
      return send('POST', `/api/shots/${shotId}/captures`, form);
    },
    uploadBody: (shotId, file) =>
      send('POST', `/api/shots/${shotId}/captures?fileName=${encodeURIComponent(file.name)}`, file.bytes as Uint8Array<ArrayBuffer>, { 'content-type': 'text/csv' }),
  };
}

export interface PollOptions {
  /** Give up after this long. @default 30000 */
  timeoutMs?: number;
  /** Pause between two looks. @default 50 */
  intervalMs?: number;
  /** Named in the error when time runs out. @default "condition" */
  what?: string;
}

/** Calls `look` until it returns something other than undefined; throws naming `what` (and the last value) on timeout. */
export async function pollUntil<T>(look: () => Promise<T | undefined>, options: PollOptions = {}): Promise<T> {
  const { timeoutMs = 30_000, intervalMs = 50, what = 'condition' } = options;
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await look();
    if (value !== undefined) return value;
    if (Date.now() > deadline) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
    await new Promise((resolve) => setTimeout(resolve, intervalMs));
  }
}

export interface SimulatedCsvOptions extends SimulateShotOptions {
  /** Names of the channels as written in the header. @default "Gate A", "Gate B", … */
  names?: string[];
}

/** A simulated shot written as a plain time-column CSV, with the simulation's truth beside the bytes. */
export interface SimulatedCsv {
  bytes: Uint8Array;
  shot: SimulatedShot;
  written: WrittenCapture['truth'];
}

/**
 * Simulates a shot (shared/simulate/simulate-shot.ts) and writes it in the fixture generator's plain-time layout.
 * Defaults: the demo lab's three-gate exit rig (0, 0.15, 0.3 m) and its 40 mm ball at 300 m/s, 0.2 µs sampling.
 */
export function simulatedCsv(options: SimulatedCsvOptions = {}): SimulatedCsv {
  const gatePositions = options.gatePositions ?? [0, 0.15, 0.3];
  const names = options.names ?? gatePositions.map((_, i) => `Gate ${String.fromCharCode(65 + i)}`);
  const shot = simulateShot({
    speed: 300, diameter: 0.04, sampleInterval: 2e-7, length: 8000, t0: -1e-4, arrivalTime: 1e-4, noiseRms: 0.01, responseTime: 1e-6, seed: 5,
    ...options, gatePositions, channelNames: names,
  });
  const written = writeCaptureLayout('plain-time', { t0: shot.time.t0, dt: shot.time.dt, channels: shot.channels });
  return { bytes: written.bytes, shot, written: written.truth };
}
