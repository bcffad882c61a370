// Issue 12, item 7: a crashed long-lived child of `npm start` (worker, API server) is restarted with a growing wait
// and logged, while its supervisor and everything else keep running. Real child processes, killed with SIGKILL.
import { describe, expect, it } from 'vitest';
import { superviseChild } from '../../../scripts/lib/processes.ts';

const isAlive = (pid: number): boolean => {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
};

async function waitFor<T>(look: () => T | undefined, what: string, timeoutMs = 10_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = look();
    if (value !== undefined) return value;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((resolve) => setTimeout(resolve, 20));
  }
}

describe('superviseChild', () => {
  it('When the child is killed with SIGKILL twice, then it is started again each time, the wait doubling, and stop ends it for good', async () => {
    const lines: string[] = [];
    const child = superviseChild({
      name: 'worker', command: process.execPath, args: ['-e', 'setInterval(() => {}, 1000)'], echo: false,
      backoffMs: 50, maxBackoffMs: 80, say: (line) => lines.push(line),
    });
    try {
      const first = child.current().pid;
      process.kill(first, 'SIGKILL');
      const second = await waitFor(() => (child.restarts() === 1 ? child.current().pid : undefined), 'the first restart');
      expect(second).not.toBe(first);
      expect(isAlive(second)).toBe(true);
      process.kill(second, 'SIGKILL');
      const third = await waitFor(() => (child.restarts() === 2 ? child.current().pid : undefined), 'the second restart');
      process.kill(third, 'SIGKILL');
      await waitFor(() => (child.restarts() === 3 ? true : undefined), 'the third restart');
      expect(lines.slice(0, 6)).toEqual([
        '[worker] exited (signal SIGKILL); restarting in 0.05 s',
        `[worker] restarted (pid ${second}, restart 1)`,
        '[worker] exited (signal SIGKILL); restarting in 0.08 s',
        `[worker] restarted (pid ${third}, restart 2)`,
        // Doubled again, but capped at maxBackoffMs.
        '[worker] exited (signal SIGKILL); restarting in 0.08 s',
        `[worker] restarted (pid ${child.current().pid}, restart 3)`,
      ]);
    } finally {
      const last = child.current().pid;
      await child.stop(2_000);
      expect(isAlive(last)).toBe(false);
    }
    // Stopped on purpose: no restart follows.
    await new Promise((resolve) => setTimeout(resolve, 200));
    expect(child.restarts()).toBe(3);
  });
});
