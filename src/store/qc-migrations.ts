// The QC tables of the ledger (appended to MIGRATIONS in migrations.ts): control observations,
// flags (open until recovered), baselines, alert cooldown state and alert deliveries.
import type { Database } from 'better-sqlite3';

export const QC_MIGRATIONS: readonly { readonly id: string; up(database: Database): void }[] = [
  {
    id: '0100-qc',
    up(database) {
      database.exec(`
        CREATE TABLE qc_observations (
          set_id TEXT NOT NULL,
          control_id TEXT NOT NULL,
          acquired_at TEXT NOT NULL,
          acquired_at_ms INTEGER NOT NULL,
          metrics_json TEXT NOT NULL,
          PRIMARY KEY (set_id, control_id)
        );
        CREATE INDEX qc_observations_control ON qc_observations (control_id, acquired_at_ms);
        CREATE TABLE qc_flags (
          id INTEGER PRIMARY KEY,
          set_id TEXT NOT NULL,
          flag_key TEXT NOT NULL,
          rule_id TEXT NOT NULL,
          kind TEXT NOT NULL,
          check_name TEXT NOT NULL,
          severity TEXT NOT NULL CHECK (severity IN ('info','warning','critical')),
          control_id TEXT NOT NULL,
          metric TEXT NOT NULL,
          values_json TEXT NOT NULL,
          message TEXT NOT NULL,
          acquired_at TEXT NOT NULL,
          open INTEGER NOT NULL DEFAULT 1,
          recovered_at TEXT
        );
        CREATE INDEX qc_flags_open ON qc_flags (control_id, open);
        CREATE INDEX qc_flags_set ON qc_flags (set_id);
        CREATE TABLE qc_baselines (
          id INTEGER PRIMARY KEY,
          control_id TEXT NOT NULL,
          metric TEXT NOT NULL,
          from_iso TEXT NOT NULL,
          mean REAL,
          sd REAL,
          runs INTEGER,
          through_iso TEXT,
          created_at TEXT NOT NULL
        );
        CREATE INDEX qc_baselines_control ON qc_baselines (control_id, metric);
        CREATE TABLE qc_alert_state (
          flag_key TEXT PRIMARY KEY,
          sent_at_ms INTEGER NOT NULL,
          severity TEXT NOT NULL,
          channel_ids_json TEXT NOT NULL
        );
        CREATE TABLE qc_deliveries (
          id INTEGER PRIMARY KEY,
          channel_id TEXT NOT NULL,
          flag_key TEXT NOT NULL,
          type TEXT NOT NULL CHECK (type IN ('flag','recovery')),
          severity TEXT NOT NULL,
          status TEXT NOT NULL CHECK (status IN ('delivered','failed')),
          attempts INTEGER NOT NULL,
          error TEXT,
          at_ms INTEGER NOT NULL
        );
        CREATE INDEX qc_deliveries_status ON qc_deliveries (status, at_ms);
      `);
    },
  },
  {
    // Issue 16.2/16.7: per-run rule verdicts (so an alarm's open state follows acquisition order, not
    // arrival order) and the audit trail of what people did (acknowledge, exclude, rebaseline).
    id: '0101-qc-verdicts-actions',
    up(database) {
      database.exec(`
        CREATE TABLE qc_verdicts (
          set_id TEXT NOT NULL,
          flag_key TEXT NOT NULL,
          status TEXT NOT NULL CHECK (status IN ('fired','unsettled','settled')),
          acquired_at_ms INTEGER NOT NULL,
          PRIMARY KEY (set_id, flag_key)
        );
        CREATE INDEX qc_verdicts_key ON qc_verdicts (flag_key, acquired_at_ms);
        CREATE TABLE qc_actions (
          id INTEGER PRIMARY KEY,
          action TEXT NOT NULL CHECK (action IN ('acknowledge','exclude','include','rebaseline')),
          control_id TEXT NOT NULL,
          set_id TEXT,
          flag_key TEXT,
          comment TEXT NOT NULL,
          by_user TEXT NOT NULL,
          at_iso TEXT NOT NULL,
          detail_json TEXT NOT NULL DEFAULT '{}'
        );
        CREATE INDEX qc_actions_control ON qc_actions (control_id, action);
        ALTER TABLE qc_flags ADD COLUMN acknowledged_action_id INTEGER;
      `);
    },
  },
  {
    // Issue 18.3: which measurement of a file holding several a control run is (its column; NULL for a
    // file holding one), so the ledger names what was judged as the result's qc.judgement does.
    id: '0102-qc-observation-measurement',
    up(database) {
      database.exec('ALTER TABLE qc_observations ADD COLUMN measurement TEXT;');
    },
  },
];
