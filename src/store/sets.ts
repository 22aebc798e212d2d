// Typed queries on `sets` (measurement sets) and `set_pairings` (parts borrowed from other sets).
import type { Ledger } from './ledger.js';

export const SET_STATES = ['open', 'queued', 'done', 'failed'] as const;
export type SetState = (typeof SET_STATES)[number];
export type SetSource = 'manifest' | 'metadata' | 'pattern' | 'fallback';

export interface SetRecord {
  readonly id: string;
  readonly sampleId: string;
  readonly role: string;
  readonly source: SetSource;
  readonly state: SetState;
  readonly createdAt: string;
  readonly deadlineAt: string;
  readonly queuedAt: string | null;
  readonly doneAt: string | null;
  /** The manifest (JSON) when the set was declared by one. */
  readonly manifestJson: string | null;
  readonly jobId: string | null;
  readonly resultPath: string | null;
  readonly partial: boolean | null;
  readonly errorCode: string | null;
  readonly errorMessage: string | null;
}

interface SetRow {
  id: string;
  sample_id: string;
  role: string;
  source: SetSource;
  state: SetState;
  created_at: string;
  deadline_at: string;
  queued_at: string | null;
  done_at: string | null;
  manifest_json: string | null;
  job_id: string | null;
  result_path: string | null;
  partial: number | null;
  error_code: string | null;
  error_message: string | null;
}

function toRecord(row: SetRow): SetRecord {
  return {
    id: row.id,
    sampleId: row.sample_id,
    role: row.role,
    source: row.source,
    state: row.state,
    createdAt: row.created_at,
    deadlineAt: row.deadline_at,
    queuedAt: row.queued_at,
    doneAt: row.done_at,
    manifestJson: row.manifest_json,
    jobId: row.job_id,
    resultPath: row.result_path,
    partial: row.partial === null ? null : row.partial === 1,
    errorCode: row.error_code,
    errorMessage: row.error_message,
  };
}

export interface NewSet {
  readonly id: string;
  readonly sampleId: string;
  readonly role: string;
  readonly source: SetSource;
  readonly createdAt: Date;
  readonly deadlineAt: Date;
  readonly manifestJson?: string;
}

/** Inserts an open set. */
export function insertSet(ledger: Ledger, set: NewSet): void {
  ledger
    .prepare(
      `INSERT INTO sets (id, sample_id, role, source, state, created_at, deadline_at, manifest_json)
              VALUES (?, ?, ?, ?, 'open', ?, ?, ?)`,
    )
    .run(
      set.id,
      set.sampleId,
      set.role,
      set.source,
      set.createdAt.toISOString(),
      set.deadlineAt.toISOString(),
      set.manifestJson ?? null,
    );
}

/** The set with this id, if any. */
export function getSet(ledger: Ledger, id: string): SetRecord | undefined {
  const row = ledger.prepare('SELECT * FROM sets WHERE id = ?').get(id) as SetRow | undefined;
  return row === undefined ? undefined : toRecord(row);
}

/** Sets in `state`, oldest first. */
export function setsInState(ledger: Ledger, state: SetState): SetRecord[] {
  return (ledger.prepare('SELECT * FROM sets WHERE state = ? ORDER BY created_at, id').all(state) as SetRow[]).map(
    toRecord,
  );
}

/** Finished sets created at or after `since`, oldest first (for reprocess). */
export function finishedSetsSince(ledger: Ledger, since: Date): SetRecord[] {
  return (
    ledger
      .prepare(`SELECT * FROM sets WHERE state IN ('done','failed') AND created_at >= ? ORDER BY created_at, id`)
      .all(since.toISOString()) as SetRow[]
  ).map(toRecord);
}

/** Deletes an open set left without files (its files were claimed by a manifest). */
export function deleteOpenSet(ledger: Ledger, id: string): void {
  ledger.prepare(`DELETE FROM sets WHERE id = ? AND state = 'open'`).run(id);
}

/** Marks a set queued under `jobId`. */
export function markSetQueued(ledger: Ledger, id: string, jobId: string, now: Date): void {
  ledger
    .prepare(`UPDATE sets SET state = 'queued', job_id = ?, queued_at = ? WHERE id = ?`)
    .run(jobId, now.toISOString(), id);
}

/** Marks a set done with its result path. */
export function markSetDone(ledger: Ledger, id: string, resultPath: string, partial: boolean, now: Date): void {
  ledger
    .prepare(
      `UPDATE sets SET state = 'done', result_path = ?, partial = ?, done_at = ?, error_code = NULL, error_message = NULL WHERE id = ?`,
    )
    .run(resultPath, partial ? 1 : 0, now.toISOString(), id);
}

