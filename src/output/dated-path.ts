// Folder names by day (YYYY-MM-DD, UTC) and collision-free target names for moves.
import { existsSync } from 'node:fs';
import { extname, join } from 'node:path';

/** `YYYY-MM-DD` of `at` in UTC. */
export function dayFolderName(at: Date): string {
  return at.toISOString().slice(0, 10);
}

/** `dir/name`, or `dir/stem~N.ext` with the smallest N that does not exist yet. */
export function uniqueTarget(dir: string, name: string): string {
  let candidate = join(dir, name);
  if (!existsSync(candidate)) return candidate;
  const ext = extname(name);
  const stemPart = name.slice(0, name.length - ext.length);
  for (let n = 1; ; n++) {
    candidate = join(dir, `${stemPart}~${n}${ext}`);
    if (!existsSync(candidate)) return candidate;
  }
}
