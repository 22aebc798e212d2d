// Stale temporary files of interrupted atomic writes (`.NAME.PID.N.tmp`, see atomic-write.ts): a
// process killed between writing a temporary file (or folder) and renaming it into place leaves it
// behind. At start they are removed, unless the process that made them is still running.
import { readdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';

/** `.NAME.PID.N.tmp`: the writer's pid is the second number from the end. */
const TEMP_NAME = /^\..+\.(\d+)\.\d+\.tmp$/;

/** The pid that wrote the temporary file `name`, or undefined when it is not one of ours. */
export function tempWriterPid(name: string): number | undefined {
  const match = TEMP_NAME.exec(name);
  return match === null ? undefined : Number.parseInt(match[1] ?? '', 10);
}

/**
 * Removes the temporary files and folders of interrupted atomic writes under `folders` (searched to
 * `depth` levels: the folder and its day folders) whose writer is neither this process nor alive
 * (`alive`). Returns the paths removed. Folders that do not exist are skipped.
 */
export function removeStaleTempFiles(folders: readonly string[], alive: (pid: number) => boolean, depth = 2): string[] {
  const removed: string[] = [];
  const visit = (dir: string, level: number): void => {
    let entries;
    try {
      entries = readdirSync(dir, { withFileTypes: true });
    } catch {
      return;
    }
    for (const entry of entries) {
      const path = join(dir, entry.name);
      const pid = tempWriterPid(entry.name);
      if (pid !== undefined) {
        if (pid === process.pid || alive(pid)) continue;
        rmSync(path, { recursive: true, force: true });
        removed.push(path);
      } else if (entry.isDirectory() && level < depth && !entry.name.startsWith('.')) {
        visit(path, level + 1);
      }
    }
  };
  for (const folder of folders) visit(folder, 1);
  return removed;
}
