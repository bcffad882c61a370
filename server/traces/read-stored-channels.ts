import type { ImportedCapture, TimeBase } from '../../shared/contracts/capture.ts';
import type { BlobStore } from '../storage/blob-store.ts';
import { channelFilesSchema, float32FromBytes, float64FromBytes } from './channel-files.ts';

/** What the Capture row keeps beside its channel files and hands back with them. */
export interface StoredCaptureRow {
  channels: object | null;
  layout: object | null;
  warnings: string[];
}

/**
 * The capture as the importer returned it, rebuilt from the channel files writeChannelFiles stored (full-precision
 * values, the time base, names, units and invalid counts) without reading the raw file again. The channels and
 * time base are what the analysis reads, bit for bit; the file's metadata is not kept there (the raw file has it).
 * Null when the row's files predate the full-precision values, or when one is missing or shorter than the row says
 * (channel files are synced just after the capture is marked read; a power cut in between can leave them so): then
 * the raw file must be imported again.
 */
export async function readStoredChannels(store: BlobStore, row: StoredCaptureRow): Promise<ImportedCapture | null> {
  try {
    return await readChannelFiles(store, row);
  } catch (err) {
    if ((err as { code?: unknown }).code === 'blob_not_found' || err instanceof RangeError) return null;
    throw err;
  }
}

async function readChannelFiles(store: BlobStore, row: StoredCaptureRow): Promise<ImportedCapture | null> {
  const parsed = channelFilesSchema.safeParse(row.channels);
  if (!parsed.success) return null;
  const files = parsed.data;
  if (files.channels.some((c) => c.values === undefined)) return null;
  const { length } = files;
  let time: TimeBase;
  if (files.time.kind === 'uniform') {
    const { t0, dt, jitter } = files.time;
    time = { kind: 'uniform', t0, dt, jitter };
  } else {
    time = { kind: 'explicit', t: float64FromBytes(await store.readRange(files.time.key, 0, length * 8)) };
  }
  const channels = await Promise.all(files.channels.map(async (c) => {
    const { key, type } = c.values!;
    const bytes = await store.readRange(key, 0, length * (type === 'f64' ? 8 : 4));
    const values = type === 'f64' ? float64FromBytes(bytes) : float32FromBytes(bytes);
    return { name: c.name, unit: c.unit, sourceUnit: c.sourceUnit, values, invalidCount: c.invalidCount };
  }));
  return {
    channels,
    time,
    length,
    metadata: {},
    layout: (row.layout ?? {}) as Record<string, unknown>,
    warnings: row.warnings ?? [],
    ...(files.timeOrigin && { timeOrigin: files.timeOrigin }),
    ...(files.valueKind && { valueKind: files.valueKind }),
  };
}
