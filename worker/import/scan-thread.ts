import { Worker } from 'node:worker_threads';
import type { ScanThreadReply, ScanThreadRequest } from './scan-range-worker.ts';

/**
 * The disk reader's second thread (scan-range-worker): one request at a time, each answered by one reply. The
 * reader makes its own for a read and closes it after; a caller that has more work for the thread after the read
 * (the analyze CLI: half of the channels' analysis) makes it, passes it to readCaptureFile and closes it itself.
 */
export class ScanThread {
  private readonly worker: Worker;
  private failure: Error | null = null;
  private closing: Promise<void> | null = null;

  /** `prepares`: it will be asked to prepare channels after its scan, so it loads the analysis modules as soon as
   * it has replied to a scan (scan-range-worker.ts). */
  constructor(options: { prepares?: boolean } = {}) {
    this.worker = new Worker(new URL('./scan-range-worker-boot.mjs', import.meta.url), { workerData: { prepares: options.prepares === true } });
    this.worker.on('error', (error) => {
      this.failure = error;
    });
  }

  /** Posts a request; the promise settles with its reply (or the thread's failure). */
  request<R extends ScanThreadReply>(message: ScanThreadRequest): Promise<R> {
    if (this.failure !== null) return Promise.reject(this.failure);
    const reply = new Promise<R>((resolve, reject) => {
      const onMessage = (value: R) => {
        this.worker.off('error', onError);
        resolve(value);
      };
      const onError = (error: Error) => {
        this.worker.off('message', onMessage);
        reject(error);
      };
      this.worker.once('message', onMessage);
      this.worker.once('error', onError);
    });
    reply.catch(() => undefined);
    this.worker.postMessage(message);
    return reply;
  }

  /** Stops the thread; later calls return the same promise. */
  close(): Promise<void> {
    this.closing ??= this.worker.terminate().then(() => undefined);
    return this.closing;
  }
}
