import type { BlobStore } from '../storage/blob-store.ts';
import type { ChannelFiles } from './channel-files.ts';

/**
 * The channel files of a capture that are missing or shorter than its descriptor says (keys), none when all are in
 * place. A deep upload's capture is recorded as read before its files are written (server/modules/shots/uploads.ts);
 * the held ingest job checks them with this and writes them again from the stored upload when the API stopped
 * before they were all written.
 */
export async function missingChannelFiles(store: BlobStore, files: ChannelFiles): Promise<string[]> {
  const expected: [key: string, bytes: number][] = [];
  if (files.time.kind === 'explicit') expected.push([files.time.key, files.length * 8]);
  for (const channel of files.channels) {
    expected.push([channel.samplesKey, channel.length * 4]);
    if (channel.values && channel.values.key !== channel.samplesKey) expected.push([channel.values.key, channel.length * (channel.values.type === 'f64' ? 8 : 4)]);
    // A level holds `length` (min, max) pairs as Float32.
    for (const level of channel.levels) expected.push([level.key, level.length * 8]);
  }
  const sizes = await Promise.all(expected.map(([key]) => store.stat(key)));
  return expected.filter(([, bytes], i) => (sizes[i]?.size ?? -1) < bytes).map(([key]) => key);
}
