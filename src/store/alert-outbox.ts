// The durable alert outbox in the ledger (table alert_outbox, migration 0310): deliveries waiting
// until they are delivered or expire, and the counts `status` and `process` report.
import type { AlertMessage } from '../output/alerts/alert-message.js';
import type { AlertOutbox, OutboxEntry } from '../output/alerts/alert-outbox.js';
import type { Ledger } from './ledger.js';

interface OutboxRow {
  id: number;
  channel_id: string;
  message_json: string;
  attempts: number;
  next_attempt_at_ms: number;
  expires_at_ms: number;
  last_error: string | null;
}

function toEntry(row: OutboxRow): OutboxEntry {
  return {
    id: row.id,
    channelId: row.channel_id,
    message: JSON.parse(row.message_json) as AlertMessage,
    attempts: row.attempts,
    nextAttemptAtMs: row.next_attempt_at_ms,
    expiresAtMs: row.expires_at_ms,
    ...(row.last_error === null ? {} : { lastError: row.last_error }),
  };
}

/** The alert outbox kept in the ledger. */
export function ledgerAlertOutbox(ledger: Ledger): AlertOutbox {
  const db = ledger.database;
  return {
    add({ channelId, message, createdAtMs, expiresAtMs }) {
      const info = db
        .prepare(
          `INSERT INTO alert_outbox (channel_id, flag_key, type, severity, message_json, status, attempts, created_at_ms, next_attempt_at_ms, expires_at_ms)
        VALUES (?, ?, ?, ?, ?, 'pending', 0, ?, ?, ?)`,
        )
        .run(
          channelId,
          message.key,
          message.type,
          message.severity,
          JSON.stringify(message),
          createdAtMs,
          createdAtMs,
          expiresAtMs,
        );
      return Number(info.lastInsertRowid);
    },
    due(nowMs) {
      return (
        db
          .prepare(
            `SELECT * FROM alert_outbox WHERE status = 'pending' AND next_attempt_at_ms <= ? ORDER BY next_attempt_at_ms, id`,
          )
          .all(nowMs) as OutboxRow[]
      ).map(toEntry);
    },
    nextDueAtMs() {
      const row = db
        .prepare(`SELECT MIN(next_attempt_at_ms) AS at FROM alert_outbox WHERE status = 'pending'`)
        .get() as { at: number | null };
      return row.at ?? undefined;
    },
    markDelivered(id, attempts, atMs) {
      db.prepare(`UPDATE alert_outbox SET status = 'delivered', attempts = ?, finished_at_ms = ? WHERE id = ?`).run(
        attempts,
        atMs,
        id,
      );
    },
    markRetry(id, attempts, error, nextAttemptAtMs) {
      db.prepare(`UPDATE alert_outbox SET attempts = ?, last_error = ?, next_attempt_at_ms = ? WHERE id = ?`).run(
        attempts,
        error,
        nextAttemptAtMs,
        id,
      );
    },
    markExpired(id, attempts, error, atMs) {
      db.prepare(
        `UPDATE alert_outbox SET status = 'expired', attempts = ?, last_error = ?, finished_at_ms = ? WHERE id = ?`,
      ).run(attempts, error, atMs, id);
    },
  };
}

/** An alert not delivered (still retried, or expired), as `status` lists it. */
export interface UndeliveredAlert {
  readonly channelId: string;
  readonly key: string;
  readonly severity: string;
  readonly status: 'pending' | 'expired';
  readonly attempts: number;
  readonly lastError: string | null;
  readonly createdAtMs: number;
}

/** Deliveries not delivered: pending ones (still retried) and expired ones (given up), newest first. */
export function undeliveredAlerts(
  ledger: Ledger,
  limit = 20,
): { pending: number; expired: number; latest: UndeliveredAlert[] } {
  const db = ledger.database;
  const count = (status: string): number =>
    (db.prepare('SELECT COUNT(*) AS n FROM alert_outbox WHERE status = ?').get(status) as { n: number }).n;
  const latest = (
    db
      .prepare(
        `SELECT channel_id, flag_key, severity, status, attempts, last_error, created_at_ms FROM alert_outbox
      WHERE status IN ('pending','expired') ORDER BY created_at_ms DESC, id DESC LIMIT ?`,
      )
      .all(limit) as {
      channel_id: string;
      flag_key: string;
      severity: string;
      status: 'pending' | 'expired';
      attempts: number;
      last_error: string | null;
      created_at_ms: number;
    }[]
  ).map((r) => ({
    channelId: r.channel_id,
    key: r.flag_key,
    severity: r.severity,
    status: r.status,
    attempts: r.attempts,
    lastError: r.last_error,
    createdAtMs: r.created_at_ms,
  }));
  return { pending: count('pending'), expired: count('expired'), latest };
}

/** Open QC flags (not yet recovered) by severity, counted once per rule + control + metric. */
export function openQcFlagCounts(ledger: Ledger): { info: number; warning: number; critical: number } {
  const counts = { info: 0, warning: 0, critical: 0 };
  const rows = ledger.database
    .prepare('SELECT severity, COUNT(DISTINCT flag_key) AS n FROM qc_flags WHERE open = 1 GROUP BY severity')
    .all() as { severity: keyof typeof counts; n: number }[];
  for (const row of rows) if (row.severity in counts) counts[row.severity] = row.n;
  return counts;
}

/** Deliveries given up as expired at or after `sinceMs`. */
export function alertsExpiredSince(ledger: Ledger, sinceMs: number): number {
  return (
    ledger.database
      .prepare(`SELECT COUNT(*) AS n FROM alert_outbox WHERE status = 'expired' AND finished_at_ms >= ?`)
      .get(sinceMs) as { n: number }
  ).n;
}
