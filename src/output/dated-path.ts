// Folder names by day (YYYY-MM-DD; UTC or the lab's zone) and collision-free target names for moves.
import { existsSync } from 'node:fs';
import { extname, join } from 'node:path';
import { localDateOf } from '../model/acquisition-time.js';

/** `YYYY-MM-DD` of `at` in `timeZone` (IANA or ±HH:MM; default UTC). */
export function dayFolderName(at: Date, timeZone = 'UTC'): string {
  return timeZone === 'UTC' ? at.toISOString().slice(0, 10) : localDateOf(at.getTime(), timeZone);
}

/** `name` itself for n = 0, else `stem~N.ext`: the names a move tries, in order, when a name is in use. */
export function numberedName(name: string, n: number): string {
  if (n === 0) return name;
  const ext = extname(name);
  return `${name.slice(0, name.length - ext.length)}~${n}${ext}`;
}

/** `dir/name`, or `dir/stem~N.ext` with the smallest N that does not exist yet. */
export function uniqueTarget(dir: string, name: string): string {
  for (let n = 0; ; n++) {
    const candidate = join(dir, numberedName(name, n));
    if (!existsSync(candidate)) return candidate;
  }
}
