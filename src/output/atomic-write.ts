// Durable file writes: write a temp file in the same folder, fsync it, rename over the target,
// fsync the folder. A reader never sees a half-written file; after return the file survives a crash.
// Folders are created only when an operation finds them missing (ENOENT), so the common path costs
// no mkdir. The async variant does its small writes synchronously (page cache) and sends only the
// fsyncs to the libuv pool: one hand-off per file instead of one per call.
import { closeSync, fdatasync, fsync, fsyncSync, mkdirSync, openSync, renameSync, rmSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { errnoCode, FOLDER_FSYNC_UNSUPPORTED_CODES } from './fs-errors.js';

let counter = 0;

/** Runs `operation`; when it fails with ENOENT, creates `dir` (recursively) and runs it once more. */
export function inFolder<T>(dir: string, operation: () => T): T {
  try {
    return operation();
  } catch (error) {
    if (errnoCode(error) !== 'ENOENT') throw error;
    mkdirSync(dir, { recursive: true });
    return operation();
  }
}

/** A new hidden temporary path beside `path` (`.NAME.PID.N.tmp`), for a file or folder renamed onto `path` once written. */
export function tempPathFor(path: string): string {
  counter += 1;
  return join(dirname(path), `.${basename(path)}.${process.pid}.${counter}.tmp`);
}

/** Writes all of `content` (UTF-8 for a string) to the open file `fd`. */
export function writeAll(fd: number, content: string | Uint8Array): void {
  const bytes = typeof content === 'string' ? Buffer.from(content, 'utf8') : content;
  let offset = 0;
  while (offset < bytes.length) offset += writeSync(fd, bytes, offset, bytes.length - offset);
}

/** Writes `content` to `path` atomically (temp + rename) and, unless `durable` is false, durably (fsync of the file and its folder). */
export function writeFileAtomic(path: string, content: string | Uint8Array, options: { durable?: boolean } = {}): void {
  const durable = options.durable ?? true;
  const dir = dirname(path);
  const temp = tempPathFor(path);
  const fd = inFolder(dir, () => openSync(temp, 'w'));
  try {
    writeAll(fd, content);
    if (durable) fsyncSync(fd);
  } catch (error) {
    closeSync(fd);
    rmSync(temp, { force: true });
    throw error;
  }
  closeSync(fd);
  renameSync(temp, path);
  if (durable) fsyncDirectory(dir);
}

/** fsyncs a directory so a rename in it is durable (skipped where the platform refuses: FOLDER_FSYNC_UNSUPPORTED_CODES; other errors are thrown). */
export function fsyncDirectory(dir: string): void {
  let fd: number | undefined;
  try {
    fd = openSync(dir, 'r');
    fsyncSync(fd);
  } catch (error) {
    // Some platforms (Windows) and file systems refuse to fsync a folder: the rename is still atomic
    // there. Any other failure (EIO, ENOSPC, the folder gone) means the rename is not known durable.
    if (!FOLDER_FSYNC_UNSUPPORTED_CODES.has(errnoCode(error) ?? '')) throw error;
  } finally {
    if (fd !== undefined) closeSync(fd);
  }
}

function fdatasyncAsync(fd: number): Promise<void> {
  return new Promise((resolve, reject) => fdatasync(fd, (error) => (error === null ? resolve() : reject(error))));
}

/**
 * Like writeFileAtomic (durable), with the fsync on the libuv pool so the event loop keeps going.
 * With `syncFolder: false` the caller fsyncs the folder itself (fsyncDirectoryAsync), once for many
 * files written together; until then the rename is atomic but not yet durable.
 */
export async function writeFileAtomicAsync(
  path: string,
  content: string | Uint8Array,
  options: { syncFolder?: boolean } = {},
): Promise<void> {
  const dir = dirname(path);
  const temp = tempPathFor(path);
  const fd = inFolder(dir, () => openSync(temp, 'w'));
  try {
    writeAll(fd, content);
    await fdatasyncAsync(fd);
  } catch (error) {
    closeSync(fd);
    rmSync(temp, { force: true });
    throw error;
  }
  closeSync(fd);
  renameSync(temp, path);
  if (options.syncFolder ?? true) await fsyncDirectoryAsync(dir);
}

/** fsyncs a directory on the libuv pool (skipped where the platform refuses: FOLDER_FSYNC_UNSUPPORTED_CODES; other errors are thrown). */
export async function fsyncDirectoryAsync(dir: string): Promise<void> {
  let fd: number | undefined;
  try {
    fd = openSync(dir, 'r');
    const opened = fd;
    await new Promise<void>((resolve, reject) =>
      fsync(opened, (error) => (error === null ? resolve() : reject(error))),
    );
  } catch (error) {
    // Some platforms (Windows) and file systems refuse to fsync a folder: the rename is still atomic
    // there. Any other failure (EIO, ENOSPC, the folder gone) means the rename is not known durable.
    if (!FOLDER_FSYNC_UNSUPPORTED_CODES.has(errnoCode(error) ?? '')) throw error;
  } finally {
    if (fd !== undefined) closeSync(fd);
  }
}
