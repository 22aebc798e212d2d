// One log line per folder per interval during a storage outage: while a results share is away every
// set's commit fails the same way, and a line per set (per retry) buries the log. The first failure
// of a folder is logged; the next ones within the interval are counted and reported with the next
// line logged for that folder.

/** The key of an I/O failure: the folder it happened in (from the error's path), else its code. */
export function outageKey(error: unknown): string {
  const { path, code } = (error ?? {}) as { path?: unknown; code?: unknown };
  if (typeof path === 'string') {
    const cut = Math.max(path.lastIndexOf('/'), path.lastIndexOf('\\'));
    return cut > 0 ? path.slice(0, cut) : path;
  }
  return typeof code === 'string' ? code : 'unknown';
}

export class OutageLog {
  private readonly last = new Map<string, { atMs: number; suppressed: number }>();

  /** @param intervalMs At most one line per key within this many ms. */
  constructor(private readonly intervalMs: number) {}

  /**
   * Whether a failure with `key` at `nowMs` is to be logged; when it is, how many failures of that
   * key were not logged since the last line (undefined: do not log).
   */
  admit(key: string, nowMs: number): { suppressed: number } | undefined {
    const entry = this.last.get(key);
    if (entry !== undefined && nowMs - entry.atMs < this.intervalMs) {
      entry.suppressed += 1;
      return undefined;
    }
    this.last.set(key, { atMs: nowMs, suppressed: 0 });
    return { suppressed: entry?.suppressed ?? 0 };
  }
}
