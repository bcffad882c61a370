import { Worker } from 'node:worker_threads';
import type { ChannelFiles } from '../../traces/channel-files.ts';
import type { ChannelBlob } from '../../traces/write-channel-files.ts';
import type { CaptureLimits } from '../../../worker/import/capture-limits.ts';
import { analysisOptionsSchema, type AnalysisOptionsInput } from '../../../shared/contracts/analysis.ts';
import type { TimeBase } from '../../../shared/contracts/capture.ts';
import { preparesApart, type PreparedChannel, type PrepareChannelsRequest } from '../../../shared/analysis/prepare-channel.ts';

export type UploadReaderRequest =
  | { type: 'start'; sizeHint: number; limits: CaptureLimits }
  | { type: 'block'; bytes: Uint8Array }
  | { type: 'end' }
  | { type: 'analyse'; parameters: AnalysisOptionsInput; prepared?: PreparedChannel[] }
  | { type: 'prepare'; id: number; request: PrepareChannelsRequest }
  | { type: 'files' }
  | { type: 'release' };

/**
 * What a read upload gives at once: the descriptor of its channel files (keys relative to the capture's folder) and
 * the row's fields. The files themselves stay with the thread until asked for: those the trace plots read with
 * `takeFiles()`, the full-precision values with `takeKept()`.
 */
export interface UploadRead {
  files: ChannelFiles;
  layout: Record<string, unknown>;
  warnings: string[];
  length: number;
  /** The channels in shared memory, for the helper thread to prepare half of them; null when they are not. */
  samples: SharedSamples | null;
}

/** A read capture's channels as views of shared memory, with its time base. */
export interface SharedSamples {
  channels: PrepareChannelsRequest['channels'];
  time: TimeBase;
}

export type UploadReaderReply =
  | { type: 'taken'; bytes: number; buffer?: ArrayBuffer }
  | ({ type: 'read'; ok: true } & UploadRead)
  | { type: 'read'; ok: false; reason: string }
  | { type: 'analysed'; ok: true; results: Record<string, unknown> }
  | { type: 'analysed'; ok: false; reason: string }
  | { type: 'prepared'; id: number; prepared: PreparedChannel[] | null; reason?: string }
  | { type: 'files'; blobs: ChannelBlob[] | null }
  | { type: 'released'; blobs: ChannelBlob[] }
  | { type: 'warmed' };

/** The engine's results worked out in the reading thread (`threads`: 2 when the helper prepared half of the
 * channels), or why not. */
export type AnalyseOutcome = { results: Record<string, unknown>; threads: 1 | 2; ranAt: { startedAt: Date; completedAt: Date } } | { problem: string };

/** Bytes handed to the thread and not yet taken by its scanner before push() waits (the socket is paused meanwhile). */
const MAX_AHEAD = 32 << 20;
/** Handed-back blocks kept for reuse at most. */
const MAX_SPARE = 8;

/**
 * The reading thread started ahead for the next large upload (prestartUploadReader), or null. A thread started by
 * the upload itself loads its modules and compiles its code while the upload waits for it: measured with --cpu-prof
 * on the 330 MB capture (3 December 2026, a quiet 2-core machine), the first 0.5–0.75 s of every upload's reading.
 */
let spareThread: Worker | null = null;
/** prestartUploadReader was called: this process keeps a spare thread from then on. */
let keepSpare = false;

function startThread(ahead: boolean): Worker {
  const worker = new Worker(new URL('./upload-reader-thread.boot.mjs', import.meta.url), { workerData: { warm: ahead } });
  // Neither a spare nor a reader keeps the process alive.
  worker.unref();
  return worker;
}

/**
 * The helper thread: started once the first spare has warmed up, warmed up the same way, then kept. Once a deep
 * upload is read, it prepares half of the channels for the engine (levels, noise, pulses: one pass after another over
 * each channel) while the reading thread prepares the other half, in the same shared memory; the reading thread then
 * runs the engine on them (analyzeShot with `prepared`, the same results). The cores are otherwise idle then: the
 * last byte has arrived. Measured with the 10-million-sample upload (bench:pipeline --deep, curl, 3 December 2026):
 * from the upload's answer to the result seen 0.22–0.23 s, against 0.30–0.41 s with the reading thread alone.
 */
let helperThread: Worker | null = null;
let nextPrepareId = 1;
/** Prepare requests the helper has not answered yet. */
const helperWaiting = new Map<number, (prepared: PreparedChannel[] | null) => void>();

