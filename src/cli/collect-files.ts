// Lists the input files under the paths given to `driftlight process` (folders recursively;
// hidden, temporary and sidecar files skipped), in a stable order with manifests last.
import { readdirSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { isIgnoredFile } from '../pipeline/ignore.js';

/** Every readable input file under `paths`, sorted by path. */
export function collectFiles(paths: readonly string[]): string[] {
  const out: string[] = [];
  const visit = (path: string): void => {
    const stat = statSync(path);
    if (stat.isDirectory()) {
      for (const entry of readdirSync(path).sort()) {
        if (entry.startsWith('.')) continue;
        visit(join(path, entry));
      }
    } else if (stat.isFile() && !isIgnoredFile(path)) {
      out.push(path);
    }
  };
  for (const p of paths) visit(resolve(p));
  return out.sort();
}
