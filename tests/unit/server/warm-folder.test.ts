// The warm-ups' throwaway folders (server/lib/warm-folder.ts): one left by a process that is no longer running is
// removed by the next warm-up; those of running processes are not touched.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { warmFolder } from '../../../server/lib/warm-folder.ts';

const prefix = `gatepost-warmtest${process.pid}x${Date.now().toString(36)}`;
const made: string[] = [];
afterAll(() => {
  for (const dir of made) rmSync(dir, { recursive: true, force: true });
});

describe('warmFolder', () => {
  it('When a folder of a process that has ended is there, then it is removed; one of a running process stays', async () => {
    // A process id that has certainly ended: a child that has exited (and been reaped).
    const ended = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
    const deadPid = Number(ended.stdout);
    expect(deadPid).toBeGreaterThan(0);
    const stale = path.join(tmpdir(), `${prefix}-${deadPid}-abc123`);
    const live = path.join(tmpdir(), `${prefix}-${process.ppid}-def456`);
    for (const dir of [stale, live]) {
      mkdirSync(path.join(dir, 'blobs'), { recursive: true });
      writeFileSync(path.join(dir, 'blobs', 'x.f64'), 'x');
      made.push(dir);
    }

    const dir = await warmFolder(prefix);
    made.push(dir);

    expect(path.basename(dir)).toMatch(new RegExp(`^${prefix}-${process.pid}-[A-Za-z0-9]{6}$`));
    expect(existsSync(dir)).toBe(true);
    expect(existsSync(stale)).toBe(false);
    expect(existsSync(live)).toBe(true);
  });
});
