// GET /api/captures/:captureId/window through a local app that mounts only the capture routes (the lead adds them
// to allRoutes together with their authorization-matrix row). Captures are written directly: channel files into
// the harness's LocalDiskStore and a Capture row in state 'ready'. Every answer is checked against brute force over
// the known generated arrays, rounded to Float32 exactly as stored (Math.fround).
import { createHash, randomUUID } from 'node:crypto';
import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ImportedCapture } from '../../shared/contracts/capture.ts';
import { Campaign, Capture, Shot } from '../../server/db/models/index.ts';
import { createAuthenticate } from '../../server/lib/authenticate.ts';
import { createErrorHandler } from '../../server/lib/error-handler.ts';
import { mountRoutes } from '../../server/lib/routes.ts';
import { captureRoutes } from '../../server/modules/captures/routes.ts';
import { writeChannelFiles } from '../../server/traces/write-channel-files.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';

let h: ApiHarness;
let demo: DemoWorld;
let app: Express;

/** buildApp's API pipeline (cookies, authentication, route guard, error handler) around the capture routes only. */
function appWithCaptureRoutes(): Express {
  const a = express();
  a.use(cookieParser());
  a.use('/api', createAuthenticate({ jwtSecret: h.config.jwtSecret, redis: h.redis }));
  const router = express.Router();
  mountRoutes(router, captureRoutes(h.deps));
  a.use(router);
  a.use(createErrorHandler(h.deps.logger));
  return a;
}

// A uniform capture: 300 001 samples at 10 MS/s from t0 = −1 ms; CH1 is a gate pulse with noise and two
// one-sample spikes and a 5000-sample NaN gap (whole pyramid blocks), CH2 a sine.
const N = 300_001;
const T0 = -1e-3;
const DT = 1e-7;
function makeUniform(): ImportedCapture {
  const a = new Float64Array(N);
  const b = new Float64Array(N);
  let s = 12345;
  for (let i = 0; i < N; i++) {
    s = (s * 48271) % 2147483647;
    const noise = (s / 2147483647 - 0.5) * 0.02;
    a[i] = (i > 100_000 && i < 140_000 ? 0.2 : 4.8) + noise;
    b[i] = Math.sin((2 * Math.PI * i) / 7919);
  }
  a[77_777] = 9.5;
  a[210_000] = -3.25;
  a.fill(NaN, 160_000, 165_000);
  return {
    channels: [
      { name: 'Gate A', unit: 'V', sourceUnit: 'mV', values: a, invalidCount: 5000 },
      { name: 'CH2', unit: 'V', sourceUnit: 'V', values: b, invalidCount: 0 },
    ],
    time: { kind: 'uniform', t0: T0, dt: DT, jitter: 0 },
    length: N,
    metadata: {},
    layout: {},
    warnings: [],
  };
}

// An explicit (uneven) time base: 5000 samples with steps of 1, 2 or 3 µs.
function makeExplicit(): ImportedCapture {
  const n = 5000;
  const t = new Float64Array(n);
  const v = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    t[i] = (i === 0 ? 0 : t[i - 1]) + (1 + (i % 3)) * 1e-6;
    v[i] = i % 250 === 0 ? NaN : Math.cos(i / 40);
  }
  return {
    channels: [{ name: 'CH1', unit: 'V', sourceUnit: 'V', values: v, invalidCount: 20 }],
    time: { kind: 'explicit', t },
    length: n,
    metadata: {},
    layout: {},
    warnings: [],
  };
}

async function storeCapture(labId: string, shotId: string, imported: ImportedCapture, state: 'ready' | 'reading' | 'failed' = 'ready') {
  const id = randomUUID();
  const channels = state === 'ready' ? await writeChannelFiles(h.deps.blobStore, labId, id, imported) : null;
  await Capture.create({
    id, labId, shotId, fileName: `shot-${id.slice(0, 8)}.csv`, sizeBytes: 1234, sha256: createHash('sha256').update(id).digest('hex'),
    storageKey: `labs/${labId}/raw/${id}`, state, error: state === 'failed' ? 'line 12: no numeric data after the header' : null,
    channels, sampleCount: imported.length, uploadedBy: null,
  });
  return id;
}

let uniformId: string;
let explicitId: string;
let uniform: ImportedCapture;
let explicit: ImportedCapture;
let asAnalyst: string;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
  app = appWithCaptureRoutes();
  uniform = makeUniform();
  explicit = makeExplicit();
  uniformId = await storeCapture(demo.labs.hollowmere.id, demo.hollowmere.shotIds[0], uniform);
  explicitId = await storeCapture(demo.labs.hollowmere.id, demo.hollowmere.shotIds[0], explicit);
  asAnalyst = h.sessionCookie(demo.users.analyst.id);
});
afterAll(() => h?.close());

