// Worker-thread side of reading an upload while it arrives (upload-reader.ts is the API's side): the blocks go
// through the disk reader's stream path (readCaptureStream, the same byte scanner). Once read, the capture stays
// here and the API asks, in this order: the engine's numbers for the automatic version (nothing to read again for
// them), the files the trace plots read (Float32 copies, pyramids), then the full-precision values.
import { parentPort, workerData } from 'node:worker_threads';
import { analyzeShot } from '../../../shared/analysis/analyze-shot.ts';
import { prepareChannels, type PreparedChannel, type PrepareChannelsRequest } from '../../../shared/analysis/prepare-channel.ts';
import { nonFinitePaths, nonFiniteResultMessage } from '../../../shared/analysis/non-finite-paths.ts';
import { analysisOptionsSchema, type AnalysisOptionsInput } from '../../../shared/contracts/analysis.ts';
import type { ImportedCapture } from '../../../shared/contracts/capture.ts';
import { simulatedShotCsv, WARM_UP_PARAMETERS, warmUpDeepPasses, warmUpShot } from '../../../shared/simulate/warm-up-shot.ts';
import { float64Bytes } from '../../traces/channel-files.ts';
import { channelFilesOf, describeChannelFiles, type ChannelBlob } from '../../traces/write-channel-files.ts';
import { readCaptureStream } from '../../../worker/import/read-capture-stream.ts';
import type { CaptureLimits } from '../../../worker/import/capture-limits.ts';
import type { SharedSamples, UploadReaderReply, UploadReaderRequest } from './upload-reader.ts';

const port = parentPort!;
/** Started ahead of an upload (upload-reader.ts, `prestartUploadReader`): warm up first, then take the upload. */
const startedAhead = (workerData as { warm?: boolean } | null)?.warm === true;
const post = (reply: UploadReaderReply, transfer: ArrayBuffer[] = []) => port.postMessage(reply, transfer);

const blocks: Uint8Array[] = [];
let ended = false;
let wake: (() => void) | null = null;
let failed = false;
/** The capture once read, kept for `analyse` and `files` until the API asks for its values (`release`). */
let capture: ImportedCapture | null = null;
/** Its full-precision value files (views of its arrays), held back until then. */
let kept: ChannelBlob[] = [];

async function* arriving(): AsyncGenerator<Uint8Array> {
  for (;;) {
    const block = blocks.shift();
    if (block !== undefined) {
      post({ type: 'taken', bytes: block.byteLength });
      yield block;
      // The reader copies what it keeps of a block before asking for the next one: the block goes back to be
      // filled again.
      post({ type: 'taken', bytes: 0, buffer: block.buffer as ArrayBuffer }, [block.buffer as ArrayBuffer]);
      continue;
    }
    if (ended) return;
    await new Promise<void>((resolve) => { wake = resolve; });
  }
}

/** Whole buffers of `blobs` to transfer (each once); shared ones go over shared, not transferred. */
const buffersOf = (blobs: ChannelBlob[]) => [...new Set(blobs.map((b) => b.bytes.buffer).filter((b): b is ArrayBuffer => !(b instanceof SharedArrayBuffer)))];

/** The capture's channels as views of shared memory and its time base, for another thread to prepare them in place;
 * null when they are not all shared (the text path's plain arrays). */
function sharedSamples(read: ImportedCapture): SharedSamples | null {
  if (!read.channels.every((c) => c.values.buffer instanceof SharedArrayBuffer)) return null;
  return {
    channels: read.channels.map((c) => ({ buffer: c.values.buffer as SharedArrayBuffer, byteOffset: c.values.byteOffset, length: c.values.length })),
    time: read.time,
  };
}

async function read(sizeHint: number, limits: CaptureLimits): Promise<void> {
  try {
    // The installation's limits refuse a too wide or too deep file here too; the worker then says why.
    // In shared memory: another thread can prepare half of the channels for the engine (upload-reader.ts, analyse).
    capture = await readCaptureStream(arriving(), { sizeHint, ...limits, shared: true });
    // Only the descriptor now: the API records the capture and the automatic version's numbers before the files.
    const files = describeChannelFiles(capture);
    const read = capture;
    kept = files.channels.flatMap((c) => (c.values?.type === 'f64' ? [{ key: c.values.key, bytes: float64Bytes(read.channels[c.index].values as Float64Array) }] : []));
    post({ type: 'read', ok: true, files, layout: capture.layout, warnings: capture.warnings, length: capture.length, samples: sharedSamples(capture) });
  } catch (error) {
    failed = true;
    blocks.length = 0;
    post({ type: 'read', ok: false, reason: (error as Error).message });
  }
}

/**
 * The channel files of the capture read but its full-precision values: the Float32 copies and pyramids are
 * transferred, not copied; a blob that views the capture's own arrays (an explicit time column) goes over as a
 * copy. The values view the capture's arrays: they stay here until `release`.
 */
