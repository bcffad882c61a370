import { appendFileSync, mkdtempSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { FolderWatch, groupBySaveTime } from '../../../../worker/cli/bench/folder-watch.ts';
import { Journal } from '../../../../worker/cli/bench/journal.ts';

describe('groupBySaveTime', () => {
  it('When files are saved within the window of their neighbour, then they form one group; a longer gap starts the next', () => {
    const f = (name: string, s: number) => ({ name, mtimeMs: s * 1000 });
    const groups = groupBySaveTime([f('c', 10), f('a', 0), f('b', 2.5), f('d', 11)], 3000);
    expect(groups.map((g) => g.map((x) => x.name))).toEqual([['a', 'b'], ['c', 'd']]);
    expect(groupBySaveTime([], 3000)).toEqual([]);
  });
});

describe('FolderWatch', () => {
  let dir: string;
  beforeEach(() => {
    dir = mkdtempSync(path.join(tmpdir(), 'gatepost-watch-'));
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  // The clock is passed in; file times are set with utimes, so nothing here waits.
  const setTime = (name: string, ms: number) => utimesSync(path.join(dir, name), ms / 1000, ms / 1000);

  it('When a file is still growing, then it does not count; once it has kept its size for the settle time, it does', async () => {
    const w = new FolderWatch(dir, { settleMs: 1000, groupMs: 3000 });
    const t0 = 1_800_000_000_000;
    writeFileSync(path.join(dir, 'ch1.csv'), 'Time,CH1\n');
    setTime('ch1.csv', t0);
    expect(await w.poll(t0)).toEqual([]);
    appendFileSync(path.join(dir, 'ch1.csv'), '0,1\n');
    setTime('ch1.csv', t0 + 900);
    expect(await w.poll(t0 + 900)).toEqual([]); // changed: settles again from now
    expect(await w.poll(t0 + 1800)).toEqual([]); // 900 ms unchanged: not yet
    expect(await w.poll(t0 + 2000)).toEqual([]); // stable now, but a channel file saved together could still come
    const groups = await w.poll(t0 + 900 + 3000);
    expect(groups.map((g) => g.map((f) => [f.name, f.size]))).toEqual([[['ch1.csv', 13]]]);
    expect(groups[0][0].sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(await w.poll(t0 + 10_000)).toEqual([]); // handed over once
  });

  it('When two channel files are saved together and a third later, then the first two go as one group and the third alone', async () => {
    const w = new FolderWatch(dir, { settleMs: 500, groupMs: 2000 });
    const t0 = 1_800_000_000_000;
    for (const [name, at] of [['ch1.csv', t0], ['ch2.csv', t0 + 1200], ['notes.md', t0], ['.hidden.csv', t0]] as const) {
      writeFileSync(path.join(dir, name), `${name}\n`);
      setTime(name, at);
    }
    await w.poll(t0 + 1200);
    const first = await w.poll(t0 + 1200 + 2000);
    expect(first.map((g) => g.map((f) => f.name))).toEqual([['ch1.csv', 'ch2.csv']]);
    writeFileSync(path.join(dir, 'ch1-next.CSV'), 'next\n');
    setTime('ch1-next.CSV', t0 + 60_000);
    await w.poll(t0 + 60_000);
    expect((await w.poll(t0 + 63_000)).map((g) => g.map((f) => f.name))).toEqual([['ch1-next.CSV']]);
  });

  it('When files were already there and are passed over, then they are not handed over unless they change', async () => {
    writeFileSync(path.join(dir, 'old.csv'), 'old\n');
    const w = new FolderWatch(dir, { settleMs: 0, groupMs: 0 });
    expect(await w.ignoreExisting()).toBe(1);
    expect(await w.poll(Date.now() + 10_000)).toEqual([]);
  });
});

describe('Journal', () => {
  it('When it is read again, then it remembers shots and file hashes, and skips a line cut short', () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'gatepost-journal-'));
    try {
      const file = Journal.besideFolder(path.join(dir, 'scope'));
      expect(file).toBe(path.join(dir, '.scope.gatepost-journal'));
      const j = new Journal(file);
      j.recordShot('g1', 'shot-1', 7);
      j.recordFile('ab'.repeat(32), 'ch1.csv', 'shot-1');
      appendFileSync(file, '{"kind":"file","sha2');
      const again = new Journal(file);
      expect(again.shotOfGroup('g1')).toMatchObject({ shotId: 'shot-1', number: 7 });
      expect(again.uploaded('ab'.repeat(32))).toMatchObject({ name: 'ch1.csv' });
      expect(again.uploaded('cd'.repeat(32))).toBeUndefined();
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
