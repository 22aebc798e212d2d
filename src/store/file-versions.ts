// Typed queries on input versions: earlier contents of a file that changed at its path after it was
// read, and the ledger changes that take the new content as the file's current version.
import type { Ledger } from './ledger.js';
import type { FileRecord } from './files.js';

/** An earlier version of an input, replaced by the content now recorded for the file. */
export interface FileVersionRecord {
  readonly fileId: number;
  readonly setId: string | null;
  readonly name: string;
  readonly sha256: string;
  readonly sizeBytes: number;
  readonly firstSeenAt: string;
  readonly replacedAt: string;
  /** Where that version's bytes are kept (its archive copy), or null when it was overwritten in place. */
  readonly location: string | null;
  /** sha256 of the result file the set had from that version, if one was committed. */
  readonly resultSha256: string | null;
  /** Why it was replaced (one sentence). */
  readonly reason: string;
}

interface FileVersionRow {
  file_id: number;
  set_id: string | null;
  name: string;
  sha256: string;
  size_bytes: number;
  first_seen_at: string;
  replaced_at: string;
  location: string | null;
  result_sha256: string | null;
  reason: string;
}

/** The new content of a file: what intake read at its path. */
export interface NewContent {
  readonly sha256: string;
  readonly sizeBytes: number;
}

/**
 * Takes `content` as the current version of `earlier` (inside the caller's transaction): the earlier
 * version goes to file_versions (with where its bytes are, if anywhere, and the set's result sha256),
 * and the file's row now describes the new content, back in state `seen` and in the inbox (its
 * archive and quarantine paths cleared; the caller assembles it again), or, with `keptAt`, at that
 * archive path (the earlier version was overwritten there by a writer that held the file open).
 */
export function replaceFileVersion(
  ledger: Ledger,
  earlier: FileRecord,
  content: NewContent,
  reason: string,
  now: Date,
  keptAt?: { archivePath: string },
): void {
  const result =
    earlier.setId === null
      ? undefined
      : (ledger.prepare('SELECT result_sha256 FROM results WHERE set_id = ?').get(earlier.setId) as
          { result_sha256: string } | undefined);
  ledger
    .prepare(
      `INSERT INTO file_versions (file_id, set_id, name, sha256, size_bytes, first_seen_at, replaced_at, location, result_sha256, reason)
    VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    )
    .run(
      earlier.id,
      earlier.setId,
      earlier.name,
      earlier.sha256,
      earlier.sizeBytes,
      earlier.firstSeenAt,
      now.toISOString(),
      keptAt === undefined ? (earlier.archivePath ?? earlier.quarantinePath) : null,
      result?.result_sha256 ?? null,
      reason,
    );
  ledger
    .prepare(
      `UPDATE files SET sha256 = ?, size_bytes = ?, state = 'seen', archive_path = ?, quarantine_path = NULL,
    error_code = NULL, error_message = NULL, updated_at = ? WHERE id = ?`,
    )
    .run(content.sha256, content.sizeBytes, keptAt?.archivePath ?? null, now.toISOString(), earlier.id);
}

/** Earlier versions of the inputs of `setId`, oldest first. */
export function versionsOfSet(ledger: Ledger, setId: string): FileVersionRecord[] {
  const rows = ledger
    .prepare('SELECT * FROM file_versions WHERE set_id = ? ORDER BY id')
    .all(setId) as FileVersionRow[];
  return rows.map((row) => ({
    fileId: row.file_id,
    setId: row.set_id,
    name: row.name,
    sha256: row.sha256,
    sizeBytes: row.size_bytes,
    firstSeenAt: row.first_seen_at,
    replacedAt: row.replaced_at,
    location: row.location,
    resultSha256: row.result_sha256,
    reason: row.reason,
  }));
}

/** How many earlier versions the inputs of `setId` have had (the set's next job is run `~v<count+1>`). */
export function versionCountOfSet(ledger: Ledger, setId: string): number {
  return (ledger.prepare('SELECT COUNT(*) AS n FROM file_versions WHERE set_id = ?').get(setId) as { n: number }).n;
}

/** Opens a queued, done or failed set again (a new version of one of its inputs arrived), until `deadlineAt`. */
export function reopenSet(ledger: Ledger, setId: string, deadlineAt: Date): void {
  ledger
    .prepare(
      `UPDATE sets SET state = 'open', deadline_at = ?, job_id = NULL, queued_at = NULL, done_at = NULL, error_code = NULL, error_message = NULL WHERE id = ?`,
    )
    .run(deadlineAt.toISOString(), setId);
}

/**
 * Lists the own data files of the done set `setId` (not quarantined) for an archive re-check (inside
 * the commit's transaction, before the files are moved): a writer that held one open may go on
 * writing into the archived copy. A file already listed starts over (`added_at` = `now`).
 */
export function addArchiveRechecks(ledger: Ledger, setId: string, now: Date): void {
  ledger
    .prepare(
      `INSERT OR REPLACE INTO archive_rechecks (file_id, added_at)
    SELECT id, ? FROM files WHERE set_id = ? AND state = 'done' AND data_type IN ('spectrum', 'decay') AND quarantine_path IS NULL`,
    )
    .run(now.toISOString(), setId);
}

/** A file listed for an archive re-check, with what the ledger says was analysed (size, sha256) and where it is now. */
export type ArchiveRecheck = Pick<FileRecord, 'id' | 'state' | 'archivePath' | 'sizeBytes' | 'sha256'> & {
  /** When it was listed (a new listing of the same file starts a new window). */
  readonly addedAt: string;
};

/** Every file listed for an archive re-check, oldest listing first. */
export function archiveRechecks(ledger: Ledger): ArchiveRecheck[] {
  return ledger
    .prepare(
      `SELECT f.id, f.state, f.archive_path AS archivePath, f.size_bytes AS sizeBytes, f.sha256, r.added_at AS addedAt
    FROM archive_rechecks r JOIN files f ON f.id = r.file_id ORDER BY r.added_at, r.file_id`,
    )
    .all() as ArchiveRecheck[];
}

/** Ends the archive re-check of the files `done` (each listed at the matching `addedAt`: a file listed again since keeps its new listing). */
export function removeArchiveRechecks(ledger: Ledger, done: readonly { id: number; addedAt: string }[]): void {
  if (done.length === 0) return;
  const remove = ledger.prepare('DELETE FROM archive_rechecks WHERE file_id = ? AND added_at = ?');
  ledger.transaction(() => {
    for (const { id, addedAt } of done) remove.run(id, addedAt);
  });
}

/** Queued sets with the job id each was queued under (recovery re-enqueues each under it: a set run again after a new input version has `SETID~vN`), oldest first. */
export function queuedSetJobs(ledger: Ledger): { id: string; jobId: string | null }[] {
  return ledger
    .prepare(`SELECT id, job_id AS jobId FROM sets WHERE state = 'queued' ORDER BY created_at, id`)
    .all() as { id: string; jobId: string | null }[];
}
