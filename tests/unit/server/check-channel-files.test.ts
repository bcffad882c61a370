// missingChannelFiles: what the held ingest job checks before it trusts a capture the API recorded as read.
import { mkdtempSync, rmSync, truncateSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { ImportedCapture } from '../../../shared/contracts/capture.ts';
import { LocalDiskStore } from '../../../server/storage/local-disk-store.ts';
import { missingChannelFiles } from '../../../server/traces/check-channel-files.ts';
import { writeChannelFiles } from '../../../server/traces/write-channel-files.ts';

const dir = mkdtempSync(path.join(tmpdir(), 'gatepost-check-files-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function capture(length: number, explicit: boolean): ImportedCapture {
  const values = (k: number) => Float64Array.from({ length }, (_, i) => Math.sin(i / 50 + k));
  const t = Float64Array.from({ length }, (_, i) => i * 1e-6 + (i % 3) * 1e-9);
  return {
    length,
    time: explicit ? { kind: 'explicit', t } : { kind: 'uniform', t0: 0, dt: 1e-6, jitter: 0 },
    channels: [0, 1].map((k) => ({ name: `CH${k + 1}`, unit: 'V', sourceUnit: 'V', values: values(k), invalidCount: 0 })),
    layout: {},
    warnings: [],
  } as unknown as ImportedCapture;
}

describe('missingChannelFiles', () => {
  const store = new LocalDiskStore(path.join(dir, 'blobs'));
  const onDisk = (key: string) => path.join(dir, 'blobs', ...key.split('/'));

  it('When every file of the descriptor is in place, then none is missing', async () => {
    const files = await writeChannelFiles(store, 'lab', 'whole', capture(20_000, true));
    expect(await missingChannelFiles(store, files)).toEqual([]);
  });

  it('When a level file is gone and a values file is cut short, then both are named, and nothing else', async () => {
    const files = await writeChannelFiles(store, 'lab', 'damaged', capture(20_000, false));
    const level = files.channels[1].levels[0].key;
    const values = files.channels[0].values!.key;
    await store.delete(level);
    truncateSync(onDisk(values), 20_000 * 8 - 1);
    expect((await missingChannelFiles(store, files)).sort()).toEqual([level, values].sort());
  });

  it('When the explicit time column is missing, then it is named', async () => {
    const files = await writeChannelFiles(store, 'lab', 'no-time', capture(5_000, true));
    if (files.time.kind !== 'explicit') throw new Error('expected an explicit time column');
    await store.delete(files.time.key);
    expect(await missingChannelFiles(store, files)).toEqual([files.time.key]);
  });
});
