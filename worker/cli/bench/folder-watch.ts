/**
 * Notices new scope exports in a folder without trusting file-system events (network shares and some scopes' USB
 * exports do not send them): the folder is listed every `pollMs`; a file counts once its size and modification time
 * have not changed for `settleMs`; files whose modification times lie within `groupMs` of each other (one file per
 * channel, saved together) form one group, handed over once no further file of it can still be on its way.
 */
import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { readdir, stat } from 'node:fs/promises';
import { join } from 'node:path';

export interface SeenFile {
  path: string;
  name: string;
  size: number;
  mtimeMs: number;
}

export interface StableFile extends SeenFile {
  sha256: string;
}

export interface FolderWatchOptions {
  /** How often the folder is listed, ms. @default 250 */
  pollMs?: number;
  /** How long a file's size and time must stay the same before it counts, ms. @default 1000 */
  settleMs?: number;
  /** Files saved within this long of each other go to one shot, ms. @default 3000 */
  groupMs?: number;
  /** File name endings that are scope exports (case-insensitive). @default ['.csv', '.tsv', '.txt', '.dat'] */
  extensions?: string[];
}

export async function sha256OfFile(path: string): Promise<string> {
  const hash = createHash('sha256');
  for await (const chunk of createReadStream(path)) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

/**
 * Splits files into groups saved together: sorted by modification time, a gap longer than `groupMs` between two
 * neighbours starts a new group.
 */
export function groupBySaveTime<T extends { mtimeMs: number; name: string }>(files: T[], groupMs: number): T[][] {
  const sorted = [...files].sort((a, b) => a.mtimeMs - b.mtimeMs || a.name.localeCompare(b.name));
  const groups: T[][] = [];
  for (const f of sorted) {
    const last = groups.at(-1);
    if (last && f.mtimeMs - last[last.length - 1].mtimeMs <= groupMs) last.push(f);
    else groups.push([f]);
  }
  return groups;
}

interface Tracked { seen: SeenFile; changedAt: number; state: 'settling' | 'ready' | 'done' }

/**
 * The folder's state between two listings. `poll(now)` lists the folder and returns the groups that are complete:
 * every file in them stable, and `groupMs` passed since the newest of them was saved, with no file still settling
 * that could belong to them.
 */
export class FolderWatch {
  private readonly tracked = new Map<string, Tracked>();
  private readonly ready = new Map<string, StableFile>();
  readonly pollMs: number;
  private readonly settleMs: number;
  private readonly groupMs: number;
  private readonly extensions: string[];

  constructor(readonly folder: string, options: FolderWatchOptions = {}) {
    this.pollMs = options.pollMs ?? 250;
    this.settleMs = options.settleMs ?? 1000;
    this.groupMs = options.groupMs ?? 3000;
    this.extensions = (options.extensions ?? ['.csv', '.tsv', '.txt', '.dat']).map((e) => e.toLowerCase());
  }

  private wanted(name: string): boolean {
    const lower = name.toLowerCase();
    return !name.startsWith('.') && !name.startsWith('~') && this.extensions.some((e) => lower.endsWith(e));
  }

  private async list(): Promise<SeenFile[]> {
    const names = (await readdir(this.folder)).filter((n) => this.wanted(n));
    const out: SeenFile[] = [];
    for (const name of names) {
      const path = join(this.folder, name);
      try {
        const s = await stat(path);
        if (s.isFile()) out.push({ path, name, size: s.size, mtimeMs: s.mtimeMs });
      } catch {
        // removed between the listing and the look
      }
    }
    return out;
  }

  /** Files already handled (uploaded earlier, or passed over) are not looked at again unless they change. */
  markDone(path: string): void {
    const t = this.tracked.get(path);
    if (t) t.state = 'done';
    this.ready.delete(path);
  }

  /** Passes over the files in the folder now (until they change); returns how many. */
  async ignoreExisting(): Promise<number> {
    const listed = await this.list();
    for (const f of listed) this.tracked.set(f.path, { seen: f, changedAt: Date.now(), state: 'done' });
    return listed.length;
  }

  async poll(now = Date.now()): Promise<StableFile[][]> {
    const listed = await this.list();
    const present = new Set(listed.map((f) => f.path));
    for (const [path] of this.tracked) {
      if (!present.has(path)) {
        this.tracked.delete(path);
        this.ready.delete(path);
      }
    }
    for (const f of listed) {
      const t = this.tracked.get(f.path);
      if (!t) {
        this.tracked.set(f.path, { seen: f, changedAt: now, state: 'settling' });
      } else if (t.seen.size !== f.size || t.seen.mtimeMs !== f.mtimeMs) {
        // Changed (still being written, or overwritten later): it must settle again.
        t.seen = f;
        t.changedAt = now;
        t.state = 'settling';
        this.ready.delete(f.path);
      }
    }
    for (const t of this.tracked.values()) {
      if (t.state !== 'settling' || t.seen.size === 0 || now - t.changedAt < this.settleMs) continue;
      const sha256 = await sha256OfFile(t.seen.path).catch(() => null);
      if (!sha256) continue;
      t.state = 'ready';
      this.ready.set(t.seen.path, { ...t.seen, sha256 });
    }
    const settling = [...this.tracked.values()].filter((t) => t.state === 'settling');
    const complete: StableFile[][] = [];
    for (const group of groupBySaveTime([...this.ready.values()], this.groupMs)) {
      const newest = group[group.length - 1].mtimeMs;
      // A file still being written close in time to the group may yet belong to it.
      const waiting = settling.some((t) => t.seen.mtimeMs >= group[0].mtimeMs - this.groupMs && t.seen.mtimeMs <= newest + this.groupMs);
      if (waiting || now - newest < this.groupMs) continue;
      for (const f of group) this.markDone(f.path);
      complete.push(group);
    }
    return complete;
  }
}
