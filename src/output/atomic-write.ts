// Durable file writes: write a temp file in the same folder, fsync it, rename over the target,
// fsync the folder. A reader never sees a half-written file; after return the file survives a crash.
import { closeSync, fsyncSync, mkdirSync, openSync, renameSync, rmSync, writeSync } from 'node:fs';
import { mkdir, open, rename, rm } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';

let counter = 0;

/** Writes `content` to `path` atomically (temp + rename) and, unless `durable` is false, durably (fsync of the file and its folder). */
export function writeFileAtomic(path: string, content: string | Uint8Array, options: { durable?: boolean } = {}): void {
  const durable = options.durable ?? true;
  const dir = dirname(path);
  mkdirSync(dir, { recursive: true });
  counter += 1;
  const temp = join(dir, `.${basename(path)}.${process.pid}.${counter}.tmp`);
  const fd = openSync(temp, 'w');
  try {
    const bytes = typeof content === 'string' ? Buffer.from(content, 'utf8') : content;
    let offset = 0;
    while (offset < bytes.length) offset += writeSync(fd, bytes, offset, bytes.length - offset);
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

/** fsyncs a directory so a rename in it is durable (best effort where the platform refuses). */
export function fsyncDirectory(dir: string): void {
  let fd: number | undefined;
  try {
    fd = openSync(dir, 'r');
    fsyncSync(fd);
  } catch {
    // Some platforms (Windows) cannot fsync a directory; the rename is still atomic there.
  } finally {
    if (fd !== undefined) closeSync(fd);
  }
}

/** Like writeFileAtomic (durable), but the fsyncs run on the libuv pool so the event loop keeps going. */
export async function writeFileAtomicAsync(path: string, content: string | Uint8Array): Promise<void> {
  const dir = dirname(path);
  await mkdir(dir, { recursive: true });
  counter += 1;
  const temp = join(dir, `.${basename(path)}.${process.pid}.${counter}.tmp`);
  const handle = await open(temp, 'w');
  try {
    await handle.writeFile(content);
    await handle.datasync();
  } catch (error) {
    await handle.close();
    await rm(temp, { force: true });
    throw error;
  }
  await handle.close();
  await rename(temp, path);
  await fsyncDirectoryAsync(dir);
}

/** fsyncs a directory on the libuv pool (best effort where the platform refuses). */
export async function fsyncDirectoryAsync(dir: string): Promise<void> {
  try {
    const handle = await open(dir, 'r');
    try {
      await handle.sync();
    } finally {
      await handle.close();
    }
  } catch {
    // Some platforms (Windows) cannot fsync a directory; the rename is still atomic there.
  }
}
