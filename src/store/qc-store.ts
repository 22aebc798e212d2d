// Typed queries on the QC tables (see qc-migrations.ts): observation history, open flags,
// baselines, and the alert state and delivery records the dispatcher persists through.
import { flagKey, METRIC_NAMES, parseIsoToEpochMs, SEVERITIES } from '../qc/index.js';
import type { BaselineRecord, ControlObservation, MetricName, QcFlag, Severity } from '../qc/index.js';
import type { Ledger } from './ledger.js';

interface ObservationRow {
  set_id: string;
  control_id: string;
  acquired_at: string;
  metrics_json: string;
  measurement: string | null;
}
interface FlagRow {
  set_id: string;
  rule_id: string;
  kind: string;
  check_name: string;
  severity: string;
  control_id: string;
  metric: string;
  values_json: string;
  message: string;
  acquired_at: string;
}
interface BaselineRow {
  control_id: string;
  metric: string;
  from_iso: string;
  mean: number | null;
  sd: number | null;
  runs: number | null;
  through_iso: string | null;
}
interface AlertStateRow {
  flag_key: string;
  sent_at_ms: number;
  severity: string;
  channel_ids_json: string;
}

/** The last alert sent for a key (the alert dispatcher's SentAlert is this type; output/ imports it from here). */
export interface StoredSentAlert {
  readonly key: string;
  readonly sentAtMs: number;
  readonly severity: Severity;
  readonly channelIds: readonly string[];
}

/** One delivery outcome (the alert dispatcher's DeliveryRecord is this type). */
export interface StoredDelivery {
  readonly channelId: string;
  readonly key: string;
  readonly type: 'flag' | 'recovery';
  readonly severity: Severity;
  readonly status: 'delivered' | 'failed';
  readonly attempts: number;
  readonly error?: string;
  readonly atMs: number;
}

const isMetric = (name: string): name is MetricName => (METRIC_NAMES as readonly string[]).includes(name);
const asSeverity = (text: string): Severity =>
  (SEVERITIES as readonly string[]).includes(text) ? (text as Severity) : 'critical';

/** Stores (or replaces) the observation of a set. */
export function recordObservation(ledger: Ledger, observation: ControlObservation): void {
  const epochMs = parseIsoToEpochMs(observation.acquiredAt);
  if (epochMs === undefined)
    throw new RangeError(
      `observation of set ${observation.setId} has no readable acquiredAt: ${observation.acquiredAt}`,
    );
  ledger.database
    .prepare(
      'INSERT OR REPLACE INTO qc_observations (set_id, control_id, acquired_at, acquired_at_ms, metrics_json, measurement) VALUES (?, ?, ?, ?, ?, ?)',
    )
    .run(
      observation.setId,
      observation.controlId,
      observation.acquiredAt,
      epochMs,
      JSON.stringify(observation.metrics),
      observation.measurement ?? null,
    );
}

/** Observations of the given controls (all when omitted), oldest first. */
export function observationHistory(ledger: Ledger, controlIds?: readonly string[]): ControlObservation[] {
  const rows = ledger.database
    .prepare(
      'SELECT set_id, control_id, acquired_at, metrics_json, measurement FROM qc_observations ORDER BY acquired_at_ms',
    )
    .all() as ObservationRow[];
  const wanted = controlIds === undefined ? undefined : new Set(controlIds);
  return rows
    .filter((row) => wanted === undefined || wanted.has(row.control_id))
    .map((row) => {
      const parsed = JSON.parse(row.metrics_json) as Record<string, unknown>;
      const metrics: Partial<Record<MetricName, number>> = {};
      for (const [name, value] of Object.entries(parsed))
        if (isMetric(name) && typeof value === 'number') metrics[name] = value;
      return {
        controlId: row.control_id,
        setId: row.set_id,
        acquiredAt: row.acquired_at,
        metrics,
        ...(row.measurement === null ? {} : { measurement: row.measurement }),
      };
    });
}

/** Acquisition time (epoch ms) of the latest observation of any control or scope, or undefined when none is recorded. */
export function latestObservationEpochMs(ledger: Ledger): number | undefined {
  const row = ledger.prepare('SELECT MAX(acquired_at_ms) AS at FROM qc_observations').get() as { at: number | null };
  return row.at ?? undefined;
}

/** Stores flags raised on a set (open until a recovery closes them). */
export function recordFlags(ledger: Ledger, flags: readonly QcFlag[]): void {
  const insert = ledger.database
    .prepare(`INSERT INTO qc_flags (set_id, flag_key, rule_id, kind, check_name, severity, control_id, metric,
    values_json, message, acquired_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`);
  for (const flag of flags) {
    insert.run(
      flag.setId,
      flagKey(flag),
      flag.ruleId,
      flag.kind,
      flag.check,
      flag.severity,
      flag.controlId,
      flag.metric,
      JSON.stringify(flag.values),
      flag.message,
      flag.acquiredAt,
    );
  }
}

