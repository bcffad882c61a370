import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { analyzeShot } from '../../shared/analysis/analyze-shot.ts';
import { simulateShot } from '../../shared/simulate/simulate-shot.ts';
import { simulatedShotToCapture } from '../../shared/simulate/simulated-shot-to-capture.ts';
import { channelFilesOf } from '../../server/traces/write-channel-files.ts';
import { readCaptureFile } from '../import/read-capture-file.ts';
import { readCaptureStream } from '../import/read-capture-stream.ts';
import { workerContext } from '../context.ts';
import { Analysis, Capture, Shot } from '../../server/db/models/index.ts';

/**
 * Readies a processor thread for its first job while it waits in the pool: opens the worker context and a
 * database connection, reads each table once, and runs the code its jobs run (reading a capture, preparing its channel files, analysing
 * it) once on a small simulated shot, so the first real job does not pay for the connection and for the JIT's first
 * passes. bench:pipeline measured the first job after a start at 4.5× a warm one without this (issue 13: ≤ 2×).
 * Nothing is written anywhere; a failure (database not up yet) only means the first job does the work itself.
 */
export async function warmThread(kind: 'ingest' | 'analysis'): Promise<void> {
  const { sequelize } = workerContext();
  // A read of each table a job reads first, by an id no row has: the connection, and Sequelize's first pass over
  // each model's query building, happen here.
  const none = '00000000-0000-0000-0000-000000000000';
  await sequelize.authenticate().then(() => Promise.all([Capture.findByPk(none), Shot.findByPk(none), Analysis.findByPk(none)])).catch(() => {});
  const shot = simulateShot({ length: 40_000, sampleInterval: 1e-6, seed: 7 });
  const capture = simulatedShotToCapture(shot);
  if (kind === 'ingest') {
    const [a, b] = shot.channels.map((c) => c.values);
    const lines = ['Time (s),Gate A (V),Gate B (V)'];
    for (let i = 0; i < a.length; i++) lines.push(`${(shot.time.t0 + i * shot.time.dt).toExponential(8)},${a[i].toFixed(5)},${b[i].toFixed(5)}`);
    const bytes = new TextEncoder().encode(`${lines.join('\n')}\n`);
    // Both readers an ingest uses: the disk reader for the local store, the stream reader for S3.
    const dir = await mkdtemp(path.join(tmpdir(), 'gatepost-warm-'));
    try {
      await writeFile(path.join(dir, 'warm.csv'), bytes);
      channelFilesOf(await readCaptureFile(path.join(dir, 'warm.csv')));
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
    channelFilesOf(await readCaptureStream((async function* () { yield bytes; })(), { sizeHint: bytes.length }));
  } else {
    analyzeShot(capture, { spacing: 0.1 });
  }
}
