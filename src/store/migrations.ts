// The ledger's schema as an ordered list of migrations. Each runs once, in order, inside a
// transaction; applied ids are kept in `schema_migrations`. Never edit an applied migration: append.
// Other modules add their tables by exporting a list from their own file (e.g. qc-migrations.ts)
// and appending it to MIGRATIONS below.
import type { Database } from 'better-sqlite3';
import { QC_MIGRATIONS } from './qc-migrations.js';
import { ACQUISITION_MIGRATIONS } from './acquisition-migrations.js';
import { ALERT_OUTBOX_MIGRATIONS } from './alert-outbox-migrations.js';
import { METRICS_MIGRATIONS } from './metrics-migrations.js';
import { FILE_VERSION_MIGRATIONS } from './file-version-migrations.js';

export interface Migration {
  /** Stable, sortable id such as '0001-core'; recorded once applied. */
  readonly id: string;
  /** Applies the change; runs inside a transaction. */
  up(database: Database): void;
}

const CORE_MIGRATIONS: readonly Migration[] = [
  {
    id: '0001-core',
    up(database) {
      database.exec(`
        CREATE TABLE files (
          id INTEGER PRIMARY KEY,
          sha256 TEXT NOT NULL,
          path TEXT NOT NULL,
          name TEXT NOT NULL,
          size_bytes INTEGER NOT NULL,
          first_seen_at TEXT NOT NULL,
          updated_at TEXT NOT NULL,
          state TEXT NOT NULL CHECK (state IN ('seen','assembled','queued','done','rejected','failed')),
          data_type TEXT CHECK (data_type IN ('spectrum','decay','manifest')),
          part TEXT,
          role TEXT,
          sample_id TEXT,
          acquired_at TEXT,
          excitation_nm REAL,
          solvent TEXT,
          has_irf_column INTEGER NOT NULL DEFAULT 0,
          set_id TEXT,
          archive_path TEXT,
          quarantine_path TEXT,
          error_code TEXT,
          error_message TEXT
        );
        CREATE INDEX files_sha256 ON files (sha256);
        CREATE INDEX files_state ON files (state);
        CREATE INDEX files_set ON files (set_id);
        CREATE INDEX files_part ON files (part, state);
        CREATE TABLE sets (
          id TEXT PRIMARY KEY,
          sample_id TEXT NOT NULL,
          role TEXT NOT NULL,
          source TEXT NOT NULL CHECK (source IN ('manifest','metadata','pattern','fallback')),
          state TEXT NOT NULL CHECK (state IN ('open','queued','done','failed')),
          created_at TEXT NOT NULL,
          deadline_at TEXT NOT NULL,
          queued_at TEXT,
          done_at TEXT,
          manifest_json TEXT,
          job_id TEXT,
          result_path TEXT,
          partial INTEGER,
          error_code TEXT,
          error_message TEXT
        );
        CREATE INDEX sets_state ON sets (state, deadline_at);
        CREATE INDEX sets_sample ON sets (sample_id, state);
        CREATE TABLE set_pairings (
          set_id TEXT NOT NULL,
          part TEXT NOT NULL,
          file_id INTEGER NOT NULL,
          from_set_id TEXT,
          PRIMARY KEY (set_id, part, file_id)
        );
        CREATE TABLE results (
          set_id TEXT PRIMARY KEY,
          path TEXT NOT NULL,
          sample_id TEXT NOT NULL,
          role TEXT NOT NULL,
          acquired_at TEXT,
          analyzed_at TEXT NOT NULL,
          partial INTEGER NOT NULL,
          tau_mean_ns REAL,
          quantum_yield REAL,
          kr_per_s REAL,
          knr_per_s REAL,
          config_hash TEXT NOT NULL,
          result_sha256 TEXT NOT NULL,
          flags_json TEXT NOT NULL DEFAULT '[]'
        );
        CREATE INDEX results_role ON results (role, analyzed_at);
        CREATE INDEX results_analyzed ON results (analyzed_at);
      `);
    },
  },
  {
    // Indexes that keep dispatch and start-up independent of the ledger's size: pairing candidates
    // newest first by part, decays carrying an IRF column, reference sets newest first, and files
    // whose archive or quarantine move is still to be done (recovery). files_part (part, state)
    // could not serve the newest-first order and is replaced.
    id: '0002-pairing-and-recovery-indexes',
    up(database) {
      database.exec(`
        DROP INDEX files_part;
        CREATE INDEX files_part_seen ON files (part, first_seen_at, id);
        CREATE INDEX files_irf_decays ON files (first_seen_at, id) WHERE part = 'decay' AND has_irf_column = 1;
        CREATE INDEX files_unplaced ON files (state) WHERE archive_path IS NULL AND quarantine_path IS NULL;
        CREATE INDEX sets_role_created ON sets (role, created_at, id);
      `);
    },
  },
];

/** Every migration, in the order applied. Append other modules' lists here. */
export const MIGRATIONS: readonly Migration[] = [
  ...CORE_MIGRATIONS,
  ...QC_MIGRATIONS,
  ...ACQUISITION_MIGRATIONS,
  ...ALERT_OUTBOX_MIGRATIONS,
  ...METRICS_MIGRATIONS,
  ...FILE_VERSION_MIGRATIONS,
];

/** Applies every migration of `migrations` not yet recorded, each in its own transaction; returns the ids applied. */
export function applyMigrations(database: Database, migrations: readonly Migration[] = MIGRATIONS): string[] {
  database.exec('CREATE TABLE IF NOT EXISTS schema_migrations (id TEXT PRIMARY KEY, applied_at TEXT NOT NULL)');
  const applied = new Set(
    (database.prepare('SELECT id FROM schema_migrations').all() as { id: string }[]).map((row) => row.id),
  );
  const record = database.prepare('INSERT INTO schema_migrations (id, applied_at) VALUES (?, ?)');
  const done: string[] = [];
  for (const migration of migrations) {
    if (applied.has(migration.id)) continue;
    database.transaction(() => {
      migration.up(database);
      record.run(migration.id, new Date().toISOString());
    })();
    done.push(migration.id);
  }
  return done;
}
