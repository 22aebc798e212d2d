// File-system error codes the edges handle by name. Any other code is not swallowed: it is thrown
// (or reported) with the path Node puts in the message, so it reaches the log.

/** The errno code of a thrown value (`ENOENT`, `EACCES`, …), if it has one. */
export function errnoCode(error: unknown): string | undefined {
  const code = (error as { code?: unknown } | null)?.code;
  return typeof code === 'string' ? code : undefined;
}

/** Codes meaning the path is not there (any more): moved or deleted, or a folder on its path replaced by a file. */
export const GONE_CODES: ReadonlySet<string> = new Set(['ENOENT', 'ENOTDIR']);

/** Whether `error` says the path is gone (GONE_CODES). */
export function isGoneError(error: unknown): boolean {
  const code = errnoCode(error);
  return code !== undefined && GONE_CODES.has(code);
}

/**
 * Codes with which a platform or file system refuses to open or fsync a folder (Windows: EISDIR,
 * EPERM; some network and FUSE file systems: EINVAL, ENOTSUP). The rename is still atomic there;
 * only its durability cannot be asked for.
 */
export const FOLDER_FSYNC_UNSUPPORTED_CODES: ReadonlySet<string> = new Set([
  'EISDIR',
  'EPERM',
  'EINVAL',
  'ENOTSUP',
  'EOPNOTSUPP',
]);
