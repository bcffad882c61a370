// The API's warm-up of its upload path (server/modules/shots/warm-upload.ts), run at start before the first upload:
// it must take its throwaway file through the real multipart parser and intake, and leave the database, the job
// queues, the lab's storage and the temporary folder exactly as they were.
import { existsSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { warmUploadPath } from '../../server/modules/shots/warm-upload.ts';
import { QUEUE_NAMES } from '../../shared/contracts/jobs.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';

let h: ApiHarness;

beforeAll(async () => {
  h = await createApiHarness({ config: { labStorageQuotaBytes: 10 * 1024 ** 3 } });
  await h.resetDatabase();
}, 60_000);

afterAll(async () => {
  await h?.close();
});

describe('Warming the API\'s upload path at start', () => {
  it('takes the warm-up file through the intake three times, and leaves every row, the queues and the storage as they were', async () => {
    const tables = ['shots', 'captures', 'analyses', 'audit_events'];
    const snapshot = () => h.sequelize.query<{ t: string; n: string; digest: string | null }>(
      tables.map((t) => `select '${t}' as t, count(*)::text as n, md5(string_agg(r::text, ',' order by r::text)) as digest from ${t} r`).join(' union all '),
      { type: QueryTypes.SELECT },
    );
    const redisKeys = async () => (await h.redis.keys(`bull:${QUEUE_NAMES.ingest}:*`)).sort();
    const before = await snapshot();
    const keysBefore = await redisKeys();
    const storage = () => (existsSync(h.config.dataDir) ? readdirSync(h.config.dataDir, { recursive: true }) : []);
    const storageBefore = storage();
    // Its throwaway folder (named after this process) is gone afterwards.
    const warmFolders = () => readdirSync(tmpdir()).filter((n) => n.startsWith(`gatepost-warm-upload-${process.pid}-`));

    // 3 rounds of a 3 MiB file: every byte reached the intake (multipart parsed, hashed, written).
    expect(await warmUploadPath(h.config, h.deps.queues)).toBe(3 * 3 * 1024 * 1024);

    expect(await snapshot()).toEqual(before);
    expect(await redisKeys()).toEqual(keysBefore);
    expect(storage()).toEqual(storageBefore);
    expect(warmFolders()).toEqual([]);
  }, 60_000);
});
