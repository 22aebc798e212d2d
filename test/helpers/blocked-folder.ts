// Makes a folder unwritable for a test by putting a regular file in its place (creating anything in
// it then fails with ENOTDIR or EEXIST), which works as root too, unlike file modes. Like an
// unmounted share, the outage hides what the folder held and gives it back afterwards: the folder is
// moved aside, never deleted (deleting it destroyed results committed before the outage, which the
// fault campaign then counted as lost).
import { existsSync, mkdirSync, readdirSync, renameSync, rmdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

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
  try {
    renameSync(asideOf(path), path);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    if (code !== 'ENOTEMPTY' && code !== 'EEXIST') throw error;
    // The program under test made the folder again between the two calls (a retried write once the
    // file was gone): what it held goes back in beside what was written since, nothing is deleted.
    moveInto(asideOf(path), path);
  }
}

/** Moves every entry of folder `from` into folder `to` (merging sub-folders; an entry already in `to` is the newer one and stays), then removes `from`. */
function moveInto(from: string, to: string): void {
  for (const name of readdirSync(from)) {
    const source = join(from, name);
    const target = join(to, name);
    if (!existsSync(target)) renameSync(source, target);
    else if (statSync(source).isDirectory() && statSync(target).isDirectory()) moveInto(source, target);
    else rmSync(source);
  }
  rmdirSync(from);
}
