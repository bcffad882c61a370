import type { ImportedCapture } from '../../shared/contracts/capture.ts';
import { buildMinMaxPyramid, pyramidShape } from '../../shared/traces/build-min-max-pyramid.ts';
import { assertBlobKey, type BlobStore } from '../storage/blob-store.ts';
import { float32Bytes, float64Bytes, type ChannelFiles } from './channel-files.ts';

export interface WriteChannelFilesOptions {
  /** Pyramid block factor. @default 16 */
  factor?: number;
  /** Stop the pyramid once a level has at most this many pairs. @default 1024 */
  maxTopPairs?: number;
}

/** Folder of one capture's derived files: `labs/<labId>/captures/<captureId>`. */
export function captureFilesPrefix(labId: string, captureId: string): string {
  const prefix = `labs/${labId}/captures/${captureId}`;
  assertBlobKey(prefix);
  return prefix;
}

/**
 * Writes each channel of an imported capture as little-endian Float32 samples
 * (`…/ch<i>/samples.f32`) plus its min/max pyramid (`…/ch<i>/level-<k>.f32`, interleaved min, max), and an
 * explicit time column as Float64 (`…/time.f64`). Returns the descriptor to keep in the Capture row.
 *
 * Float32 (24-bit mantissa, ~7 significant digits) is far finer than a scope's 8–12-bit ADC and a screen's
 * pixels, so it is enough for display. The analysis must see exactly what the importer returned, so Float64
 * values are also kept whole (`…/ch<i>/values.f64`, read back by readStoredChannels instead of parsing the raw
 * file again); values read at Float32 precision are already whole in `samples.f32`. The pyramid is built from
 * the full-precision values and then rounded: rounding is monotone, so round(min x) = min(round x) and the
 * levels agree exactly with the stored samples.
 * Rewriting the same capture overwrites the same keys, so a retried ingest job leaves nothing doubled.
 */
export async function writeChannelFiles(
  store: BlobStore,
  labId: string,
  captureId: string,
  capture: ImportedCapture,
  options: WriteChannelFilesOptions = {},
): Promise<ChannelFiles> {
  const { files, blobs } = placeChannelFiles(captureFilesPrefix(labId, captureId), channelFilesOf(capture, options));
  await putChannelBlobs(store, blobs);
  return files;
}

/** One file to store: its key and bytes. */
export interface ChannelBlob {
  key: string;
  bytes: Uint8Array;
}

/** A capture's channel files: the descriptor and the bytes of each file. */
export interface PreparedChannelFiles {
  files: ChannelFiles;
  blobs: ChannelBlob[];
}

/**
 * The descriptor of a capture's channel files (what the Capture row keeps: keys relative to the capture's folder,
 * lengths, pyramid levels), worked out without building any file: cheap, so the capture can be recorded as read
 * while its files are still being prepared (channelFilesOf builds them and gives the same descriptor).
 */
export function describeChannelFiles(capture: ImportedCapture, options: WriteChannelFilesOptions = {}): ChannelFiles {
  const { factor = 16, maxTopPairs = 1024 } = options;
  const { length } = capture;
  let time: ChannelFiles['time'];
  if (capture.time.kind === 'uniform') {
    const { t0, dt, jitter } = capture.time;
    time = { kind: 'uniform', t0, dt, jitter };
  } else {
    const t = capture.time.t;
    if (t.length !== length) throw new RangeError(`explicit time base has ${t.length} times for ${length} samples`);
    time = { kind: 'explicit', key: 'time.f64', first: length ? t[0] : null, last: length ? t[length - 1] : null };
  }
  const shape = pyramidShape(length, { factor, maxTopPairs });
  const channels: ChannelFiles['channels'] = capture.channels.map((channel, index) => {
    if (channel.values.length !== length) {
      throw new RangeError(`channel ${index} (${channel.name}) has ${channel.values.length} samples, the capture ${length}`);
    }
    const folder = `ch${index}`;
    const samplesKey = `${folder}/samples.f32`;
    return {
      index,
      name: channel.name,
      unit: channel.unit,
      sourceUnit: channel.sourceUnit,
      invalidCount: channel.invalidCount,
      length,
      factor,
      samplesKey,
      values: channel.values instanceof Float64Array ? { key: `${folder}/values.f64`, type: 'f64' } : { key: samplesKey, type: 'f32' },
      levels: shape.map((l, k) => ({ level: k + 1, blockSize: l.blockSize, key: `${folder}/level-${k + 1}.f32`, length: l.pairs })),
    };
  });
  return {
    format: 'gatepost-channel-files-1', length, time,
    ...(capture.timeOrigin && { timeOrigin: capture.timeOrigin }),
    ...(capture.valueKind && { valueKind: capture.valueKind }),
    channels,
  };
}

