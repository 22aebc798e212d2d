// Which inbox files are never read: hidden files, temporary and partial downloads, our own
// sidecars, and user-configured glob patterns.
import { basename } from 'node:path';

const TEMPORARY = [
  /^\./,
  /~$/,
  /^~\$/,
  /\.(tmp|temp|part|partial|crdownload|download|swp|swx|lock|lck)$/i,
  /\.error\.json$/i,
];

/** Compiles `*`/`?` globs (matched against the file name) into regular expressions. */
export function compileGlobs(globs: readonly string[]): RegExp[] {
  return globs.map(
    (glob) =>
      new RegExp(
        `^${glob
          .replace(/[.+^${}()|[\]\\]/g, '\\$&')
          .replace(/\*/g, '.*')
          .replace(/\?/g, '.')}$`,
        'i',
      ),
  );
}

/** True when the file at `path` must be ignored (hidden, temporary, or matching an extra glob). */
export function isIgnoredFile(path: string, extra: readonly RegExp[] = []): boolean {
  const name = basename(path);
  return TEMPORARY.some((re) => re.test(name)) || extra.some((re) => re.test(name));
}

/** True when any folder of `path` below `root` is hidden (starts with a dot). */
export function isInHiddenFolder(path: string, root: string): boolean {
  const relative = path.startsWith(root) ? path.slice(root.length) : path;
  return relative
    .split(/[\\/]/)
    .slice(0, -1)
    .some((part) => part.startsWith('.'));
}
