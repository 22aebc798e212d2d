// Empty inbox folders left behind (issue 20, item 9): an instrument that exports into a folder per
// day leaves one empty folder a day once driftlight has taken the files. `watch` removes a folder
// below the inbox that it took a file from, once the folder is empty and has not changed for the
// stability window (a writer may have just made it, or be about to add a file). Never the inbox
// itself, never a hidden folder, never a folder driftlight took nothing from (one an instrument
// made ahead of time), never a folder with anything left in it (rmdir refuses, so a file arriving
// meanwhile keeps it). Each removal is logged once.
import { lstatSync, readdirSync, rmdirSync } from 'node:fs';
import { basename, dirname, relative, isAbsolute } from 'node:path';
import { errnoCode, isGoneError } from '../output/fs-errors.js';

/** What the sweep logs with (a pino logger fits). */
export interface FolderLog {
  info(fields: Record<string, unknown>, message: string): void;
  warn(fields: Record<string, unknown>, message: string): void;
}

export class EmptyInboxFolders {
  /** Folders below the inbox that files were taken from, and their folders up to the inbox. */
  private readonly candidates = new Set<string>();

  constructor(
    private readonly inbox: string,
    private readonly stabilityWindowMs: number,
    private readonly log: FolderLog,
  ) {}

  /** Notes that the file at `path` was taken (its folders become candidates for removal). */
  taken(path: string): void {
    for (let dir = dirname(path); this.isBelowInbox(dir); dir = dirname(dir)) {
      if (basename(dir).startsWith('.')) return;
      this.candidates.add(dir);
    }
  }

  /**
   * Removes the candidate folders that are empty and unchanged for the stability window at `nowMs`
   * (epoch ms), deepest first (a day folder goes with its emptied sub-folders); returns them.
   * A folder with something left stays a candidate; one gone is forgotten.
   */
  sweep(nowMs: number): string[] {
    const removed: string[] = [];
    const deepestFirst = [...this.candidates].sort((a, b) => b.length - a.length || a.localeCompare(b));
    // Judged by the times before this sweep: removing a sub-folder changes its parent's time.
    const quiet = new Map(deepestFirst.map((dir) => [dir, this.quietSince(dir, nowMs)]));
    for (const dir of deepestFirst) {
      const outcome = this.tryRemove(dir, quiet.get(dir) ?? 'keep');
      if (outcome === 'keep') continue;
      this.candidates.delete(dir);
      if (outcome === 'removed') {
        removed.push(dir);
        this.log.info({ folder: dir }, 'removed an empty inbox folder (its files were taken)');
      }
    }
    return removed;
  }

  /** Folders waiting to be emptied. */
  get size(): number {
    return this.candidates.size;
  }

  /** Whether `dir` is a folder unchanged for the stability window ('quiet'), changed within it ('keep'), or gone. */
  private quietSince(dir: string, nowMs: number): 'quiet' | 'keep' | 'gone' {
    try {
      const stat = lstatSync(dir, { throwIfNoEntry: false });
      if (stat === undefined || !stat.isDirectory()) return 'gone';
      return nowMs - stat.mtimeMs < this.stabilityWindowMs ? 'keep' : 'quiet';
    } catch (error) {
      if (isGoneError(error)) return 'gone';
      return this.giveUp(dir, error);
    }
  }

  /** Logs why `dir` cannot be looked at or removed (EACCES, EIO, …) and forgets it. */
  private giveUp(dir: string, error: unknown): 'gone' {
    this.log.warn({ folder: dir, err: error }, 'could not remove an empty inbox folder; it is left');
    return 'gone';
  }

  private tryRemove(dir: string, quiet: 'quiet' | 'keep' | 'gone'): 'removed' | 'gone' | 'keep' {
    if (quiet !== 'quiet') return quiet;
    try {
      if (readdirSync(dir).length > 0) return 'keep';
      rmdirSync(dir);
      return 'removed';
    } catch (error) {
      if (isGoneError(error)) return 'gone';
      // A file arrived between the listing and the removal: the folder is in use again.
      const code = errnoCode(error);
      if (code === 'ENOTEMPTY' || code === 'EEXIST') return 'keep';
      return this.giveUp(dir, error);
    }
  }

  private isBelowInbox(dir: string): boolean {
    const rel = relative(this.inbox, dir);
    return rel !== '' && !rel.startsWith('..') && !isAbsolute(rel);
  }
}