function getWindow(id: string, query: Record<string, string | number>, cookie = asAnalyst) {
  return request(app).get(`/api/captures/${id}/window`).query(query).set('Cookie', cookie);
}

/** Brute-force min/max of the stored (Float32) samples [start, end), null when none is valid. */
function bruteColumn(values: ArrayLike<number>, start: number, end: number): [number | null, number | null] {
  let lo: number | null = null;
  let hi: number | null = null;
  for (let i = Math.max(0, start); i < Math.min(values.length, end); i++) {
    const v = Math.fround(values[i]);
    if (Number.isNaN(v)) continue;
    if (lo === null || v < lo) lo = v;
    if (hi === null || v > hi) hi = v;
  }
  return [lo, hi];
}

function insideUniform(from: number, to: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < N; i++) {
    const t = T0 + i * DT;
    if (t >= from && t <= to) out.push(i);
  }
  return out;
}

/** Checks a columns answer: every column equals brute force over the samples it covers; the window is covered. */
function expectColumns(body: { t0: number; dt: number; min: (number | null)[]; max: (number | null)[] }, values: ArrayLike<number>, from: number, to: number, points: number) {
  const start = Math.round((body.t0 - T0) / DT);
  const per = Math.round(body.dt / DT);
  expect(body.t0).toBeCloseTo(T0 + start * DT, 15);
  expect(body.dt).toBeCloseTo(per * DT, 15);
  expect(body.min.length).toBe(body.max.length);
  expect(body.min.length).toBeLessThanOrEqual(points);
  const inside = insideUniform(from, to);
  expect(start).toBeLessThanOrEqual(inside[0]);
  expect(start + body.min.length * per).toBeGreaterThan(inside.at(-1)!);
  for (let j = 0; j < body.min.length; j++) {
    const [lo, hi] = bruteColumn(values, start + j * per, start + (j + 1) * per);
    expect([body.min[j], body.max[j]]).toEqual([lo, hi]);
  }
}