function startHelper(): void {
  if (helperThread !== null) return;
  const worker = startThread(true);
  helperThread = worker;
  worker.on('message', (reply: UploadReaderReply) => {
    if (reply.type !== 'prepared') return; // 'warmed' too: nothing to do
    const done = helperWaiting.get(reply.id);
    helperWaiting.delete(reply.id);
    done?.(reply.prepared);
  });
  const gone = () => {
    if (helperThread === worker) helperThread = null;
    for (const done of helperWaiting.values()) done(null);
    helperWaiting.clear();
  };
  worker.once('exit', gone);
  worker.once('error', gone);
}

/** Channels prepared by the helper thread; null when there is none or it failed. */
function helperPrepare(request: PrepareChannelsRequest): Promise<PreparedChannel[] | null> {
  const helper = helperThread;
  if (helper === null) return Promise.resolve(null);
  const id = nextPrepareId++;
  return new Promise((resolve) => {
    helperWaiting.set(id, resolve);
    helper.postMessage({ type: 'prepare', id, request } satisfies UploadReaderRequest);
  });
}

/** The helper thread's id, or null (for tests). */
export function helperUploadThreadId(): number | null {
  return helperThread?.threadId ?? null;
}

/**
 * Starts a reading thread ahead of the next large upload, if none is waiting: it loads its code and warms it up on
 * a simulated shot (upload-reader-thread.ts), then waits, costing memory only (about 60 MB with the compiled build).
 * The API starts one when it starts (when it reads uploads while they arrive), and from then on another each time a
 * reader is closed, so one is waiting again once an upload's read is over. The helper thread starts once a spare has
 * warmed up, when there is none.
 */
export function prestartUploadReader(): void {
  keepSpare = true;
  if (spareThread !== null) return;
  const worker = startThread(true);
  spareThread = worker;
  // The helper warms up after this thread rather than beside it (both take a core for a moment).
  worker.on('message', (reply: UploadReaderReply) => {
    if (reply.type === 'warmed' && keepSpare) startHelper();
  });
  const gone = () => {
    if (spareThread === worker) spareThread = null;
  };
  worker.once('exit', gone);
  worker.once('error', gone);
}

/** The thread id of the spare thread waiting, or null (for tests). */
export function spareUploadReaderThreadId(): number | null {
  return spareThread?.threadId ?? null;
}

/** Stops the spare thread and the helper, and starts no other (a process that stops reading uploads; tests). */
export async function stopSpareUploadReader(): Promise<void> {
  keepSpare = false;
  const spare = spareThread;
  const helper = helperThread;
  spareThread = null;
  helperThread = null;
  await Promise.all([spare?.terminate(), helper?.terminate()]);
}

/** The spare thread if one is waiting, else a new one. */
function takeThread(): Worker {
  const spare = spareThread;
  spareThread = null;
  return spare ?? startThread(false);
}

/**
 * Reads an upload in a worker thread while its bytes arrive (upload-reader-thread.ts), with the importer's stream
 * path, so the samples are in memory soon after the last byte arrives; the thread then works out the automatic
 * version's numbers and prepares the channel files as asked. Blocks are handed over, not copied; push() waits while
 * the thread is more than 32 MiB behind, which holds the upload back instead of piling it up in memory.
 */
export class UploadReader {
  private readonly worker: Worker;
  private ahead = 0;
  /** Blocks the thread has finished with and handed back, for the intake to fill again. */
  private readonly spare: Uint8Array<ArrayBuffer>[] = [];
  private waiting: (() => void) | null = null;
  private analysed: ((outcome: { results: Record<string, unknown> } | { problem: string }) => void) | null = null;
  /** The engine's outcome for each set of parameters asked for (by their JSON), one run after another. */
  private readonly analyses = new Map<string, Promise<AnalyseOutcome>>();
  private lastAnalysis: Promise<unknown> = Promise.resolve();
  /** This thread's prepare requests not answered yet. */
  private readonly preparing = new Map<number, (prepared: PreparedChannel[] | null) => void>();
  private released: ((blobs: ChannelBlob[] | null) => void) | null = null;
  private prepared: ((blobs: ChannelBlob[] | null) => void) | null = null;
  private closed = false;
  /** The read is over (done or failed): blocks are no longer needed. */
  private settled = false;
  /** Settles when the read is over: the channel files, or why it could not read (the worker then reads the file). */
  readonly outcome: Promise<UploadRead | { problem: string }>;

