import { mkdtempSync, rmSync, truncateSync, unlinkSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { analyzeShot } from '../../../shared/analysis/analyze-shot.ts';
import type { AnalysisOptionsInput } from '../../../shared/contracts/analysis.ts';
import type { ImportedCapture } from '../../../shared/contracts/capture.ts';
import { combineCaptures } from '../../../shared/import/combine-captures.ts';
import { LocalDiskStore } from '../../../server/storage/local-disk-store.ts';
import { readStoredChannels } from '../../../server/traces/read-stored-channels.ts';
import { writeChannelFiles } from '../../../server/traces/write-channel-files.ts';
import { readCaptureFile } from '../../../worker/import/read-capture-file.ts';
import { CAPTURES_DIR, readManifest } from '../import/fixture-manifest.ts';

// The analysis job reads the channel files the ingest job wrote instead of importing the raw file again: both
// paths must hand the engine the same numbers, so every result is the same to the last bit.
const root = mkdtempSync(join(tmpdir(), 'gatepost-stored-channels-'));
const store = new LocalDiskStore(root);
afterAll(() => rmSync(root, { recursive: true, force: true }));

let nextId = 0;
/** What the ingest job does (write the files, keep the descriptor, layout and warnings on the row), then the read back. */
async function storeAndReadBack(capture: ImportedCapture): Promise<ImportedCapture> {
  const files = await writeChannelFiles(store, 'lab-1', `capture-${++nextId}`, capture);
  const row = JSON.parse(JSON.stringify({ channels: files, layout: capture.layout, warnings: capture.warnings }));
  const back = await readStoredChannels(store, row);
  if (back === null) throw new Error('the freshly written files were not readable as full-precision channels');
  return back;
}

/** Same bits, NaN included (toEqual on typed arrays would also pass for +0 against −0). */
function expectSameBits(a: ArrayLike<number>, b: ArrayLike<number>) {
  expect(a.length).toBe(b.length);
  const bytes = (x: ArrayLike<number>) => Buffer.from(new Float64Array(Array.from(x)).buffer);
  expect(bytes(a).equals(bytes(b))).toBe(true);
}

function expectSameCapture(stored: ImportedCapture, imported: ImportedCapture) {
  expect(stored.length).toBe(imported.length);
  expect(stored.channels.map(({ name, unit, sourceUnit, invalidCount }) => ({ name, unit, sourceUnit, invalidCount })))
    .toEqual(imported.channels.map(({ name, unit, sourceUnit, invalidCount }) => ({ name, unit, sourceUnit, invalidCount })));
  stored.channels.forEach((c, k) => {
    expect(c.values.constructor).toBe(imported.channels[k].values.constructor);
    expectSameBits(c.values, imported.channels[k].values);
  });
  if (imported.time.kind === 'explicit') {
    expect(stored.time.kind).toBe('explicit');
    expectSameBits((stored.time as { t: Float64Array }).t, imported.time.t);
  } else {
    expect(stored.time).toEqual(imported.time);
  }
  expect(stored.timeOrigin).toEqual(imported.timeOrigin);
  expect(stored.valueKind).toEqual(imported.valueKind);
}

/** The engine's answer, or the message it refused with: both paths must agree on either. */
function outcome(capture: ImportedCapture, options: AnalysisOptionsInput): unknown {
  try {
    return JSON.parse(JSON.stringify(analyzeShot(capture, options)));
  } catch (error) {
    return { refused: (error as Error).message };
  }
}

const settings: [string, AnalysisOptionsInput][] = [
  ['gates 0.1 m apart', { spacing: 0.1 }],
  ['smoothed, with Monte Carlo', { spacing: 0.1, smoothing: { windowSize: 9, polynomial: 2 }, monteCarloDraws: 2000, seed: 7 }],
];

describe('readStoredChannels against the raw file read again', () => {
  for (const name of Object.keys(readManifest())) {
    it.each([['float64'], ['float32']] as const)(`When ${name} is stored at %s precision, then the channels read back and the analysis are identical`, async (precision) => {
      const imported = await readCaptureFile(join(CAPTURES_DIR, name), { precision });
      const stored = await storeAndReadBack(imported);
      expectSameCapture(stored, imported);
      for (const [, options] of settings) expect(outcome(stored, options)).toEqual(outcome(imported, options));
    });
  }

  it('When a shot was written one file per channel, then the combined stored captures analyse as the combined files do', async () => {
    const names = ['per-channel-gate-a.csv', 'per-channel-gate-b.csv'];
    const imported = await Promise.all(names.map((n) => readCaptureFile(join(CAPTURES_DIR, n))));
    const stored = await Promise.all(imported.map(storeAndReadBack));
    const options = { spacing: 0.1 };
    const fromFiles = outcome(combineCaptures(imported, { labels: names }), options);
    expect(outcome(combineCaptures(stored, { labels: names }), options)).toEqual(fromFiles);
    expect(fromFiles).toHaveProperty('speed');
  });

  it('When the row comes from before the full-precision values were kept, then there is nothing to read and the raw file is needed', async () => {
    const imported = await readCaptureFile(join(CAPTURES_DIR, 'plain-time.csv'));
    const files = await writeChannelFiles(store, 'lab-1', 'capture-old', imported);
    const old = { ...files, channels: files.channels.map(({ values: _values, ...c }) => c) };
    expect(await readStoredChannels(store, { channels: old, layout: {}, warnings: [] })).toBeNull();
    expect(await readStoredChannels(store, { channels: null, layout: null, warnings: [] })).toBeNull();
  });

  // Channel files of an upload the API read are synced just after the capture is marked read: a power cut in
  // between can leave one short or missing. The analysis must then read the raw file again, never short channels.
  it.each([['shorter than the row says', 'short'], ['missing', 'missing']] as const)(
    'When a channel file is %s, then there is nothing to read and the raw file is needed', async (_label, damage) => {
      const imported = await readCaptureFile(join(CAPTURES_DIR, 'plain-time.csv'));
      const files = await writeChannelFiles(store, 'lab-1', `capture-damaged-${damage}`, imported);
      const row = JSON.parse(JSON.stringify({ channels: files, layout: imported.layout, warnings: imported.warnings }));
      expect(await readStoredChannels(store, row)).not.toBeNull();
      const file = store.localPathOf(files.channels[files.channels.length - 1].values!.key);
      if (damage === 'short') truncateSync(file, 8);
      else unlinkSync(file);
      expect(await readStoredChannels(store, row)).toBeNull();
    });
});
