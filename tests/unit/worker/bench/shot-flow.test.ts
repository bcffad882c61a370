import { describe, expect, it } from 'vitest';
import { formatShotLine, outcomeOf } from '../../../../worker/cli/bench/shot-flow.ts';
import { TransientError, withRetry } from '../../../../worker/cli/bench/api-client.ts';

const shot = { id: 's', number: 12, status: 'analysed', currentAnalysisId: 'a2' };

describe('outcomeOf', () => {
  it('When a file is still being read, or the newest version is not yet current, then there is no outcome yet', () => {
    expect(outcomeOf({ shot, captures: [{ fileName: 'a.csv', state: 'reading', error: null }], analyses: [], currentAnalysis: null })).toBeUndefined();
    expect(outcomeOf({ shot, captures: [{ fileName: 'a.csv', state: 'ready', error: null }], analyses: [{ id: 'a2', version: 2, state: 'done', error: null }], currentAnalysis: { id: 'a1', results: null } })).toBeUndefined();
  });

  it('When every file failed to read, then the reason names each file', () => {
    const o = outcomeOf({ shot, captures: [{ fileName: 'a.csv', state: 'failed', error: 'line 3: expected 2 numbers' }], analyses: [], currentAnalysis: null });
    expect(formatShotLine(o!, ['a.csv'])).toBe('shot #12  1 file (a.csv)  failed: a.csv: line 3: expected 2 numbers');
  });

  it('When the result is in, then the line has the speed rounded as on the pages (JCGM 100 §7.2.6), k = 2 and the method', () => {
    const o = outcomeOf({
      shot, captures: [{ fileName: 'a.csv', state: 'ready', error: null }, { fileName: 'b.csv', state: 'ready', error: null }],
      analyses: [{ id: 'a2', version: 2, state: 'done', error: null }],
      currentAnalysis: { id: 'a2', results: { speed: { value: 312.4137, uncertainty: 0.5213, method: 'flight', basis: 'pair' }, warnings: ['Gate C: missed'] } },
    });
    expect(formatShotLine(o!, ['a.csv', 'b.csv'])).toBe('shot #12  2 files (a.csv, b.csv)  312.41 ± 0.52 m/s (k = 2), time of flight, two gates; 1 warning: check before trusting');
  });

  it('When the analysis failed, then the line says so with the engine’s reason', () => {
    const o = outcomeOf({ shot, captures: [{ fileName: 'a.csv', state: 'ready', error: null }], analyses: [{ id: 'a2', version: 1, state: 'failed', error: 'gate channel "CH3" not found' }], currentAnalysis: null });
    expect(formatShotLine(o!, ['a.csv'])).toBe('shot #12  1 file (a.csv)  failed: analysis: gate channel "CH3" not found');
  });
});

describe('withRetry', () => {
  it('When the server is away twice, then it waits with doubling delays and returns the answer; other errors pass through', async () => {
    const waits: number[] = [];
    let calls = 0;
    const value = await withRetry(async () => {
      calls += 1;
      if (calls < 3) throw new TransientError('away');
      return 'ok';
    }, { initialDelayMs: 1, maxDelayMs: 3, onRetry: (_r, d) => waits.push(d) });
    expect(value).toBe('ok');
    expect(waits).toEqual([1, 2]);
    await expect(withRetry(async () => { throw new RangeError('bad'); })).rejects.toThrow('bad');
  });
});