describe('GET /api/captures/:captureId/window', () => {
  it('When no window is given, then the whole record comes back as at most 1000 min/max columns that match brute force, spikes and gap included', async () => {
    // Act
    const res = await getWindow(uniformId, { channel: 'Gate A' });
    // Assert
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ raw: false, channel: { index: 0, name: 'Gate A', unit: 'V', sourceUnit: 'mV' }, from: T0, points: 1000 });
    expect(res.body.to).toBeCloseTo(T0 + (N - 1) * DT, 15);
    expectColumns(res.body, uniform.channels[0].values, res.body.from, res.body.to, 1000);
    // The one-sample spikes survive decimation, and the NaN gap shows as null columns.
    expect(Math.max(...res.body.max.filter((x: number | null) => x !== null))).toBe(Math.fround(9.5));
    expect(Math.min(...res.body.min.filter((x: number | null) => x !== null))).toBe(Math.fround(-3.25));
    expect(res.body.min).toContain(null);
  });

  it('When windows are zoomed and panned at random, then each answer matches brute force, by index or by name', async () => {
    let s = 99;
    const rand = () => (s = (s * 48271) % 2147483647) / 2147483647;
    const kinds = { raw: 0, columns: 0 };
    for (let k = 0; k < 12; k++) {
      // Zoom spans 1e-6 … 1 of the record (log-uniform), anywhere in it, sometimes hanging over an edge.
      const span = (N * DT) * 10 ** (-6 * rand());
      const from = T0 - 0.1 * span + rand() * (N * DT);
      const to = from + span;
      const points = 10 + Math.floor(rand() * 2000);
      const channel = k % 2;
      const res = await getWindow(uniformId, { channel: k % 4 === 1 ? 'ch2' : String(channel), from, to, points });
      expect(res.status).toBe(200);
      const values = uniform.channels[channel].values;
      const inside = insideUniform(from, to);
      if (inside.length <= points) {
        kinds.raw++;
        expect(res.body.raw).toBe(true);
        expect(res.body.t).toEqual(inside.map((i) => T0 + i * DT));
        expect(res.body.v).toEqual(inside.map((i) => (Number.isNaN(values[i]) ? null : Math.fround(values[i]))));
      } else {
        kinds.columns++;
        expect(res.body.raw).toBe(false);
        expectColumns(res.body, values, from, to, points);
      }
    }
    // The fixed seed gives both kinds of answer.
    expect(kinds.raw).toBeGreaterThanOrEqual(3);
    expect(kinds.columns).toBeGreaterThanOrEqual(3);
  });

  it('When the window holds at most `points` samples, then the raw samples come back with their times; a window between two samples is empty', async () => {
    // Samples 1000..1099 exactly: t = T0 + i·DT.
    const from = T0 + 1000 * DT;
    const to = T0 + 1099 * DT;
    const res = await getWindow(uniformId, { channel: 1, from, to, points: 100 });
    expect(res.status).toBe(200);
    expect(res.body.raw).toBe(true);
    expect(res.body.t).toHaveLength(100);
    expect(res.body.v).toEqual(Array.from({ length: 100 }, (_, k) => Math.fround(Math.sin((2 * Math.PI * (1000 + k)) / 7919))));
    const between = await getWindow(uniformId, { from: T0 + 10.2 * DT, to: T0 + 10.8 * DT });
    expect(between.body).toMatchObject({ raw: true, t: [], v: [] });
    const before = await getWindow(uniformId, { from: -5, to: -4 });
    expect(before.body).toMatchObject({ raw: true, t: [], v: [] });
  });

  it('When the time base is explicit, then windows are found by binary search: raw when small, per-time-column min/max when large', async () => {
    const { t } = explicit.time as { kind: 'explicit'; t: Float64Array };
    const values = explicit.channels[0].values;
    // Small: 40 samples.
    const small = await getWindow(explicitId, { from: t[1000], to: t[1039], points: 50 });
    expect(small.body.raw).toBe(true);
    expect(small.body.t).toEqual(Array.from(t.subarray(1000, 1040)));
    expect(small.body.v).toEqual(Array.from(values.subarray(1000, 1040), (x) => (Number.isNaN(x) ? null : Math.fround(x))));
    // Large: the whole record in 100 time columns.
    const big = await getWindow(explicitId, { points: 100 });
    expect(big.body).toMatchObject({ raw: false, t0: t[0] });
    expect(big.body.dt).toBeCloseTo((t[4999] - t[0]) / 100, 15);
    for (let j = 0; j < 100; j++) {
      const members: number[] = [];
      for (let i = 0; i < t.length; i++) {
        const col = Math.min(99, Math.floor((t[i] - t[0]) / big.body.dt));
        if (col === j && !Number.isNaN(values[i])) members.push(Math.fround(values[i]));
      }
      expect([big.body.min[j], big.body.max[j]]).toEqual(members.length ? [Math.min(...members), Math.max(...members)] : [null, null]);
    }
  });

  it('When another lab asks, or nobody is signed in, then 404 and 401; every Hollowmere role may read', async () => {
    const sandgate = await getWindow(uniformId, {}, h.sessionCookie(demo.users.otherLabAdmin.id));
    expect(sandgate.status).toBe(404);
    const missing = await getWindow(randomUUID(), {});
    expect(missing.status).toBe(404);
    expect(sandgate.body).toEqual(missing.body);
    const anonymous = await request(app).get(`/api/captures/${uniformId}/window`);
    expect(anonymous.status).toBe(401);
    for (const role of ['admin', 'experimenter', 'analyst', 'reviewer'] as const) {
      expect((await getWindow(uniformId, { points: 10 }, h.sessionCookie(demo.users[role].id))).status).toBe(200);
    }
    // And the other way round: a Sandgate capture is closed to Hollowmere.
    const sandgateLab = demo.labs.sandgate.id;
    const campaign = await Campaign.create({ labId: sandgateLab, name: 'Sandgate window test', startedOn: null, createdBy: null });
    const shot = await Shot.create({
      labId: sandgateLab, campaignId: campaign.id, number: 1, firedAt: null, projectileId: null, gateRigId: null,
      tubePressurePa: null, ambientTemperatureK: null, ambientPressurePa: null, createdBy: null,
    });
    const theirs = await storeCapture(sandgateLab, shot.id, explicit);
    expect((await getWindow(theirs, {}, h.sessionCookie(demo.users.admin.id))).status).toBe(404);
    expect((await getWindow(theirs, {}, h.sessionCookie(demo.users.otherLabAdmin.id))).status).toBe(200);
  });

  it('When the capture is not read yet or failed, then 409 says why', async () => {
    const reading = await storeCapture(demo.labs.hollowmere.id, demo.hollowmere.shotIds[0], explicit, 'reading');
    const res = await getWindow(reading, {});
    expect(res.status).toBe(409);
    expect(res.body.error.message).toBe('This capture is still being read (state: reading); its traces are available once it is ready.');
    const failed = await storeCapture(demo.labs.hollowmere.id, demo.hollowmere.shotIds[0], explicit, 'failed');
    const bad = await getWindow(failed, {});
    expect(bad.status).toBe(409);
    expect(bad.body.error.message).toBe('This capture could not be read, so it has no traces: line 12: no numeric data after the header');
  });

  it('When the query is wrong, then 400 names the field and the fix', async () => {
    const cases: [Record<string, string | number>, RegExp][] = [
      [{ points: 5 }, /points: .*10/],
      [{ points: 20_000 }, /points: .*10000/],
      [{ points: 'many' }, /points:/],
      [{ from: 'soon' }, /from: must be a number of seconds, e\.g\. 0\.0015 or 1\.5e-3/],
      [{ from: 0.01, to: 0.001 }, /from: must not be later than to/],
      [{ channel: 'Gate Z' }, /channel: this capture has no channel "Gate Z"; it has 0 \(Gate A\), 1 \(CH2\)\./],
      [{ channel: 7 }, /no channel "7"/],
    ];
    for (const [query, message] of cases) {
      const res = await getWindow(uniformId, query);
      expect(res.status, JSON.stringify(query)).toBe(400);
      expect(res.body.error.message).toMatch(message);
    }
  });
});

