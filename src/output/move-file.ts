// Moves an input file out of the inbox (archive or quarantine): rename, falling back to
// copy + fsync + unlink across file systems. Idempotent when the source is already gone. The target
// folder is created only when the rename finds it missing.
import { copyFileSync, existsSync, mkdirSync, renameSync, rmSync } from 'node:fs';
import { dirname } from 'node:path';
import { fsyncDirectory } from './atomic-write.js';

function renameOrCopy(from: string, to: string): void {
  try {
    renameSync(from, to);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'EXDEV') throw error;
    copyFileSync(from, to);
    rmSync(from);
  }
}

/** Moves `from` to `to` (creating folders; fsyncs the target folder unless `syncFolder` is false); returns false when `from` no longer exists. */
export function moveFile(from: string, to: string, options: { syncFolder?: boolean } = {}): boolean {
  try {
    renameOrCopy(from, to);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'ENOENT') throw error;
    if (!existsSync(from)) return false;
    mkdirSync(dirname(to), { recursive: true });
    renameOrCopy(from, to);
  }
  if (options.syncFolder ?? true) fsyncDirectory(dirname(to));
  return true;
}
