// Typed queries behind /metrics: file and set counts, queue depth, alert outcomes and the analysis
// durations recorded at each commit (table analysis_durations, migration 0400).
import type { Ledger } from './ledger.js';

/** Records how long the worker took to analyse a set (ms of wall time); a re-run replaces it. */
export function recordAnalysisDuration(ledger: Ledger, setId: string, durationMs: number, finishedAtIso: string): void {
  if (!Number.isFinite(durationMs) || durationMs < 0) return;
  ledger
    .prepare('INSERT OR REPLACE INTO analysis_durations (set_id, duration_ms, finished_at) VALUES (?, ?, ?)')
    .run(setId, durationMs, finishedAtIso);
}

/** The recorded analysis durations in ms, oldest first, at most `limit` (the most recent ones). */
export function analysisDurationsMs(ledger: Ledger, limit = 100_000): number[] {
  const rows = ledger
    .prepare(
      'SELECT duration_ms FROM (SELECT rowid, duration_ms FROM analysis_durations ORDER BY rowid DESC LIMIT ?) ORDER BY rowid',
    )
    .all(limit) as { duration_ms: number }[];
  return rows.map((row) => row.duration_ms);
}

/** Alert deliveries by channel and outcome: sent (delivered), failed (given up, expired), pending (still retried). */
export function alertOutcomeCounts(
  ledger: Ledger,
): { channelId: string; status: 'delivered' | 'expired' | 'pending'; count: number }[] {
  return (
    ledger
      .prepare(
        'SELECT channel_id, status, COUNT(*) AS n FROM alert_outbox GROUP BY channel_id, status ORDER BY channel_id, status',
      )
      .all() as { channel_id: string; status: 'delivered' | 'expired' | 'pending'; n: number }[]
  ).map((row) => ({ channelId: row.channel_id, status: row.status, count: row.n }));
}

/** Failed delivery attempts recorded by the dispatcher (qc_deliveries with status failed), by channel. */
export function failedDeliveryAttempts(ledger: Ledger): { channelId: string; count: number }[] {
  return (
    ledger
      .prepare(
        `SELECT channel_id, COUNT(*) AS n FROM qc_deliveries WHERE status = 'failed' GROUP BY channel_id ORDER BY channel_id`,
      )
      .all() as { channel_id: string; n: number }[]
  ).map((row) => ({ channelId: row.channel_id, count: row.n }));
}