/** Marks a set failed with its error. */
export function markSetFailed(ledger: Ledger, id: string, error: { code: string; message: string }, now: Date): void {
  ledger
    .prepare(`UPDATE sets SET state = 'failed', error_code = ?, error_message = ?, done_at = ? WHERE id = ?`)
    .run(error.code, error.message, now.toISOString(), id);
}

/** SQL of recentReferenceSetIds (index sets_role_created newest first; exported for the query-plan test). */
export const RECENT_REFERENCE_SETS_SQL = `SELECT id FROM sets WHERE role = 'reference' AND state IN ('queued','done') AND id != ?
  ORDER BY created_at DESC, id DESC LIMIT ?`;

/** SQL of referenceSetIdsMeasuredBetween (index files_part_acquired; exported for the query-plan test). */
export const REFERENCE_SETS_MEASURED_SQL = `SELECT DISTINCT f.set_id AS id FROM files f INDEXED BY files_part_acquired JOIN sets s ON s.id = f.set_id
  WHERE f.part = 'emission' AND f.acquired_at >= ? AND f.acquired_at <= ? AND s.role = 'reference' AND s.state IN ('queued','done') AND s.id != ?`;

/**
 * Ids of reference-standard sets queued or done, other than `excludeSetId`, whose emission was
 * measured within [fromIso, toIso] (canonical UTC ISO): a backlog holding more reference sets than
 * recentReferenceSetIds returns still finds the ones measured near a sample. O(files in the window).
 */
export function referenceSetIdsMeasuredBetween(
  ledger: Ledger,
  excludeSetId: string,
  fromIso: string,
  toIso: string,
): string[] {
  return (ledger.prepare(REFERENCE_SETS_MEASURED_SQL).all(fromIso, toIso, excludeSetId) as { id: string }[]).map(
    (row) => row.id,
  );
}

/** Ids of the newest `limit` reference-standard sets queued or done, other than `excludeSetId`. */
export function recentReferenceSetIds(ledger: Ledger, excludeSetId: string, limit = 50): string[] {
  return (ledger.prepare(RECENT_REFERENCE_SETS_SQL).all(excludeSetId, limit) as { id: string }[]).map((row) => row.id);
}

export interface PairingRecord {
  readonly setId: string;
  readonly part: string;
  readonly fileId: number;
  readonly fromSetId: string | null;
}

/** Records that `setId` borrowed file `fileId` as `part` (idempotent). */
export function insertPairing(ledger: Ledger, pairing: PairingRecord): void {
  ledger
    .prepare('INSERT OR IGNORE INTO set_pairings (set_id, part, file_id, from_set_id) VALUES (?, ?, ?, ?)')
    .run(pairing.setId, pairing.part, pairing.fileId, pairing.fromSetId);
}

/** Forgets the pairings of `setId` for the given parts (before a re-analysis chooses them again). */
export function deletePairingsOfSet(ledger: Ledger, setId: string, parts: readonly string[]): void {
  const remove = ledger.prepare('DELETE FROM set_pairings WHERE set_id = ? AND part = ?');
  for (const part of parts) remove.run(setId, part);
}

/** SQL of doneSampleSetIdsMeasuredBetween (index files_part_acquired). */
export const DONE_SAMPLE_SETS_MEASURED_SQL = `SELECT DISTINCT f.set_id AS id FROM files f INDEXED BY files_part_acquired JOIN sets s ON s.id = f.set_id
  WHERE f.part = 'emission' AND f.acquired_at >= ? AND f.acquired_at <= ? AND s.role IN ('sample','control') AND s.state = 'done'`;

/** Ids of sample and control sets done whose emission was measured within [fromIso, toIso] (canonical UTC ISO). O(files in the window). */
export function doneSampleSetIdsMeasuredBetween(ledger: Ledger, fromIso: string, toIso: string): string[] {
  return (ledger.prepare(DONE_SAMPLE_SETS_MEASURED_SQL).all(fromIso, toIso) as { id: string }[]).map((row) => row.id);
}

/** The parts a set borrowed. */
export function pairingsOfSet(ledger: Ledger, setId: string): PairingRecord[] {
  return (
    ledger.prepare('SELECT set_id, part, file_id, from_set_id FROM set_pairings WHERE set_id = ?').all(setId) as {
      set_id: string;
      part: string;
      file_id: number;
      from_set_id: string | null;
    }[]
  ).map((r) => ({ setId: r.set_id, part: r.part, fileId: r.file_id, fromSetId: r.from_set_id }));
}
