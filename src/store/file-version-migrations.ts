// Ledger migration of input versions (issue 20): a file changed at its path after it was read (a
// writer that paused longer than the stability window, a file rewritten in place) is taken again
// as a new version of the same input; each earlier version is kept here, so the set's next result
// can say what it supersedes. archive_rechecks lists files moved to the archive that are looked at
// once more (a writer that held a file open goes on writing into the archived copy); it outlives a
// crash, so a restart looks at them again.
import type { Migration } from './migrations.js';

export const FILE_VERSION_MIGRATIONS: readonly Migration[] = [
  {
    id: '0500-file-versions',
    up(database) {
      database.exec(`
        CREATE TABLE file_versions (
          id INTEGER PRIMARY KEY,
          file_id INTEGER NOT NULL,
          set_id TEXT,
          name TEXT NOT NULL,
          sha256 TEXT NOT NULL,
          size_bytes INTEGER NOT NULL,
          first_seen_at TEXT NOT NULL,
          replaced_at TEXT NOT NULL,
          location TEXT,
          result_sha256 TEXT,
          reason TEXT NOT NULL
        );
        CREATE INDEX file_versions_set ON file_versions (set_id, id);
      `);
    },
  },
  {
    id: '0510-archive-rechecks',
    up(database) {
      database.exec(`
        CREATE TABLE archive_rechecks (
          file_id INTEGER PRIMARY KEY,
          added_at TEXT NOT NULL
        );
      `);
    },
  },
];