  /** `onClose` is called once, when the reader is closed. */
  constructor(sizeHint: number, private readonly onClose: () => void = () => {}, limits: CaptureLimits = {}) {
    this.worker = takeThread();
    this.outcome = new Promise((resolve) => {
      this.worker.on('message', (reply: UploadReaderReply) => {
        if (reply.type === 'taken') {
          this.ahead -= reply.bytes;
          if (reply.buffer !== undefined && this.spare.length < MAX_SPARE) this.spare.push(new Uint8Array(reply.buffer));
          if (this.ahead <= MAX_AHEAD) this.release();
        } else if (reply.type === 'files') {
          const done = this.prepared;
          this.prepared = null;
          done?.(reply.blobs);
        } else if (reply.type === 'released') {
          const done = this.released;
          this.released = null;
          done?.(reply.blobs);
        } else if (reply.type === 'analysed') {
          const done = this.analysed;
          this.analysed = null;
          done?.(reply.ok ? { results: reply.results } : { problem: reply.reason });
        } else if (reply.type === 'prepared') {
          const done = this.preparing.get(reply.id);
          this.preparing.delete(reply.id);
          done?.(reply.prepared);
        } else if (reply.type === 'warmed') {
          // The thread was a spare that warmed up (prestartUploadReader listens for that).
        } else {
          this.settled = true;
          resolve(reply.ok ? reply : { problem: reply.reason });
          this.release();
        }
      });
      const fail = (problem: string) => {
        this.settled = true;
        resolve({ problem });
        this.release();
        this.answerWaiting(problem);
      };
      this.worker.on('error', (error) => fail(`the reading thread failed: ${error.message}`));
      this.worker.on('exit', () => fail('the reading thread stopped'));
    });
    this.send({ type: 'start', sizeHint, limits });
  }

  /** The reading thread's id. */
  get threadId(): number {
    return this.worker.threadId;
  }

  private send(message: UploadReaderRequest, transfer: ArrayBuffer[] = []) {
    if (!this.closed) this.worker.postMessage(message, transfer);
  }

  /** Answers every request still waiting for the thread, which will not answer: `problem` for the engine's numbers, no files. */
  private answerWaiting(problem: string) {
    const done = this.analysed;
    const gone = this.released;
    const files = this.prepared;
    this.analysed = this.released = this.prepared = null;
    done?.({ problem });
    gone?.(null);
    files?.(null);
    for (const prepared of this.preparing.values()) prepared(null);
    this.preparing.clear();
  }

  private release() {
    const w = this.waiting;
    this.waiting = null;
    w?.();
  }

  /**
   * A block the thread has handed back (its size is the one it was sent with), or null. Reusing them keeps the
   * upload from allocating (and the collector from freeing) a fresh megabyte for every megabyte that arrives:
   * measured on the 330 MB deep capture, that churn cost the API's main thread about as much as hashing the file.
   */
  spareBlock(size: number): Uint8Array<ArrayBuffer> | null {
    while (this.spare.length > 0) {
      const block = this.spare.pop()!;
      if (block.byteLength === size) return block;
    }
    return null;
  }

  /** Hands `block` to the thread (it must own its whole buffer, which is transferred); waits while the thread is far behind. */
  async push(block: Uint8Array): Promise<void> {
    if (this.closed || this.settled) return;
    this.ahead += block.byteLength;
    this.send({ type: 'block', bytes: block }, [block.buffer as ArrayBuffer]);
    while (this.ahead > MAX_AHEAD && !this.closed && !this.settled) {
      await new Promise<void>((resolve) => { this.waiting = resolve; });
    }
  }

  end(): void {
    this.send({ type: 'end' });
  }

  /**
   * After a read that went well: the engine's results for these parameters, worked out in the thread, which still
   * holds the samples (so nothing is read again), or why not (the engine refused, a result is not a finite number,
   * the thread stopped). One run at a time, each set of parameters once: asked again, the same outcome (the run
   * analyseOnRead started, when the parameters are the same). With the helper thread up, half of the channels are
   * prepared there meanwhile (`threads`: 2); the results are the same either way. `ranAt`: when the run started and
   * ended.
   */
  analyse(parameters: AnalysisOptionsInput): Promise<AnalyseOutcome> {
    if (this.closed) return Promise.resolve({ problem: 'the reader is closed' });
    const key = JSON.stringify(parameters);
    const known = this.analyses.get(key);
    if (known !== undefined) return known;
    const run = this.lastAnalysis.then(() => this.analyseNow(parameters)).catch((error: Error): AnalyseOutcome => ({ problem: error.message }));
    this.lastAnalysis = run;
    this.analyses.set(key, run);
    return run;
  }

