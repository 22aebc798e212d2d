// Ledger migration of the analysis timings /metrics reports (src/store/metrics-queries.ts).
import type { Migration } from './migrations.js';

export const METRICS_MIGRATIONS: readonly Migration[] = [
  {
    // One row per analysed set: how long the worker's analyze() took (wall time, ms), kept for the
    // fit-duration histogram of /metrics; written in the commit of the set's result.
    id: '0400-analysis-durations',
    up(database) {
      database.exec(`
        CREATE TABLE analysis_durations (
          set_id TEXT PRIMARY KEY,
          duration_ms REAL NOT NULL,
          finished_at TEXT NOT NULL
        );
      `);
    },
  },
];