/** Replaces the flags recorded for a set (idempotent when a set is evaluated again). */
export function replaceFlagsOfSet(ledger: Ledger, setId: string, flags: readonly QcFlag[]): void {
  ledger.database.prepare('DELETE FROM qc_flags WHERE set_id = ?').run(setId);
  recordFlags(ledger, flags);
}

/** Open flags of a control (and of the instrument scope), oldest first. */
export function openFlags(ledger: Ledger, controlIds: readonly string[]): QcFlag[] {
  const rows = ledger.database.prepare('SELECT * FROM qc_flags WHERE open = 1 ORDER BY id').all() as FlagRow[];
  const wanted = new Set(controlIds);
  const flags: QcFlag[] = [];
  for (const row of rows) {
    if (!wanted.has(row.control_id) || !isMetric(row.metric)) continue;
    flags.push({
      ruleId: row.rule_id,
      kind: row.kind,
      check: row.check_name,
      severity: asSeverity(row.severity),
      controlId: row.control_id,
      metric: row.metric,
      values: JSON.parse(row.values_json) as Record<string, number>,
      message: row.message,
      acquiredAt: row.acquired_at,
      setId: row.set_id,
    });
  }
  return flags;
}

/** Every stored baseline record (start markers and computed values). */
export function baselineRecords(ledger: Ledger): BaselineRecord[] {
  const rows = ledger.database.prepare('SELECT * FROM qc_baselines ORDER BY id').all() as BaselineRow[];
  return rows.flatMap((row) =>
    isMetric(row.metric)
      ? [
          {
            controlId: row.control_id,
            metric: row.metric,
            fromIso: row.from_iso,
            ...(row.mean === null ? {} : { mean: row.mean }),
            ...(row.sd === null ? {} : { sd: row.sd }),
            ...(row.runs === null ? {} : { runs: row.runs }),
            ...(row.through_iso === null ? {} : { throughIso: row.through_iso }),
          },
        ]
      : [],
  );
}

/** Appends a baseline record (the latest by fromIso wins when evaluating). */
export function saveBaseline(ledger: Ledger, record: BaselineRecord, createdAtIso: string): void {
  ledger.database
    .prepare(
      'INSERT INTO qc_baselines (control_id, metric, from_iso, mean, sd, runs, through_iso, created_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)',
    )
    .run(
      record.controlId,
      record.metric,
      record.fromIso,
      record.mean ?? null,
      record.sd ?? null,
      record.runs ?? null,
      record.throughIso ?? null,
      createdAtIso,
    );
}

/** The dispatcher's cooldown state persisted in qc_alert_state. */
export function ledgerAlertState(ledger: Ledger): {
  lastSent(key: string): StoredSentAlert | undefined;
  markSent(alert: StoredSentAlert): void;
  clear(key: string): void;
} {
  return {
    lastSent(key: string): StoredSentAlert | undefined {
      const row = ledger.database.prepare('SELECT * FROM qc_alert_state WHERE flag_key = ?').get(key) as
        AlertStateRow | undefined;
      return row === undefined
        ? undefined
        : {
            key,
            sentAtMs: row.sent_at_ms,
            severity: asSeverity(row.severity),
            channelIds: JSON.parse(row.channel_ids_json) as string[],
          };
    },
    markSent(alert: StoredSentAlert): void {
      ledger.database
        .prepare(
          'INSERT OR REPLACE INTO qc_alert_state (flag_key, sent_at_ms, severity, channel_ids_json) VALUES (?, ?, ?, ?)',
        )
        .run(alert.key, alert.sentAtMs, alert.severity, JSON.stringify(alert.channelIds));
    },
    clear(key: string): void {
      ledger.database.prepare('DELETE FROM qc_alert_state WHERE flag_key = ?').run(key);
    },
  };
}

/** Delivery outcomes recorded in qc_deliveries. */
export function ledgerDeliveryRecorder(ledger: Ledger): { record(delivery: StoredDelivery): void } {
  const insert = ledger.database
    .prepare(`INSERT INTO qc_deliveries (channel_id, flag_key, type, severity, status, attempts, error, at_ms)
    VALUES (?, ?, ?, ?, ?, ?, ?, ?)`);
  return {
    record(delivery: StoredDelivery): void {
      insert.run(
        delivery.channelId,
        delivery.key,
        delivery.type,
        delivery.severity,
        delivery.status,
        delivery.attempts,
        delivery.error ?? null,
        delivery.atMs,
      );
    },
  };
}

/** Delivery records, newest first (for status pages and tests). */
export function recentDeliveries(
  ledger: Ledger,
  limit = 100,
): { channelId: string; key: string; status: string; attempts: number; error: string | null }[] {
  const rows = ledger.database
    .prepare('SELECT channel_id, flag_key, status, attempts, error FROM qc_deliveries ORDER BY id DESC LIMIT ?')
    .all(limit) as { channel_id: string; flag_key: string; status: string; attempts: number; error: string | null }[];
  return rows.map((row) => ({
    channelId: row.channel_id,
    key: row.flag_key,
    status: row.status,
    attempts: row.attempts,
    error: row.error,
  }));
}
