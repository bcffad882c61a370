// The warm-up of a processor thread (worker/processors/warm-thread.ts) runs a job's statements and code before the
// first job: it must leave the database and the lab's storage exactly as they were. Run here in the test process,
// with the worker's own context on the seeded test database.
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';

let h: ApiHarness;
let dataDir: string;

beforeAll(async () => {
  h = await createApiHarness();
  await h.resetDatabase();
  await h.close();
  dataDir = mkdtempSync(path.join(tmpdir(), 'gatepost-warm-test-'));
  // The worker context reads its configuration from the environment, as in a processor thread.
  process.env.GATEPOST_DATABASE_URL = process.env.GATEPOST_TEST_DATABASE_URL;
  process.env.GATEPOST_REDIS_URL = process.env.GATEPOST_TEST_REDIS_URL;
  process.env.GATEPOST_DATA_DIR = dataDir;
  process.env.GATEPOST_LOG_LEVEL = 'silent';
}, 60_000);

afterAll(async () => {
  const { closeWorkerContext } = await import('../../worker/context.ts');
  await closeWorkerContext();
  if (dataDir) rmSync(dataDir, { recursive: true, force: true });
});

describe('Warming a processor thread before its first job', () => {
  it('runs the jobs\' statements without error, and leaves every row, every count and the storage as they were', async () => {
    const { workerContext } = await import('../../worker/context.ts');
    const { warmDatabase, warmThread } = await import('../../worker/processors/warm-thread.ts');
    const { sequelize } = workerContext();
    // Each table a job writes: its row count and a digest of every row's every column.
    const tables = ['shots', 'captures', 'analyses', 'audit_events'];
    const snapshot = () => sequelize.query<{ t: string; n: string; digest: string | null }>(
      tables.map((t) => `select '${t}' as t, count(*)::text as n, md5(string_agg(r::text, ',' order by r::text)) as digest from ${t} r`).join(' union all '),
      { type: QueryTypes.SELECT },
    );
    const before = await snapshot();
    expect(before.find((r) => r.t === 'shots')!.n).not.toBe('0');

    // The statements themselves must run (a failure here would only be swallowed by warmThread).
    await expect(warmDatabase('ingest')).resolves.toBeUndefined();
    await expect(warmDatabase('analysis')).resolves.toBeUndefined();
    await warmThread('ingest');
    await warmThread('analysis');

    expect(await snapshot()).toEqual(before);
    // Nothing in the lab's storage: the warm-up writes channel files into a folder of its own, then removes it.
    expect(readdirSync(dataDir)).toEqual([]);
  }, 60_000);
});