/**
 * The work of writeChannelFiles that needs no store and no capture id (the Float32 copies, the pyramids, the
 * descriptor of describeChannelFiles), with keys relative to the capture's folder (`ch0/samples.f32`), so a worker
 * thread can do it before the Capture row exists and hand the bytes over; placeChannelFiles puts the keys in the
 * folder, putChannelBlobs stores them.
 */
export function channelFilesOf(capture: ImportedCapture, options: WriteChannelFilesOptions = {}): PreparedChannelFiles {
  const { factor = 16, maxTopPairs = 1024 } = options;
  const files = describeChannelFiles(capture, { factor, maxTopPairs });
  const blobs: ChannelBlob[] = [];
  if (files.time.kind === 'explicit' && capture.time.kind === 'explicit') blobs.push({ key: files.time.key, bytes: float64Bytes(capture.time.t) });
  for (const described of files.channels) {
    const values = capture.channels[described.index].values;
    blobs.push({ key: described.samplesKey, bytes: float32Bytes(values) });
    if (values instanceof Float64Array) blobs.push({ key: described.values!.key, bytes: float64Bytes(values) });
    const pyramid = buildMinMaxPyramid(values, { factor, maxTopPairs });
    if (pyramid.length !== described.levels.length) throw new RangeError(`the pyramid has ${pyramid.length} levels, its descriptor ${described.levels.length}`);
    pyramid.forEach((level, k) => {
      const { key, length, blockSize } = described.levels[k];
      if (level.pairs.length !== 2 * length || level.blockSize !== blockSize) throw new RangeError(`pyramid level ${k + 1} does not match its descriptor`);
      blobs.push({ key, bytes: float32Bytes(level.pairs) });
    });
  }
  return { files, blobs };
}

/** The prepared files with their keys in the folder `prefix` (see captureFilesPrefix). */
export function placeChannelFiles(prefix: string, prepared: PreparedChannelFiles): PreparedChannelFiles {
  const at = (key: string) => `${prefix}/${key}`;
  const { files } = prepared;
  return {
    files: {
      ...files,
      time: files.time.kind === 'explicit' ? { ...files.time, key: at(files.time.key) } : files.time,
      channels: files.channels.map((c) => ({
        ...c,
        samplesKey: at(c.samplesKey),
        ...(c.values && { values: { ...c.values, key: at(c.values.key) } }),
        levels: c.levels.map((l) => ({ ...l, key: at(l.key) })),
      })),
    },
    blobs: prepared.blobs.map((b) => ({ key: at(b.key), bytes: b.bytes })),
  };
}

export interface PutChannelBlobsOptions {
  /** Writes at once. @default 4 */
  concurrency?: number;
  /** false: do not wait for the disk (see PutOptions.sync); syncChannelBlobs then makes them durable. @default true */
  sync?: boolean;
}

/** Stores the blobs, several at a time (each write is synced to disk unless `sync` is false; overlapping them hides part of the wait). */
export async function putChannelBlobs(store: BlobStore, blobs: ChannelBlob[], options: PutChannelBlobsOptions = {}): Promise<void> {
  const { concurrency = 4, sync = true } = options;
  let next = 0;
  const lane = async () => {
    while (next < blobs.length) {
      const { key, bytes } = blobs[next++];
      await store.putBytes(key, bytes, { sync });
    }
  };
  await Promise.all(Array.from({ length: Math.min(concurrency, blobs.length) }, lane));
}

/** Makes blobs stored by putChannelBlobs with `sync: false` durable (nothing to do for stores without a sync step). */
export async function syncChannelBlobs(store: BlobStore, blobs: ChannelBlob[]): Promise<void> {
  await store.sync?.(blobs.map((b) => b.key));
}
