// The ledger: one SQLite database (better-sqlite3, WAL) holding files, sets, pairings and the
// results index. `database` is for store-level modules only; everything else uses typed queries.
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import BetterSqlite3, { type Database, type Statement } from 'better-sqlite3';
import { applyMigrations, MIGRATIONS, type Migration } from './migrations.js';

export const LEDGER_FILE_NAME = 'ledger.sqlite';

export interface Ledger {
  /** The open database: for modules under src/store/ only. */
  readonly database: Database;
  /** A prepared statement for `sql`, prepared once and cached (store-level modules only). */
  prepare(sql: string): Statement;
  /** Runs `work` in one transaction (all or nothing). */
  transaction<T>(work: () => T): T;
  /**
   * Like transaction(), and the commit is on disk when it returns (synchronous = FULL for this one
   * commit: the WAL is fsynced). For the commits that irreversible file moves follow, so a power
   * cut cannot leave the files moved and the ledger without the state that moved them.
   */
  durableTransaction<T>(work: () => T): T;
  close(): void;
}

/** Opens (creating if needed) the ledger in `stateDir`, in WAL mode, and applies pending migrations. */
export function openLedger(
  stateDir: string,
  options: { migrations?: readonly Migration[]; readonly?: boolean } = {},
): Ledger {
  mkdirSync(stateDir, { recursive: true });
  const database = new BetterSqlite3(join(stateDir, LEDGER_FILE_NAME), { readonly: options.readonly ?? false });
  if (options.readonly !== true) {
    database.pragma('journal_mode = WAL');
    database.pragma('synchronous = NORMAL');
    database.pragma('busy_timeout = 5000');
    applyMigrations(database, options.migrations ?? MIGRATIONS);
  }
  const statements = new Map<string, Statement>();
  return {
    database,
    prepare(sql: string): Statement {
      let statement = statements.get(sql);
      if (statement === undefined) {
        statement = database.prepare(sql);
        statements.set(sql, statement);
      }
      return statement;
    },
    transaction<T>(work: () => T): T {
      return database.transaction(work)();
    },
    durableTransaction<T>(work: () => T): T {
      database.pragma('synchronous = FULL');
      try {
        return database.transaction(work)();
      } finally {
        database.pragma('synchronous = NORMAL');
      }
    },
    close() {
      database.close();
    },
  };
}
