// Typed read-only queries for `driftlight status` and the status page: counts, oldest waiting set, last errors.
import type { Ledger } from './ledger.js';
import { FILE_STATES, type FileState } from './files.js';
import { SET_STATES, type SetState } from './sets.js';

export interface LedgerStatus {
  readonly files: Readonly<Record<FileState, number>>;
  readonly sets: Readonly<Record<SetState, number>>;
  readonly results: number;
  /** The oldest set not yet finished, if any. */
  readonly oldestWaiting?: {
    readonly setId: string;
    readonly sampleId: string;
    readonly state: SetState;
    readonly createdAt: string;
  };
  /** The most recent rejections and failures, newest first. */
  readonly lastErrors: readonly {
    readonly name: string;
    readonly state: string;
    readonly code: string;
    readonly message: string;
    readonly at: string;
  }[];
}

/** Counts by state, the oldest waiting set and the last `errorLimit` errors. */
export function ledgerStatus(ledger: Ledger, errorLimit = 5): LedgerStatus {
  const db = ledger.database;
  const files = Object.fromEntries(FILE_STATES.map((s) => [s, 0])) as Record<FileState, number>;
  for (const row of db.prepare('SELECT state, COUNT(*) AS n FROM files GROUP BY state').all() as {
    state: FileState;
    n: number;
  }[])
    files[row.state] = row.n;
  const sets = Object.fromEntries(SET_STATES.map((s) => [s, 0])) as Record<SetState, number>;
  for (const row of db.prepare('SELECT state, COUNT(*) AS n FROM sets GROUP BY state').all() as {
    state: SetState;
    n: number;
  }[])
    sets[row.state] = row.n;
  const results = (db.prepare('SELECT COUNT(*) AS n FROM results').get() as { n: number }).n;
  const oldest = db
    .prepare(
      `SELECT id, sample_id, state, created_at FROM sets WHERE state IN ('open','queued') ORDER BY created_at, id LIMIT 1`,
    )
    .get() as { id: string; sample_id: string; state: SetState; created_at: string } | undefined;
  const lastErrors = (
    db
      .prepare(
        `SELECT name, state, error_code, error_message, updated_at FROM files WHERE state IN ('rejected','failed')
              ORDER BY updated_at DESC, id DESC LIMIT ?`,
      )
      .all(errorLimit) as {
      name: string;
      state: string;
      error_code: string | null;
      error_message: string | null;
      updated_at: string;
    }[]
  ).map((r) => ({
    name: r.name,
    state: r.state,
    code: r.error_code ?? '',
    message: r.error_message ?? '',
    at: r.updated_at,
  }));
  return {
    files,
    sets,
    results,
    lastErrors,
    ...(oldest === undefined
      ? {}
      : {
          oldestWaiting: {
            setId: oldest.id,
            sampleId: oldest.sample_id,
            state: oldest.state,
            createdAt: oldest.created_at,
          },
        }),
  };
}

/** True when the ledger answers a trivial query (`SELECT 1`), for the health check. */
export function ledgerAnswers(ledger: Ledger): boolean {
  const row = ledger.prepare('SELECT 1 AS ok').get() as { ok: number } | undefined;
  return row?.ok === 1;
}

/** Files rejected or failed at or after `sinceIso` (ISO 8601 UTC), oldest first: name, where quarantined, code and message. */
export function fileErrorsSince(
  ledger: Ledger,
  sinceIso: string,
): { name: string; quarantinePath: string | null; code: string; message: string }[] {
  const rows = ledger.database
    .prepare(
      `SELECT name, quarantine_path, error_code, error_message FROM files
        WHERE state IN ('rejected','failed') AND updated_at >= ? ORDER BY updated_at, id`,
    )
    .all(sinceIso) as {
    name: string;
    quarantine_path: string | null;
    error_code: string | null;
    error_message: string | null;
  }[];
  return rows.map((row) => ({
    name: row.name,
    quarantinePath: row.quarantine_path,
    code: row.error_code ?? 'UNKNOWN',
    message: row.error_message ?? '',
  }));
}
