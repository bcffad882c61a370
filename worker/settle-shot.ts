import type { Transaction } from 'sequelize';
import type { Shot } from '../server/db/models/index.ts';
import { endCaptureRead } from '../server/modules/shots/end-capture-read.ts';
import { workerContext } from './context.ts';

/**
 * A capture of the shot finished reading, well or badly: `write` records how (under the shot's row lock, in the
 * same transaction as what follows; see endCaptureRead), then the files that were read get their automatic
 * analysis once nothing else is being read, and the shot's status is written. So a bad file beside a good one ends
 * in a result, whichever of the two finishes last, and the shot never reads "failed" while the version is on its
 * way. Without `write` (the sweep), only the missing version and the status are made. Returns the shot (null when
 * it is gone), whether `write` wrote, and whether the shot's status changed.
 */
export async function afterCaptureFinished(
  shotId: string,
  write?: (transaction: Transaction) => Promise<boolean>,
): Promise<{ shot: Shot | null; written: boolean; statusChanged: boolean }> {
  const { shot, written, statusChanged } = await endCaptureRead(workerContext(), shotId, { write });
  return { shot, written, statusChanged };
}
