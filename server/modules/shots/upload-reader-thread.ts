// Worker-thread side of reading an upload while it arrives (upload-reader.ts is the API's side): the blocks go
// through the disk reader's stream path (readCaptureStream, the same byte scanner), and the channel files are
// prepared here at once (Float32 copies, pyramids) and their bytes handed back to be stored.
import { parentPort } from 'node:worker_threads';
import { channelFilesOf } from '../../traces/write-channel-files.ts';
import { readCaptureStream } from '../../../worker/import/read-capture-stream.ts';
import type { CaptureLimits } from '../../../worker/import/capture-limits.ts';
import type { UploadReaderReply, UploadReaderRequest } from './upload-reader.ts';

const port = parentPort!;
const post = (reply: UploadReaderReply, transfer: ArrayBuffer[] = []) => port.postMessage(reply, transfer);

const blocks: Uint8Array[] = [];
let ended = false;
let wake: (() => void) | null = null;
let failed = false;

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

async function read(sizeHint: number, limits: CaptureLimits): Promise<void> {
  try {
    // The installation's limits refuse a too wide or too deep file here too; the worker then says why.
    const capture = await readCaptureStream(arriving(), { sizeHint, ...limits });
    const { files, blobs } = channelFilesOf(capture);
    // Each blob's bytes get a buffer of their own to hand over (a Float64 channel's bytes view the read's array).
    const owned = blobs.map(({ key, bytes }) => ({ key, bytes: bytes.byteOffset === 0 && bytes.byteLength === bytes.buffer.byteLength ? bytes : bytes.slice() }));
    const buffers = [...new Set(owned.map((b) => b.bytes.buffer as ArrayBuffer))];
    post({ type: 'read', ok: true, files, blobs: owned, layout: capture.layout, warnings: capture.warnings, length: capture.length }, buffers);
  } catch (error) {
    failed = true;
    blocks.length = 0;
    post({ type: 'read', ok: false, reason: (error as Error).message });
  }
}

port.on('message', (message: UploadReaderRequest) => {
  if (message.type === 'start') void read(message.sizeHint, message.limits);
  else if (message.type === 'end') ended = true;
  // After a failed read nothing more is scanned; the block is only counted so the sender is never held up.
  else if (failed) post({ type: 'taken', bytes: message.bytes.byteLength });
  else blocks.push(message.bytes);
  const w = wake;
  wake = null;
  w?.();
});
