// Makes a folder unwritable for a test by putting a regular file in its place (creating anything in
// it then fails with ENOTDIR or EEXIST), which works as root too, unlike file modes. Like an
// unmounted share, the outage hides what the folder held and gives it back afterwards: the folder is
// moved aside, never deleted (deleting it destroyed results committed before the outage, which the
// fault campaign then counted as lost).
import { existsSync, mkdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';

const asideOf = (path: string): string => `${path}.outage-aside`;

/** Replaces the folder `path` with a regular file, keeping its contents aside for unblockFolder. */
export function blockFolder(path: string): void {
  if (existsSync(asideOf(path))) throw new Error(`blockFolder: ${path} is already blocked`);
  if (existsSync(path)) renameSync(path, asideOf(path));
  else mkdirSync(asideOf(path)); // not made yet: it comes back as an empty folder
  writeFileSync(path, 'a file where a folder belongs');
}

/** Gives back the folder `path` blocked by blockFolder, with everything it held before. */
export function unblockFolder(path: string): void {
  rmSync(path);
  renameSync(asideOf(path), path);
}
