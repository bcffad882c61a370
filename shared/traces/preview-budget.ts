/**
 * How deep a record the browser's live preview takes: it fetches every sample of every channel (Float32, the
 * stored display copy) and runs the engine on them in the tab, so the record must fit a tab's memory.
 */

/** Tab memory the preview may use. */
export const PREVIEW_MEMORY_BYTES = 500e6;

/**
 * Bytes per sample and channel while previewing: 4 for the fetched Float32 sample, 8 for the smoothed Float64 copy
 * the engine makes when smoothing is on, and 8 for its other working arrays (an estimate with room to spare: a run of
 * the engine on 4 million two-channel Float32 samples under Node grew the process by about 64 MB, 8 bytes per sample
 * and channel, without smoothing).
 */
export const PREVIEW_BYTES_PER_CHANNEL_SAMPLE = 20;

/** Memory the preview of a record needs, bytes: its channels' samples and, for an uneven time base, its Float64 times. */
export function previewBytes(samples: number, channels: number, explicitTime: boolean): number {
  return samples * (channels * PREVIEW_BYTES_PER_CHANNEL_SAMPLE + (explicitTime ? 8 : 0));
}
