// Moves an input file out of the inbox (archive or quarantine): rename, falling back to
// copy + fsync of the copy and of its folder + unlink across file systems, so a crash right after
// the unlink cannot lose the only copy. Idempotent when the source is already gone. The target
// folder is created only when the rename finds it missing. A symbolic link is moved as the link
// itself (never the file it points to, which may lie outside the inbox).
import {
  closeSync,
  copyFileSync,
  fsyncSync,
  lstatSync,
  mkdirSync,
  openSync,
  readlinkSync,
  renameSync,
  rmSync,
  symlinkSync,
} from 'node:fs';
import { dirname } from 'node:path';
import { fsyncDirectory } from './atomic-write.js';

/** The steps of a cross-file-system move, replaceable in tests (to see that the copy is durable before the unlink). */
export const crossDeviceSteps = {
  copy: (from: string, to: string): void => {
    if (lstatSync(from).isSymbolicLink()) symlinkSync(readlinkSync(from), to);
    else copyFileSync(from, to);
  },
  fsyncFile: (path: string): void => {
    const fd = openSync(path, 'r');
    try {
      fsyncSync(fd);
    } finally {
      closeSync(fd);
    }
  },
  fsyncFolder: (dir: string): void => fsyncDirectory(dir),
  unlink: (path: string): void => rmSync(path),
};

/** Copies `from` to `to` and makes the copy durable: fsync of the file, then of its folder (POSIX fsync(2); a rename alone is not durable until its folder is synced). */
export function durableCopy(from: string, to: string): void {
  crossDeviceSteps.copy(from, to);
  if (!lstatSync(to).isSymbolicLink()) crossDeviceSteps.fsyncFile(to);
  crossDeviceSteps.fsyncFolder(dirname(to));
}

function renameOrCopy(from: string, to: string): void {
  try {
    renameSync(from, to);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'EXDEV') throw error;
    durableCopy(from, to);
    crossDeviceSteps.unlink(from);
  }
}

/** Moves `from` to `to` (creating folders; fsyncs the target folder unless `syncFolder` is false); returns false when `from` no longer exists. */
export function moveFile(from: string, to: string, options: { syncFolder?: boolean } = {}): boolean {
  try {
    renameOrCopy(from, to);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'ENOENT') throw error;
    if (lstatSync(from, { throwIfNoEntry: false }) === undefined) return false;
    mkdirSync(dirname(to), { recursive: true });
    renameOrCopy(from, to);
  }
  if (options.syncFolder ?? true) fsyncDirectory(dirname(to));
  return true;
}
