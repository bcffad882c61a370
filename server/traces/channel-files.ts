import * as z from 'zod';

/**
 * What writeChannelFiles stored for one capture, kept in the Capture row's `channels` JSONB so a window request
 * needs no other lookup. Samples are little-endian Float32; pyramid levels are little-endian Float32 (min, max)
 * pairs; an explicit time column is little-endian Float64 (times must keep full precision to be searched).
 */
export const channelFilesSchema = z.object({
  format: z.literal('gatepost-channel-files-1'),
  /** Samples per channel. */
  length: z.number().int().min(0),
  time: z.discriminatedUnion('kind', [
    z.object({ kind: z.literal('uniform'), t0: z.number(), dt: z.number().positive(), jitter: z.number() }),
    z.object({
      kind: z.literal('explicit'),
      /** Float64 LE times, one per sample, strictly increasing. */
      key: z.string(),
      /** First and last sample times, s (null for an empty record). */
      first: z.number().nullable(),
      last: z.number().nullable(),
    }),
  ]),
  /** How the time base was found and what the values are (the importer's timeOrigin and valueKind), when known. */
  timeOrigin: z.object({ how: z.enum(['time-column', 'metadata', 'rebuilt', 'given']), source: z.string(), assumed: z.boolean() }).optional(),
  valueKind: z.enum(['physical', 'codes']).optional(),
  channels: z.array(
    z.object({
      index: z.number().int().min(0),
      name: z.string(),
      unit: z.string(),
      sourceUnit: z.string(),
      invalidCount: z.number().int().min(0),
      length: z.number().int().min(0),
      factor: z.number().int().min(2),
      samplesKey: z.string(),
      /**
       * The importer's values at full precision, for the analysis (absent on captures stored before it was kept):
       * Float64 LE, or the Float32 samples file itself when the capture was read at Float32 precision.
       */
      values: z.object({ key: z.string(), type: z.enum(['f32', 'f64']) }).optional(),
      levels: z.array(
        z.object({
          /** 1, 2, …: blocks of factor^level samples. */
          level: z.number().int().min(1),
          blockSize: z.number().int().min(2),
          key: z.string(),
          /** Pairs in the file. */
          length: z.number().int().min(1),
        }),
      ),
    }),
  ),
});

export type ChannelFiles = z.infer<typeof channelFilesSchema>;
export type ChannelFilesChannel = ChannelFiles['channels'][number];

/** True on every platform Node supports today (x86, ARM); the big-endian branch keeps the file format fixed anyway. */
const LITTLE_ENDIAN_HOST = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/** Little-endian bytes of Float32 values (Float64 input is rounded to Float32). */
export function float32Bytes(values: Float32Array | Float64Array): Uint8Array {
  const f32 = values instanceof Float32Array ? values : new Float32Array(values);
  if (LITTLE_ENDIAN_HOST) return new Uint8Array(f32.buffer, f32.byteOffset, f32.byteLength);
  const out = new Uint8Array(f32.length * 4);
  const view = new DataView(out.buffer);
  for (let i = 0; i < f32.length; i++) view.setFloat32(i * 4, f32[i], true);
  return out;
}

/** Little-endian bytes of Float64 values. */
export function float64Bytes(values: Float64Array): Uint8Array {
  if (LITTLE_ENDIAN_HOST) return new Uint8Array(values.buffer, values.byteOffset, values.byteLength);
  const out = new Uint8Array(values.length * 8);
  const view = new DataView(out.buffer);
  for (let i = 0; i < values.length; i++) view.setFloat64(i * 8, values[i], true);
  return out;
}

/** Float32 values from little-endian bytes (as returned by BlobStore.readRange: own buffer, offset 0). */
export function float32FromBytes(bytes: Uint8Array): Float32Array {
  const n = bytes.byteLength >>> 2;
  if (LITTLE_ENDIAN_HOST && bytes.byteOffset % 4 === 0) return new Float32Array(bytes.buffer, bytes.byteOffset, n);
  const out = new Float32Array(n);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  for (let i = 0; i < n; i++) out[i] = view.getFloat32(i * 4, true);
  return out;
}

/** Float64 values from little-endian bytes. */
export function float64FromBytes(bytes: Uint8Array): Float64Array {
  const n = bytes.byteLength >>> 3;
  if (LITTLE_ENDIAN_HOST && bytes.byteOffset % 8 === 0) return new Float64Array(bytes.buffer, bytes.byteOffset, n);
  const out = new Float64Array(n);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  for (let i = 0; i < n; i++) out[i] = view.getFloat64(i * 8, true);
  return out;
}
