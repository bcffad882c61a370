import type { Shot } from '../server/db/models/index.ts';
import { analyseReadFiles } from '../server/modules/analyses/service.ts';
import { settleShot } from '../server/modules/shots/settle-shot.ts';
import { workerContext } from './context.ts';

/**
 * After a capture of the shot finished reading, well or badly: the files that were read get their automatic
 * analysis once nothing else is being read, then the shot's status is written. So a bad file beside a good one
 * ends in a result, whichever of the two finishes last.
 */
export async function afterCaptureFinished(shotId: string): Promise<Shot | null> {
  await analyseReadFiles(workerContext(), shotId);
  return settleShot(shotId);
}
