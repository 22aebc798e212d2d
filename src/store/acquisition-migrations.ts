// Ledger migrations of the acquisition-time reader: where a file's stored acquisition time came from,
// and an index to find files by part and acquisition time.
import type { Migration } from './migrations.js';

export const ACQUISITION_MIGRATIONS: readonly Migration[] = [
  {
    // 'metadata': read from the file's own acquisition time; 'file-modified': the file carried none,
    // so its modification time stands in (never the analysis time). NULL on rows recorded before.
    id: '0300-acquisition-source',
    up(database) {
      database.exec(
        `ALTER TABLE files ADD COLUMN acquired_source TEXT CHECK (acquired_source IN ('metadata','file-modified'))`,
      );
    },
  },
  {
    // Reference pairing by measurement time (a backlog of more reference sets than the newest few
    // must still pair each control with the reference of its own session): files by part and
    // acquisition time (canonical UTC ISO text since 0300, so text order is time order).
    id: '0301-files-part-acquired',
    up(database) {
      database.exec('CREATE INDEX files_part_acquired ON files (part, acquired_at)');
    },
  },
];
