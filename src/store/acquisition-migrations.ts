// Ledger migration of the acquisition-time reader: where a file's stored acquisition time came from.
import type { Migration } from './migrations.js';

export const ACQUISITION_MIGRATIONS: readonly Migration[] = [
  {
    // 'metadata': read from the file's own acquisition time; 'file-modified': the file carried none,
    // so its modification time stands in (never the analysis time). NULL on rows recorded before.
    id: '0300-acquisition-source',
    up(database) {
      database.exec(`ALTER TABLE files ADD COLUMN acquired_source TEXT CHECK (acquired_source IN ('metadata','file-modified'))`);
    },
  },
];
