import { randomBytes } from 'node:crypto';
import { rm } from 'node:fs/promises';
import path from 'node:path';
import { PassThrough } from 'node:stream';
import multer from 'multer';
import type { Config } from '../../config.ts';
import { Capture, Shot } from '../../db/models/index.ts';
import type { JobQueues } from '../../lib/job-queues.ts';
import { LocalDiskStore } from '../../storage/local-disk-store.ts';
import { warmFolder } from '../../lib/warm-folder.ts';
import { assertStorageRoom } from '../storage/service.ts';
import { captureIntake } from './capture-intake.ts';
import { settleShot } from './settle-shot.ts';

/** Rounds of the intake on the warm-up file: V8 optimises a function after it ran hot for a while, not on its first call. */
const INTAKE_ROUNDS = 3;
/** The warm-up file: about as large as a common capture (100 000 samples of two channels as CSV), in 64 KiB pieces as a socket delivers them. */
const WARM_FILE_BYTES = 3 << 20;
const PIECE_BYTES = 64 << 10;

/**
 * Readies the API's upload path for the first upload after a start, while nobody is waiting: the multipart parser
 * and the capture intake (hashing, writing, syncing) run a few times on a throwaway file into a throwaway folder,
 * and the statements an upload makes run on rows no id names (the all-zero id), which opens the database
 * connections and the job queue's Redis connection and gives Sequelize its first pass over each. Nothing is written
 * to the database, the queues or the lab's storage. bench:pipeline (issue 13: the first job after a start ≤ 2× a warm
 * one; 2 December 2026, load average 3–5) measured the first upload request at 106–204 ms without this (warm medians
 * 61–106 ms, six runs) and 69–111 ms with it (warm medians 48–98 ms, nine runs).
 * A failure (database not up yet) only means the first upload does the work itself. Resolves with the bytes the
 * intake took (the warm-up file's, once per round).
 */
export async function warmUploadPath(config: Config, queues: JobQueues): Promise<number> {
  const none = '00000000-0000-0000-0000-000000000000';
  // Each on its own: one that fails (Redis not up yet) leaves the others to do their part.
  await Promise.allSettled([
    Shot.findByPk(none, { attributes: ['labId'] }),
    Shot.findOne({ where: { id: none, labId: none } }),
    Capture.findOne({ where: { shotId: none, sha256: '0'.repeat(64) } }),
    queues.failedIngest({ captureId: none, attempt: 0 }),
    assertStorageRoom(config, none, 0, 'Warm-up'),
    settleShot(none),
  ]);
  let taken = 0;
  const dir = await warmFolder('gatepost-warm-upload');
  try {
    const storage = captureIntake({ store: new LocalDiskStore(path.join(dir, 'blobs')), uploadsDir: path.join(dir, 'uploads'), readFromBytes: -1 });
    const receive = multer({ storage, limits: { files: 1 } }).array('files', 1);
    const boundary = `----warm${randomBytes(8).toString('hex')}`;
    const row = Buffer.from('1.234567e-04,0.01234,4.98765\n');
    const file = Buffer.alloc(WARM_FILE_BYTES);
    for (let at = 0; at < file.length; at += row.length) row.copy(file, at);
    const body = Buffer.concat([
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="files"; filename="warm.csv"\r\nContent-Type: text/csv\r\n\r\n`),
      file,
      Buffer.from(`\r\n--${boundary}--\r\n`),
    ]);
    for (let round = 0; round < INTAKE_ROUNDS; round++) {
      const req = Object.assign(new PassThrough(), {
        headers: { 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': String(body.length) },
      });
      const done = new Promise<void>((resolve, reject) => {
        receive(req as never, {} as never, (err: unknown) => (err ? reject(err as Error) : resolve()));
      });
      for (let at = 0; at < body.length; at += PIECE_BYTES) req.write(body.subarray(at, at + PIECE_BYTES));
      req.end();
      await done;
      const received = (req as unknown as { files?: { path: string; size: number }[] }).files ?? [];
      taken += received.reduce((sum, f) => sum + f.size, 0);
      await Promise.all(received.map((f) => rm(f.path, { force: true })));
    }
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
  return taken;
}