describe('GET /api/captures/:captureId/samples', () => {
  it('When the raw samples are read, then they are not kept in the browser cache after sign-out (no-store, issue 12 item 13)', async () => {
    const res = await request(app).get(`/api/captures/${explicitId}/samples`).query({ channel: 'CH1' }).set('Cookie', asAnalyst);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.headers['cache-control']).toBe('no-store');
  });
});

// Issue 12 review, gap b: captures stored before the importer bounded values (±9.9e37) and times (±1e12 s). Neither
// NaN nor ±Infinity may reach the browser: JSON cannot carry them (they would arrive as null, silently).
describe('captures stored before the import bounds', () => {
  /** A uniform two-channel capture of `n` samples with the given time base and values. */
  function stored(n: number, t0: number, dt: number, value: (i: number) => number): ImportedCapture {
    return {
      channels: [{ name: 'CH1', unit: 'V', sourceUnit: 'V', values: Float64Array.from({ length: n }, (_, i) => value(i)), invalidCount: 0 }],
      time: { kind: 'uniform', t0, dt, jitter: 0 },
      length: n, metadata: {}, layout: {}, warnings: [],
    };
  }
  /** Every number in a JSON text (after JSON.parse) is finite, and the text names neither NaN nor Infinity. */
  const expectFiniteJson = (text: string) => {
    expect(text).not.toMatch(/NaN|Infinity/);
    const walk = (v: unknown): void => {
      if (typeof v === 'number') expect(Number.isFinite(v)).toBe(true);
      else if (v && typeof v === 'object') Object.values(v).forEach(walk);
    };
    walk(JSON.parse(text));
  };

  it('When the time base overflows (t0 + (n − 1)·dt = Infinity), then window and samples answer 409 naming the time base, not 500 or null times', async () => {
    const id = await storeCapture(demo.labs.hollowmere.id, demo.hollowmere.shotIds[0], stored(1000, 0, 1e306, (i) => i % 2));
    const window = await getWindow(id, {});
    expect(window.status, window.text).toBe(409);
    expect(window.body.error.message).toBe(
      'The stored time base of this capture does not fit in a number (t0 = 0 s, dt = 1e+306 s over 1000 samples: it ends at Infinity s), so its traces cannot be sent. ' +
      'It was stored before the importer checked times (±1e12 s from the trigger); upload the file again, or correct its time column.',
    );
    const samples = await request(app).get(`/api/captures/${id}/samples`).query({ channel: '0' }).set('Cookie', asAnalyst);
    expect(samples.status).toBe(409);
    expect(samples.body.error.message).toBe(window.body.error.message);
  });

  it('When samples were ±1e308 (±Infinity once stored as Float32), then columns and raw samples send null for them and finite JSON throughout', async () => {
    // 4000 samples: columns at 100 points, raw at full zoom; every 7th sample huge, the rest a ramp.
    const value = (i: number) => (i % 7 === 3 ? (i % 2 ? 1e308 : -1e308) : i / 1000);
    const id = await storeCapture(demo.labs.hollowmere.id, demo.hollowmere.shotIds[0], stored(4000, 0, 1e-6, value));
    const columns = await getWindow(id, { points: 100 });
    expect(columns.status, columns.text).toBe(200);
    expect(columns.body.raw).toBe(false);
    expectFiniteJson(columns.text);
    const raw = await getWindow(id, { from: 0, to: 20e-6, points: 100 });
    expect(raw.body.raw).toBe(true);
    expectFiniteJson(raw.text);
    // Each sample is its own value, or null where it was out of range: the ramp stays where it was.
    raw.body.v.forEach((v: number | null, i: number) => expect(v).toBe(i % 7 === 3 ? null : Math.fround(i / 1000)));
  });
});
