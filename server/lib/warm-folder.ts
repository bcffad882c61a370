import { mkdtemp, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';

/** Whether a process with this id is running (one of another user counts as running). */
function running(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * A throwaway folder in the system's temporary folder for a warm-up (`<prefix>-<pid>-XXXXXX`). A process stopped
 * while it warmed up leaves its folder behind (up to about 20 MB each); those of processes no longer running are
 * removed here first, so they do not pile up over restarts.
 */
export async function warmFolder(prefix: string): Promise<string> {
  const base = tmpdir();
  const pattern = new RegExp(`^${prefix}-(\\d+)-[^-]+$`);
  for (const name of await readdir(base).catch(() => [] as string[])) {
    const pid = Number(pattern.exec(name)?.[1]);
    if (Number.isInteger(pid) && pid > 0 && pid !== process.pid && !running(pid)) {
      await rm(path.join(base, name), { recursive: true, force: true }).catch(() => {});
    }
  }
  return mkdtemp(path.join(base, `${prefix}-${process.pid}-`));
}
