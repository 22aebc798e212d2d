// Write-completion tracking for the event watcher: a file is reported once its size and mtime have
// not changed for the stability window (so a file still being written is never read). Each file
// costs one stat when it is touched and one when its quiet period ends, whatever the folder size.
import { lstatSync } from 'node:fs';
import { isGoneError } from '../output/fs-errors.js';

/** A file's size and modification time, as one stat read them. */
export interface FileStat {
  readonly sizeBytes: number;
  readonly mtimeMs: number;
}

interface Pending {
  sizeBytes: number;
  mtimeMs: number;
  /** When the file counts as stable if nothing changes before (epoch ms). */
  quietUntilMs: number;
}

/** Tracks files that were touched until each has been stable for `stabilityWindowMs`. */
export class StableFiles {
  private readonly pending = new Map<string, Pending>();
  private timer: NodeJS.Timeout | undefined;

  constructor(
    private readonly stabilityWindowMs: number,
    private readonly pollIntervalMs: number,
    private readonly onStable: (path: string, stat: FileStat) => void,
    private readonly now: () => number = Date.now,
    /** Told about a stat that failed for a reason other than the file being gone (EACCES, EIO, ENAMETOOLONG, …); the file is no longer tracked. Without it such an error is thrown. */
    private readonly onError?: (error: Error, path: string) => void,
  ) {}

  /** Notes that `path` was created or written (`stat`: its size and mtime when the caller just read them); it is reported after a quiet stability window. */
  touch(path: string, stat: FileStat | undefined = this.statOf(path)): void {
    if (stat === undefined) {
      this.pending.delete(path);
      return;
    }
    this.pending.set(path, {
      sizeBytes: stat.sizeBytes,
      mtimeMs: stat.mtimeMs,
      quietUntilMs: this.now() + this.stabilityWindowMs,
    });
    this.timer ??= setInterval(() => this.check(), this.pollIntervalMs);
  }

  /** Forgets `path` (removed or renamed away). */
  forget(path: string): void {
    this.pending.delete(path);
  }

  /** Whether `path` is still settling. */
  has(path: string): boolean {
    return this.pending.has(path);
  }

  /** Files still settling. */
  get size(): number {
    return this.pending.size;
  }

  /** Stops the timer and forgets every pending file. */
  close(): void {
    if (this.timer !== undefined) clearInterval(this.timer);
    this.timer = undefined;
    this.pending.clear();
  }

  /** Reports every file whose quiet period is over and whose size and mtime did not change; re-arms the others. */
  private check(): void {
    const nowMs = this.now();
    const stable: { path: string; stat: FileStat }[] = [];
    for (const [path, entry] of this.pending) {
      if (entry.quietUntilMs > nowMs) continue;
      const stat = this.statOf(path);
      if (stat === undefined) {
        this.pending.delete(path);
      } else if (stat.sizeBytes === entry.sizeBytes && stat.mtimeMs === entry.mtimeMs) {
        this.pending.delete(path);
        stable.push({ path, stat });
      } else {
        entry.sizeBytes = stat.sizeBytes;
        entry.mtimeMs = stat.mtimeMs;
        entry.quietUntilMs = nowMs + this.stabilityWindowMs;
      }
    }
    if (this.pending.size === 0 && this.timer !== undefined) {
      clearInterval(this.timer);
      this.timer = undefined;
    }
    for (const { path, stat } of stable) this.onStable(path, stat);
  }

  /** The size and mtime of `path`; undefined when it is gone or not a file (or the stat failed, reported to onError). */
  private statOf(path: string): FileStat | undefined {
    try {
      return statOrUndefined(path);
    } catch (error) {
      if (this.onError === undefined) throw error;
      this.onError(error instanceof Error ? error : new Error(String(error)), path);
      return undefined;
    }
  }
}

/** lstat's size and mtime of a file or symbolic link; undefined when gone (ENOENT, ENOTDIR) or not a file; other errors are thrown. */
function statOrUndefined(path: string): FileStat | undefined {
  try {
    // lstat: a symbolic link is judged as the link (intake refuses or resolves it), never followed here.
    const stat = lstatSync(path);
    return stat.isFile() || stat.isSymbolicLink() ? { sizeBytes: stat.size, mtimeMs: stat.mtimeMs } : undefined;
  } catch (error) {
    if (isGoneError(error)) return undefined;
    throw error;
  }
}
