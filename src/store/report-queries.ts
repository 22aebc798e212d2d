// Read-only queries for the face of the tool (charts, digest, status page): every flag of a control
// (open or closed), files and rejections of a period, alert deliveries of a period, waiting sets.
// Alerts not delivered come from the durable outbox (alert-outbox.ts).
import { METRIC_NAMES, SEVERITIES } from '../qc/index.js';
import type { MetricName, QcFlag, Severity } from '../qc/index.js';
import type { Ledger } from './ledger.js';

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
  open: number;
}

/** A recorded flag with whether it is still open. */
export type RecordedFlag = QcFlag & { readonly open: boolean };

const isMetric = (name: string): name is MetricName => (METRIC_NAMES as readonly string[]).includes(name);
const asSeverity = (text: string): Severity =>
  (SEVERITIES as readonly string[]).includes(text) ? (text as Severity) : 'critical';

/** Every flag recorded for the given controls (all controls when omitted), oldest first. */
export function flagsOfControls(ledger: Ledger, controlIds?: readonly string[]): RecordedFlag[] {
  const rows = ledger.database.prepare('SELECT * FROM qc_flags ORDER BY id').all() as FlagRow[];
  const wanted = controlIds === undefined ? undefined : new Set(controlIds);
  return rows.flatMap((row) => {
    if ((wanted !== undefined && !wanted.has(row.control_id)) || !isMetric(row.metric)) return [];
    return [
      {
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
        open: row.open === 1,
      },
    ];
  });
}

export interface FileActivity {
  readonly name: string;
  readonly state: string;
  readonly createdAt: string;
  readonly updatedAt: string;
  readonly code: string | null;
  readonly message: string | null;
}

/** Files first seen within [fromIso, toIso), oldest first. */
export function filesReceivedBetween(ledger: Ledger, fromIso: string, toIso: string): FileActivity[] {
  const rows = ledger.database
    .prepare(
      'SELECT name, state, first_seen_at AS created_at, updated_at, error_code, error_message FROM files WHERE first_seen_at >= ? AND first_seen_at < ? ORDER BY first_seen_at, id',
    )
    .all(fromIso, toIso) as {
    name: string;
    state: string;
    created_at: string;
    updated_at: string;
    error_code: string | null;
    error_message: string | null;
  }[];
  return rows.map((r) => ({
    name: r.name,
    state: r.state,
    createdAt: r.created_at,
    updatedAt: r.updated_at,
    code: r.error_code,
    message: r.error_message,
  }));
}

/** Files rejected or failed within [fromIso, toIso) (by their last update), newest first, at most `limit`. */
export function rejectionsBetween(ledger: Ledger, fromIso: string, toIso: string, limit = 500): FileActivity[] {
  const rows = ledger.database
    .prepare(
      `SELECT name, state, first_seen_at AS created_at, updated_at, error_code, error_message FROM files WHERE state IN ('rejected','failed')
              AND updated_at >= ? AND updated_at < ? ORDER BY updated_at DESC, id DESC LIMIT ?`,
    )
    .all(fromIso, toIso, limit) as {
    name: string;
    state: string;
    created_at: string;
    updated_at: string;
    error_code: string | null;
    error_message: string | null;
  }[];
  return rows.map((r) => ({
    name: r.name,
    state: r.state,
    createdAt: r.created_at,
    updatedAt: r.updated_at,
    code: r.error_code,
    message: r.error_message,
  }));
}

export interface DeliveryActivity {
  readonly channelId: string;
  readonly key: string;
  readonly type: string;
  readonly severity: string;
  readonly status: 'delivered' | 'failed';
  readonly attempts: number;
  readonly error: string | null;
  readonly atMs: number;
}

/** Alert deliveries within [fromMs, toMs), oldest first. */
export function deliveriesBetween(ledger: Ledger, fromMs: number, toMs: number): DeliveryActivity[] {
  const rows = ledger.database
    .prepare(
      'SELECT channel_id, flag_key, type, severity, status, attempts, error, at_ms FROM qc_deliveries WHERE at_ms >= ? AND at_ms < ? ORDER BY at_ms, id',
    )
    .all(fromMs, toMs) as {
    channel_id: string;
    flag_key: string;
    type: string;
    severity: string;
    status: 'delivered' | 'failed';
    attempts: number;
    error: string | null;
    at_ms: number;
  }[];
  return rows.map((r) => ({
    channelId: r.channel_id,
    key: r.flag_key,
    type: r.type,
    severity: r.severity,
    status: r.status,
    attempts: r.attempts,
    error: r.error,
    atMs: r.at_ms,
  }));
}

export interface WaitingSet {
  readonly setId: string;
  readonly sampleId: string;
  readonly role: string;
  readonly state: string;
  readonly createdAt: string;
  readonly deadlineAt: string;
  readonly files: readonly { readonly name: string; readonly part: string | null; readonly hasIrfColumn: boolean }[];
}

/** Sets not yet finished (open or queued), oldest first, with the names of their files. */
export function waitingSets(ledger: Ledger, limit = 200): WaitingSet[] {
  const sets = ledger.database
    .prepare(
      `SELECT id, sample_id, role, state, created_at, deadline_at FROM sets WHERE state IN ('open','queued') ORDER BY created_at, id LIMIT ?`,
    )
    .all(limit) as {
    id: string;
    sample_id: string;
    role: string;
    state: string;
    created_at: string;
    deadline_at: string;
  }[];
  const filesOf = ledger.database.prepare('SELECT name, part, has_irf_column FROM files WHERE set_id = ? ORDER BY id');
  return sets.map((s) => ({
    setId: s.id,
    sampleId: s.sample_id,
    role: s.role,
    state: s.state,
    createdAt: s.created_at,
    deadlineAt: s.deadline_at,
    files: (filesOf.all(s.id) as { name: string; part: string | null; has_irf_column: number }[]).map((f) => ({
      name: f.name,
      part: f.part,
      hasIrfColumn: f.has_irf_column === 1,
    })),
  }));
}

/** An open flag of a control, once per rule + metric (the latest run that raised it). */
export interface OpenControlFlag {
  readonly ruleId: string;
  readonly check: string;
  readonly severity: Severity;
  readonly metric: MetricName;
  readonly message: string;
  readonly setId: string;
  readonly acquiredAt: string;
}

/** Open QC flags grouped by control (instrument scope included), each rule + metric once with its latest run; controls in id order. */
export function openFlagsByControl(ledger: Ledger): { controlId: string; flags: OpenControlFlag[] }[] {
  const latest = new Map<string, Map<string, OpenControlFlag>>();
  for (const flag of flagsOfControls(ledger)) {
    if (!flag.open) continue;
    const perControl = latest.get(flag.controlId) ?? new Map<string, OpenControlFlag>();
    perControl.set(`${flag.ruleId}|${flag.metric}`, {
      ruleId: flag.ruleId,
      check: flag.check,
      severity: flag.severity,
      metric: flag.metric,
      message: flag.message,
      setId: flag.setId,
      acquiredAt: flag.acquiredAt,
    });
    latest.set(flag.controlId, perControl);
  }
  return [...latest.entries()]
    .sort(([a], [b]) => a.localeCompare(b))
    .map(([controlId, flags]) => ({ controlId, flags: [...flags.values()] }));
}
