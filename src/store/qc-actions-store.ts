// What people did about QC (issue 16.7): acknowledge a flag, exclude a run from the baseline and
// the charts, rebaseline — each recorded with who, when and why in qc_actions (migration 0101).
import type { Ledger } from './ledger.js';

export type QcActionKind = 'acknowledge' | 'exclude' | 'include' | 'rebaseline';

export interface QcAction {
  readonly id: number;
  readonly action: QcActionKind;
  readonly controlId: string;
  readonly setId?: string | undefined;
  readonly flagKey?: string | undefined;
  readonly comment: string;
  readonly by: string;
  readonly atIso: string;
  readonly detail: Readonly<Record<string, unknown>>;
}

interface ActionRow {
  id: number;
  action: string;
  control_id: string;
  set_id: string | null;
  flag_key: string | null;
  comment: string;
  by_user: string;
  at_iso: string;
  detail_json: string;
}

/** Appends an action; returns its id. */
export function recordAction(ledger: Ledger, action: Omit<QcAction, 'id'>): number {
  const info = ledger.database
    .prepare(
      'INSERT INTO qc_actions (action, control_id, set_id, flag_key, comment, by_user, at_iso, detail_json) VALUES (?, ?, ?, ?, ?, ?, ?, ?)',
    )
    .run(
      action.action,
      action.controlId,
      action.setId ?? null,
      action.flagKey ?? null,
      action.comment,
      action.by,
      action.atIso,
      JSON.stringify(action.detail),
    );
  return Number(info.lastInsertRowid);
}

/** Every recorded action, oldest first. */
export function qcActions(ledger: Ledger): QcAction[] {
  const rows = ledger.database.prepare('SELECT * FROM qc_actions ORDER BY id').all() as ActionRow[];
  return rows.map((row) => ({
    id: row.id,
    action: row.action as QcActionKind,
    controlId: row.control_id,
    setId: row.set_id ?? undefined,
    flagKey: row.flag_key ?? undefined,
    comment: row.comment,
    by: row.by_user,
    atIso: row.at_iso,
    detail: JSON.parse(row.detail_json) as Record<string, unknown>,
  }));
}

/** Set ids currently excluded (the latest exclude/include action of each set decides). */
export function excludedSetIds(ledger: Ledger): Set<string> {
  const excluded = new Set<string>();
  for (const action of qcActions(ledger)) {
    if (action.setId === undefined) continue;
    if (action.action === 'exclude') excluded.add(action.setId);
    if (action.action === 'include') excluded.delete(action.setId);
  }
  return excluded;
}

/**
 * Marks the stored flags of a run (all keys, or one rule|control|metric key) as acknowledged by an
 * action; returns how many flags it marked. An acknowledged flag stays in the history and closes.
 */
export function acknowledgeFlags(
  ledger: Ledger,
  setId: string,
  key: string | undefined,
  actionId: number,
  atIso: string,
): number {
  const info =
    key === undefined
      ? ledger.database
          .prepare(
            'UPDATE qc_flags SET acknowledged_action_id = ?, open = 0, recovered_at = COALESCE(recovered_at, ?) WHERE set_id = ?',
          )
          .run(actionId, atIso, setId)
      : ledger.database
          .prepare(
            'UPDATE qc_flags SET acknowledged_action_id = ?, open = 0, recovered_at = COALESCE(recovered_at, ?) WHERE set_id = ? AND flag_key = ?',
          )
          .run(actionId, atIso, setId, key);
  return info.changes;
}
