import { prepareChannel, preparesApart, type PrepareChannelsReply, type PreparedChannel } from '../../shared/analysis/prepare-channel.ts';
import type { AnalysisOptions } from '../../shared/contracts/analysis.ts';
import type { ImportedCapture } from '../../shared/contracts/capture.ts';
import type { ScanThread } from '../import/scan-thread.ts';

/**
 * Every channel of a deep record prepared for analyzeShot (levels, noise and pulses: most of the analysis's time,
 * one pass after another over each channel) in two threads: the second half of the channels in the reader's
 * second thread, which has just scanned half the file and is still up, the first half here. The results are the
 * ones analyzeShot would compute itself (the same functions on the same samples). Null when the capture does not
 * suit (fewer than two channels, smoothing asked for, samples not in shared memory, an uneven time base whose times
 * would have to be copied): analyzeShot then prepares the channels itself, as always.
 */
export async function prepareInTwoThreads(thread: ScanThread, capture: ImportedCapture, opts: AnalysisOptions): Promise<PreparedChannel[] | null> {
  const values = capture.channels.map((c) => c.values);
  if (!preparesApart(values.length, capture.time, opts)) return null;
  if (!values.every((v) => v.buffer instanceof SharedArrayBuffer)) return null;
  const mine = Math.ceil(values.length / 2);
  const theirs = values.slice(mine);
  const reply = thread.request<PrepareChannelsReply>({
    kind: 'prepare',
    channels: theirs.map((v) => ({ buffer: v.buffer as SharedArrayBuffer, byteOffset: v.byteOffset, length: v.length })),
    time: capture.time,
    opts,
  });
  const here = values.slice(0, mine).map((v) => prepareChannel(v, capture.time, opts));
  let there: PreparedChannel[];
  try {
    const answer = await reply;
    if (answer.failure !== null) throw new Error(answer.failure);
    there = answer.prepared;
  } catch {
    // The other thread failed (it should not): this one prepares those channels too.
    there = theirs.map((v) => prepareChannel(v, capture.time, opts));
  }
  return [...here, ...there];
}
