// The warm-up a process runs before its first real shot (shared/simulate/warm-up-shot.ts) must reach the paths a deep
// record takes: the levels' and the noise's passes over every n-th sample (records of more than two million samples).
import { describe, expect, it } from 'vitest';
import { stateLevels } from '../../../shared/analysis/state-levels.ts';
import { warmUpDeepPasses, warmUpShot } from '../../../shared/simulate/warm-up-shot.ts';

describe('warmUpDeepPasses', () => {
  it('When warming up on the warm-up shot, then the levels take every tenth sample, as on a deep record, and nothing is changed', () => {
    const shot = warmUpShot(20_000);
    const channels = shot.channels.map((c) => c.values);
    const before = channels.map((v) => Float64Array.from(v));
    expect(stateLevels(channels[0]).stride).toBe(1); // the engine on the warm-up shot itself: every sample
    expect(warmUpDeepPasses(channels)).toEqual([10, 10, 10, 10]); // two rounds, two channels
    expect(stateLevels(new Float64Array(10_000_000)).stride).toBe(10); // the 10-million-sample capture's stride
    channels.forEach((v, k) => expect(v).toEqual(before[k]));
  });
});
