/**
 * The uploader's memory, one JSON object a line, appended and never rewritten (a crash loses at most the line being
 * written): which shot each group of files went to, and the content hash of every file the server has accepted.
 * A file whose hash is here is never uploaded again, under any name.
 */
import { appendFileSync, existsSync, readFileSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';

export type JournalEntry =
  | { kind: 'shot'; group: string; shotId: string; number: number; at: string }
  | { kind: 'file'; sha256: string; name: string; shotId: string; at: string };

export class Journal {
  private readonly files = new Map<string, Extract<JournalEntry, { kind: 'file' }>>();
  private readonly shots = new Map<string, Extract<JournalEntry, { kind: 'shot' }>>();

  constructor(readonly path: string) {
    if (!existsSync(path)) return;
    for (const line of readFileSync(path, 'utf8').split('\n')) {
      if (!line.trim()) continue;
      let entry: JournalEntry;
      try {
        entry = JSON.parse(line) as JournalEntry;
      } catch {
        continue; // a line cut short by a crash: what it recorded is done again, and the server deduplicates
      }
      if (entry.kind === 'file') this.files.set(entry.sha256, entry);
      else if (entry.kind === 'shot') this.shots.set(entry.group, entry);
    }
  }

  /** Where the journal of a watched folder lives: beside it, named after it (the scope's folder stays untouched). */
  static besideFolder(folder: string): string {
    const abs = resolve(folder);
    return join(dirname(abs), `.${basename(abs)}.gatepost-journal`);
  }

  uploaded(sha256: string) {
    return this.files.get(sha256);
  }

  shotOfGroup(group: string) {
    return this.shots.get(group);
  }

  recordShot(group: string, shotId: string, number: number): void {
    this.append({ kind: 'shot', group, shotId, number, at: new Date().toISOString() });
  }

  recordFile(sha256: string, name: string, shotId: string): void {
    this.append({ kind: 'file', sha256, name, shotId, at: new Date().toISOString() });
  }

  private append(entry: JournalEntry): void {
    appendFileSync(this.path, `${JSON.stringify(entry)}\n`, { mode: 0o600 });
    if (entry.kind === 'file') this.files.set(entry.sha256, entry);
    else this.shots.set(entry.group, entry);
  }
}
