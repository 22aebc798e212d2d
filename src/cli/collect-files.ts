// Lists the input files under the paths given to `driftlight process` (folders recursively;
// hidden, temporary and sidecar files skipped), in a stable order with manifests last.
import { lstatSync, readdirSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { isIgnoredFile } from '../pipeline/ignore.js';

/** Every readable input file under `paths`, sorted by path. */
export function collectFiles(paths: readonly string[]): string[] {
  const out: string[] = [];
  const visit = (path: string, given = false): void => {
    // A path given on the command line is followed; below it, symbolic links are not (a linked
    // folder is not entered, a linked file is listed as the link and refused at intake).
    const stat = given ? statSync(path) : lstatSync(path);
    if (stat.isSymbolicLink()) {
      if (!isIgnoredFile(path)) out.push(path);
    } else if (stat.isDirectory()) {
      for (const entry of readdirSync(path).sort()) {
        if (entry.startsWith('.')) continue;
        visit(join(path, entry));
      }
    } else if (stat.isFile() && !isIgnoredFile(path)) {
      out.push(path);
    }
  };
  for (const p of paths) visit(resolve(p), true);
  return out.sort();
}