  /**
   * Starts the engine once the read is over, with the parameters `parametersFor` gives for what was read (null: none),
   * before anyone asks: the API calls it when the last byte of a file that is (nearly) the whole request has arrived,
   * with the parameters the shot's automatic version would have if this file stays its only one. The run then goes on
   * while the file is synced to disk and recorded and the upload answered; analyse() with the same parameters takes
   * its outcome, other parameters run after it. A guess that turns out wrong (another file came meanwhile) costs one
   * run and nothing else. Measured with the 10-million-sample upload (bench:pipeline --deep, 4 December 2026): the
   * engine in the two threads took 120-170 ms, and the parameters read from the database 12-20 ms, after the read.
   */
  analyseOnRead(parametersFor: (read: UploadRead) => Promise<AnalysisOptionsInput | null>): void {
    void this.outcome.then(async (read) => {
      if ('problem' in read || this.closed) return;
      const parameters = await parametersFor(read).catch(() => null);
      if (parameters !== null) void this.analyse(parameters);
    });
  }

  private async analyseNow(parameters: AnalysisOptionsInput): Promise<AnalyseOutcome> {
    const startedAt = new Date();
    const prepared = await this.prepareInTwoThreads(parameters);
    if (this.closed) return { problem: 'the reader is closed' };
    const outcome = await new Promise<{ results: Record<string, unknown> } | { problem: string }>((resolve) => {
      this.analysed = resolve;
      this.send({ type: 'analyse', parameters, prepared: prepared ?? undefined });
    });
    return 'results' in outcome ? { ...outcome, threads: prepared === null ? 1 : 2, ranAt: { startedAt, completedAt: new Date() } } : outcome;
  }

  /**
   * The channels prepared for the engine in two threads, the first half in this reader's thread and the rest in the
   * helper (see helperThread), or null (one channel, no helper, smoothing asked for, samples not shared, uneven
   * times, a thread that failed): the reading thread then prepares them all itself, as analyzeShot does.
   */
  private async prepareInTwoThreads(parameters: AnalysisOptionsInput): Promise<PreparedChannel[] | null> {
    const read = await this.outcome;
    if ('problem' in read || read.samples === null || helperThread === null) return null;
    const parsed = analysisOptionsSchema.safeParse(parameters);
    if (!parsed.success) return null; // the reading thread words the refusal
    const { channels, time } = read.samples;
    if (!preparesApart(channels.length, time, parsed.data)) return null;
    const mine = Math.ceil(channels.length / 2);
    const [here, there] = await Promise.all([
      this.prepareHere({ channels: channels.slice(0, mine), time, opts: parsed.data }),
      helperPrepare({ channels: channels.slice(mine), time, opts: parsed.data }),
    ]);
    return here !== null && there !== null ? [...here, ...there] : null;
  }

  private prepareHere(request: PrepareChannelsRequest): Promise<PreparedChannel[] | null> {
    if (this.closed) return Promise.resolve(null);
    const id = nextPrepareId++;
    return new Promise((resolve) => {
      this.preparing.set(id, resolve);
      this.send({ type: 'prepare', id, request });
    });
  }

  /**
   * The files the trace plots read (Float32 copies of the channels, their pyramids, an explicit time column), keys
   * relative to the capture's folder, prepared in the thread; null when it stopped first or could not prepare them.
   */
  takeFiles(): Promise<ChannelBlob[] | null> {
    if (this.closed || this.prepared !== null) return Promise.resolve(null);
    return new Promise((resolve) => {
      this.prepared = resolve;
      this.send({ type: 'files' });
    });
  }

  /** The full-precision value files the thread held back (then it lets the capture go); null when it stopped first. */
  takeKept(): Promise<ChannelBlob[] | null> {
    if (this.closed || this.released !== null) return Promise.resolve(null);
    return new Promise((resolve) => {
      this.released = resolve;
      this.send({ type: 'release' });
    });
  }

  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    this.onClose();
    this.release();
    this.answerWaiting('the reader is closed');
    await this.worker.terminate();
    // The next upload's thread, started once this one's work is over rather than beside it.
    if (keepSpare) prestartUploadReader();
  }
}
