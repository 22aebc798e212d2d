// Ledger migration of the durable alert outbox (src/store/alert-outbox.ts).
import type { Migration } from './migrations.js';

export const ALERT_OUTBOX_MIGRATIONS: readonly Migration[] = [
  {
    // One row per delivery of one alert message to one channel: pending until delivered or expired.
    id: '0310-alert-outbox',
    up(database) {
      database.exec(`
        CREATE TABLE alert_outbox (
          id INTEGER PRIMARY KEY,
          channel_id TEXT NOT NULL,
          flag_key TEXT NOT NULL,
          type TEXT NOT NULL,
          severity TEXT NOT NULL,
          message_json TEXT NOT NULL,
          status TEXT NOT NULL CHECK (status IN ('pending','delivered','expired')),
          attempts INTEGER NOT NULL DEFAULT 0,
          created_at_ms INTEGER NOT NULL,
          next_attempt_at_ms INTEGER NOT NULL,
          expires_at_ms INTEGER NOT NULL,
          last_error TEXT,
          finished_at_ms INTEGER
        );
        CREATE INDEX alert_outbox_pending ON alert_outbox (next_attempt_at_ms, id) WHERE status = 'pending';
      `);
    },
  },
];
