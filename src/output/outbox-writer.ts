// Outbox: corrected spectra (CSV, JCAMP-DX) and fitted decays produced by the analysis, written
// under outbox/YYYY-MM-DD/<setId>/ for downstream tools. A set's folder appears whole: its files are
// written into a hidden temporary folder beside it (`.<setId>.<pid>.<n>.tmp`), which is then renamed
// into place, so a tool watching the outbox never finds a set folder with some of its files missing.
// A re-run whose set folder exists already replaces each file atomically instead.
import { closeSync, mkdirSync, openSync, renameSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { inFolder, tempPathFor, writeAll, writeFileAtomic } from './atomic-write.js';
import { dayFolderName } from './dated-path.js';

/** One file the analysis produced for the outbox (text content). */
export interface OutboxArtifact {
  /** File name, e.g. `emission.corrected.csv`. */
  readonly name: string;
  readonly content: string;
}

/** The file name an artifact gets in its set folder (path separators replaced, so it cannot leave the folder). */
function fileNameOf(artifact: OutboxArtifact): string {
  return artifact.name.replace(/[/\\]/g, '_');
}

/** Writes `content` into a new file at `path` (no temp file: its folder is not visible yet). */
function writeNewFile(path: string, content: string): void {
  const fd = openSync(path, 'w');
  try {
    writeAll(fd, content);
  } finally {
    closeSync(fd);
  }
}

/** Whether a rename failed because its target is a folder that already holds files. */
function isOccupied(error: unknown): boolean {
  const code = (error as NodeJS.ErrnoException | undefined)?.code;
  return code === 'ENOTEMPTY' || code === 'EEXIST';
}

/**
 * Writes every artifact of a set into outbox/YYYY-MM-DD/<setId>/ (the day of `filedAt`, the set's acquisition time, in `timeZone`) and returns the paths written. A new
 * set folder is filled while hidden and renamed into place whole (one rename for the set, not one per
 * file); an existing one (a re-run) gets each file replaced atomically. Not fsynced: the result JSON
 * is the durable record, and outbox files are rewritten on a re-run. A crash can leave a hidden
 * `.<setId>.*.tmp` folder in the day folder, which downstream tools skip as they skip any dot-folder.
 */
export function writeOutbox(
  outboxDir: string,
  setId: string,
  filedAt: Date,
  artifacts: readonly OutboxArtifact[],
  timeZone = 'UTC',
): string[] {
  if (artifacts.length === 0) return [];
  const dayDir = join(outboxDir, dayFolderName(filedAt, timeZone));
  const dir = join(dayDir, setId);
  const names = artifacts.map(fileNameOf);
  const temp = tempPathFor(dir);
  inFolder(dayDir, () => mkdirSync(temp));
  try {
    artifacts.forEach((artifact, i) => writeNewFile(join(temp, names[i] ?? ''), artifact.content));
  } catch (error) {
    rmSync(temp, { recursive: true, force: true });
    throw error;
  }
  try {
    renameSync(temp, dir);
  } catch (error) {
    rmSync(temp, { recursive: true, force: true });
    if (!isOccupied(error)) throw error;
    // The set folder exists with files in it (a re-run): replace each file atomically.
    artifacts.forEach((artifact, i) =>
      writeFileAtomic(join(dir, names[i] ?? ''), artifact.content, { durable: false }),
    );
  }
  return names.map((name) => join(dir, name));
}
