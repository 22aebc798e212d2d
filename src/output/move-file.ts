// Moves an input file out of the inbox (archive or quarantine): rename, falling back to
// copy + fsync + unlink across file systems. Idempotent when the source is already gone.
import { copyFileSync, existsSync, mkdirSync, renameSync, rmSync } from 'node:fs';
import { dirname } from 'node:path';
import { fsyncDirectory } from './atomic-write.js';

/** Moves `from` to `to` (creating folders; fsyncs the target folder unless `syncFolder` is false); returns false when `from` no longer exists. */
export function moveFile(from: string, to: string, options: { syncFolder?: boolean } = {}): boolean {
  if (!existsSync(from)) return false;
  mkdirSync(dirname(to), { recursive: true });
  try {
    renameSync(from, to);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'EXDEV') throw error;
    copyFileSync(from, to);
    rmSync(from);
  }
  if (options.syncFolder ?? true) fsyncDirectory(dirname(to));
  return true;
}
