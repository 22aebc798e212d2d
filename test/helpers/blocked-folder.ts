// Makes a folder unwritable for a test by putting a regular file in its place (creating anything in
// it then fails with ENOTDIR or EEXIST), which works as root too, unlike file modes.
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';

/** Replaces the folder `path` (and its contents) with a regular file. */
export function blockFolder(path: string): void {
  rmSync(path, { recursive: true, force: true, maxRetries: 20, retryDelay: 50 });
  writeFileSync(path, 'a file where a folder belongs');
}

/** Makes `path`, blocked by blockFolder, an empty folder again. */
export function unblockFolder(path: string): void {
  rmSync(path);
  mkdirSync(path);
}
