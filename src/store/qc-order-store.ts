// Ledger side of judging in acquisition order (issue 16.2): per-run rule verdicts, and the open
// state of stored flags recomputed from them (see src/qc/acquisition-order.ts).
import { compareAcquisition, localParts, openStateFromVerdicts, parseIsoToEpochMs } from '../qc/index.js';
import type { RuleVerdict, VerdictStatus } from '../qc/index.js';
import type { Ledger } from './ledger.js';

interface VerdictRow {
  set_id: string;
  flag_key: string;
  status: string;
  acquired_at_ms: number;
}
interface OpenFlagRow {
  id: number;
  set_id: string;
  flag_key: string;
  acquired_at: string;
  open: number;
}

/** Replaces the verdicts stored for a run. */
export function replaceVerdictsOfSet(ledger: Ledger, setId: string, verdicts: readonly RuleVerdict[]): void {
  ledger.database.prepare('DELETE FROM qc_verdicts WHERE set_id = ?').run(setId);
  const insert = ledger.database.prepare(
    'INSERT INTO qc_verdicts (set_id, flag_key, status, acquired_at_ms) VALUES (?, ?, ?, ?)',
  );
  for (const verdict of verdicts) insert.run(verdict.setId, verdict.key, verdict.status, verdict.acquiredAtMs);
}

/** Stored verdicts of the given keys. */
export function verdictsOf(ledger: Ledger, keys: readonly string[]): RuleVerdict[] {
  const select = ledger.database.prepare(
    'SELECT set_id, flag_key, status, acquired_at_ms FROM qc_verdicts WHERE flag_key = ?',
  );
  return keys.flatMap((key) =>
    (select.all(key) as VerdictRow[]).map((row) => ({
      setId: row.set_id,
      key: row.flag_key,
      status: row.status as VerdictStatus,
      acquiredAtMs: row.acquired_at_ms,
    })),
  );
}

/** Keys (rule|control|metric) with any stored verdict whose control is one of `scopes`. */
export function verdictKeysOfScopes(ledger: Ledger, scopes: readonly string[]): string[] {
  const rows = ledger.database.prepare('SELECT DISTINCT flag_key FROM qc_verdicts').all() as { flag_key: string }[];
  return rows.map((row) => row.flag_key).filter((key) => scopes.includes(key.split('|')[1] ?? ''));
}

/**
 * Sets each run flag of the keys open or closed from the verdicts: open when the newest deciding
 * verdict fired and the flag was acquired after the newest settled one. Returns the keys that went
 * from open to closed and from closed to open. Clock flags (no set) are left alone.
 */
export function reconcileOpenFlags(
  ledger: Ledger,
  keys: readonly string[],
  nowIso: string,
): { closed: string[]; opened: string[] } {
  const state = openStateFromVerdicts(verdictsOf(ledger, keys));
  const select = ledger.database.prepare(
    "SELECT id, set_id, flag_key, acquired_at, open FROM qc_flags WHERE flag_key = ? AND set_id != '' AND acknowledged_action_id IS NULL",
  );
  const setOpen = ledger.database.prepare('UPDATE qc_flags SET open = 1, recovered_at = NULL WHERE id = ?');
  const setClosed = ledger.database.prepare(
    'UPDATE qc_flags SET open = 0, recovered_at = COALESCE(recovered_at, ?) WHERE id = ?',
  );
  const closed: string[] = [];
  const opened: string[] = [];
  for (const key of keys) {
    const rows = select.all(key) as OpenFlagRow[];
    if (rows.length === 0) continue;
    const keyState = state.get(key);
    const wasOpen = rows.some((row) => row.open === 1);
    let isOpen = false;
    for (const row of rows) {
      const position = { acquiredAtMs: parseIsoToEpochMs(row.acquired_at) ?? 0, setId: row.set_id };
      const open =
        keyState?.open === true &&
        (keyState.lastSettled === undefined || compareAcquisition(position, keyState.lastSettled) > 0);
      isOpen ||= open;
      if (open && row.open !== 1) setOpen.run(row.id);
      if (!open && row.open === 1) setClosed.run(nowIso, row.id);
    }
    if (wasOpen && !isOpen) closed.push(key);
    if (!wasOpen && isOpen) opened.push(key);
  }
  return { closed, opened };
}

/** Closes open clock flags (control missing) of a control for local days up to the run's local day. */
export function closeClockFlagsCoveredBy(
  ledger: Ledger,
  controlId: string,
  acquiredAtIso: string,
  timeZone: string,
  nowIso: string,
): string[] {
  const runMs = parseIsoToEpochMs(acquiredAtIso);
  if (runMs === undefined) return [];
  const runDay = localParts(runMs, timeZone).date;
  const rows = ledger.database
    .prepare(
      "SELECT id, set_id, flag_key, acquired_at, open FROM qc_flags WHERE set_id = '' AND open = 1 AND control_id = ?",
    )
    .all(controlId) as OpenFlagRow[];
  const close = ledger.database.prepare('UPDATE qc_flags SET open = 0, recovered_at = ? WHERE id = ?');
  const keys: string[] = [];
  for (const row of rows) {
    const flagMs = parseIsoToEpochMs(row.acquired_at);
    if (flagMs === undefined || localParts(flagMs, timeZone).date > runDay) continue;
    close.run(nowIso, row.id);
    keys.push(row.flag_key);
  }
  return keys;
}

/** "set|rule|control|metric|check" of every flag stored for the given runs (to tell new flags from known ones). */
export function flagSignaturesOfSets(ledger: Ledger, setIds: readonly string[]): Set<string> {
  const select = ledger.database.prepare('SELECT flag_key, check_name FROM qc_flags WHERE set_id = ?');
  const signatures = new Set<string>();
  for (const setId of setIds) {
    for (const row of select.all(setId) as { flag_key: string; check_name: string }[])
      signatures.add(`${setId}|${row.flag_key}|${row.check_name}`);
  }
  return signatures;
}