function prepareFiles(read: ImportedCapture | null): UploadReaderReply {
  if (read === null) return { type: 'files', blobs: null };
  try {
    const own = new Set<ArrayBufferLike>([...read.channels.map((c) => c.values.buffer), ...(read.time.kind === 'explicit' ? [read.time.t.buffer] : [])]);
    const { blobs } = channelFilesOf(read);
    const sent = blobs.filter((b) => !b.key.endsWith('/values.f64')).map(({ key, bytes }) => ({ key, bytes: own.has(bytes.buffer) ? bytes.slice() : bytes }));
    return { type: 'files', blobs: sent };
  } catch {
    // The API then puts the capture back in the queue, and the worker writes the files from the stored upload.
    return { type: 'files', blobs: null };
  }
}

/** The engine on the capture read, as the analysis job runs it (with its channels prepared already, when given); only
 * results that are all finite numbers come back. */
function analyse(read: ImportedCapture | null, parameters: AnalysisOptionsInput, prepared?: PreparedChannel[]): UploadReaderReply {
  if (read === null) return { type: 'analysed', ok: false, reason: 'nothing was read' };
  try {
    const results = analyzeShot(read, analysisOptionsSchema.parse(parameters), prepared);
    const nonFinite = nonFinitePaths(results);
    if (nonFinite.length > 0) return { type: 'analysed', ok: false, reason: nonFiniteResultMessage(nonFinite) };
    return { type: 'analysed', ok: true, results: JSON.parse(JSON.stringify(results)) as Record<string, unknown> };
  } catch (error) {
    return { type: 'analysed', ok: false, reason: (error as Error).message };
  }
}

/**
 * Runs what a read runs (the stream reader, the descriptor, `analyse`, `prepareFiles`) once on a small simulated
 * shot (20 000 samples, 0.7 MB), and the engine's passes over a deep record (warmUpDeepPasses: every tenth sample, as
 * for a record of more than two million), so that a thread started ahead has loaded and compiled its code before the
 * upload it is kept for arrives. Measured with --cpu-prof on the 330 MB capture (3 December 2026): a thread started by the
 * upload spent its first 0.5–0.75 s loading its modules and reading the head slowly while the upload waited for it.
 * Once: only uploads of 16 MB and more are read this way, long enough for V8 to optimise the hot loops on the way;
 * two rounds of 100 000 samples (as the worker's warm-up does) took about 2 s on the lab's 2-core machine right after
 * an upload, beside that upload's own last steps. A failure only means the upload warms the code up itself.
 */
async function warmUp(): Promise<void> {
  try {
    const bytes = simulatedShotCsv(warmUpShot(20_000));
    const read = await readCaptureStream((async function* () { yield bytes; })(), { sizeHint: bytes.length });
    describeChannelFiles(read);
    analyse(read, WARM_UP_PARAMETERS);
    warmUpDeepPasses(read.channels.map((c) => c.values));
    prepareFiles(read);
  } catch {
    // Nothing to do: the first upload pays for it.
  }
}

const warmedUp = startedAhead ? warmUp() : Promise.resolve();
// The API starts the helper thread once the first spare has warmed up, not beside it (upload-reader.ts).
if (startedAhead) void warmedUp.then(() => post({ type: 'warmed' }));

/** Channels of shared memory prepared for the engine: this reader's own, or (in the API's helper thread) a reader's. */
function prepare(id: number, request: PrepareChannelsRequest): UploadReaderReply {
  try {
    return { type: 'prepared', id, prepared: prepareChannels(request) };
  } catch (error) {
    return { type: 'prepared', id, prepared: null, reason: (error as Error).message };
  }
}

port.on('message', (message: UploadReaderRequest) => {
  if (message.type === 'analyse') {
    post(analyse(capture, message.parameters, message.prepared));
    return;
  }
  if (message.type === 'prepare') {
    post(prepare(message.id, message.request));
    return;
  }
  if (message.type === 'files') {
    const reply = prepareFiles(capture);
    post(reply, reply.type === 'files' && reply.blobs !== null ? buffersOf(reply.blobs) : []);
    return;
  }
  if (message.type === 'release') {
    // The values go over (transferred: the capture's arrays are no longer usable here) and the capture is let go.
    const blobs = kept;
    kept = [];
    capture = null;
    post({ type: 'released', blobs }, buffersOf(blobs));
    return;
  }
  if (message.type === 'start') void warmedUp.then(() => read(message.sizeHint, message.limits));
  else if (message.type === 'end') ended = true;
  // After a failed read nothing more is scanned; the block is only counted so the sender is never held up.
  else if (failed) post({ type: 'taken', bytes: message.bytes.byteLength });
  else blocks.push(message.bytes);
  const w = wake;
  wake = null;
  w?.();
});
