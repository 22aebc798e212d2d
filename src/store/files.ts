// Typed queries on the `files` table: every input file the pipeline has seen and its state.
import type { Ledger } from './ledger.js';

export const FILE_STATES = ['seen', 'assembled', 'queued', 'done', 'rejected', 'failed'] as const;
export type FileState = (typeof FILE_STATES)[number];

/** Where a stored acquisition time came from. */
export type AcquiredSource = 'metadata' | 'file-modified';

export interface FileRecord {
  readonly id: number;
  readonly sha256: string;
  /** Path where the file was first seen (in the inbox). */
  readonly path: string;
  readonly name: string;
  readonly sizeBytes: number;
  readonly firstSeenAt: string;
  readonly updatedAt: string;
  readonly state: FileState;
  readonly dataType: 'spectrum' | 'decay' | 'manifest' | null;
  readonly part: string | null;
  readonly role: string | null;
  readonly sampleId: string | null;
  /** Acquisition time as canonical UTC ISO 8601 (src/model/acquisition-time.ts), or null when unknown. */
  readonly acquiredAt: string | null;
  /** Where acquiredAt came from: the file's metadata, or its modification time when it carried none. */
  readonly acquiredSource: AcquiredSource | null;
  readonly excitationNm: number | null;
  readonly solvent: string | null;
  readonly hasIrfColumn: boolean;
  readonly setId: string | null;
  readonly archivePath: string | null;
  readonly quarantinePath: string | null;
  readonly errorCode: string | null;
  readonly errorMessage: string | null;
}

interface FileRow {
  id: number;
  sha256: string;
  path: string;
  name: string;
  size_bytes: number;
  first_seen_at: string;
  updated_at: string;
  state: FileState;
  data_type: FileRecord['dataType'];
  part: string | null;
  role: string | null;
  sample_id: string | null;
  acquired_at: string | null;
  acquired_source?: AcquiredSource | null;
  excitation_nm: number | null;
  solvent: string | null;
  has_irf_column: number;
  set_id: string | null;
  archive_path: string | null;
  quarantine_path: string | null;
  error_code: string | null;
  error_message: string | null;
}

function toRecord(row: FileRow): FileRecord {
  return {
    id: row.id,
    sha256: row.sha256,
    path: row.path,
    name: row.name,
    sizeBytes: row.size_bytes,
    firstSeenAt: row.first_seen_at,
    updatedAt: row.updated_at,
    state: row.state,
    dataType: row.data_type,
    part: row.part,
    role: row.role,
    sampleId: row.sample_id,
    acquiredAt: row.acquired_at,
    acquiredSource: row.acquired_source ?? null,
    excitationNm: row.excitation_nm,
    solvent: row.solvent,
    hasIrfColumn: row.has_irf_column === 1,
    setId: row.set_id,
    archivePath: row.archive_path,
    quarantinePath: row.quarantine_path,
    errorCode: row.error_code,
    errorMessage: row.error_message,
  };
}

/** What is known about a file when it is first recorded. */
export interface NewFile {
  readonly sha256: string;
  readonly path: string;
  readonly name: string;
  readonly sizeBytes: number;
}

/** Classification facts stored once the file has been read. */
export interface FileFacts {
  readonly dataType: 'spectrum' | 'decay' | 'manifest';
  readonly part: string | null;
  readonly role: string | null;
  readonly sampleId: string | null;
  /** Canonical UTC ISO 8601 acquisition time (readAcquisitionTime), or null for a manifest. */
  readonly acquiredAt: string | null;
  readonly acquiredSource?: AcquiredSource | null;
  readonly excitationNm: number | null;
  readonly solvent: string | null;
  readonly hasIrfColumn: boolean;
}

/** Inserts a file in state `seen` and returns its record. */
export function insertFile(ledger: Ledger, file: NewFile, now: Date): FileRecord {
  const id = insertFileId(ledger, file, now);
  const record = getFile(ledger, id);
  if (record === undefined) throw new Error(`ledger: file row ${id} vanished after insert`);
  return record;
}

/** Inserts a file in state `seen` and returns its id only (no read-back). */
export function insertFileId(ledger: Ledger, file: NewFile, now: Date): number {
  const at = now.toISOString();
  const info = ledger
    .prepare(
      `INSERT INTO files (sha256, path, name, size_bytes, first_seen_at, updated_at, state)
              VALUES (?, ?, ?, ?, ?, ?, 'seen')`,
    )
    .run(file.sha256, file.path, file.name, file.sizeBytes, at, at);
  return Number(info.lastInsertRowid);
}

/** The file with this id, if any. */
export function getFile(ledger: Ledger, id: number): FileRecord | undefined {
  const row = ledger.prepare('SELECT * FROM files WHERE id = ?').get(id) as FileRow | undefined;
  return row === undefined ? undefined : toRecord(row);
}

/** Every file with this content hash, oldest first. */
export function filesBySha256(ledger: Ledger, sha256: string): FileRecord[] {
  return (ledger.prepare('SELECT * FROM files WHERE sha256 = ? ORDER BY id').all(sha256) as FileRow[]).map(toRecord);
}

/** Files seen at `path`, oldest first. */
export function filesByPath(ledger: Ledger, path: string): FileRecord[] {
  return (ledger.prepare('SELECT * FROM files WHERE path = ? ORDER BY id').all(path) as FileRow[]).map(toRecord);
}

/** SQL of filesAwaitingMove for `count` states (partial index files_unplaced; exported for the query-plan test). */
export function filesAwaitingMoveSql(count: number): string {
  return `SELECT * FROM files WHERE state IN (${Array.from({ length: count }, () => '?').join(',')}) AND archive_path IS NULL AND quarantine_path IS NULL ORDER BY id`;
}

/** Files in one of `states` not yet moved to the archive or quarantine, oldest first (crash recovery). */
export function filesAwaitingMove(ledger: Ledger, states: readonly FileState[]): FileRecord[] {
  return (ledger.prepare(filesAwaitingMoveSql(states.length)).all(...states) as FileRow[]).map(toRecord);
}

/** The files belonging to a set (its own, not paired), oldest first. */
export function filesOfSet(ledger: Ledger, setId: string): FileRecord[] {
  return (ledger.prepare('SELECT * FROM files WHERE set_id = ? ORDER BY id').all(setId) as FileRow[]).map(toRecord);
}

/** A done own file of a set still waiting for its archive move: only what the move needs. */
export type FileToArchive = Pick<FileRecord, 'id' | 'path' | 'name' | 'firstSeenAt'>;

/** SQL of filesToArchive (index files_set; exported for the query-plan test). */
export const FILES_TO_ARCHIVE_SQL = `SELECT id, path, name, first_seen_at AS firstSeenAt FROM files WHERE set_id = ? AND state = 'done' AND archive_path IS NULL ORDER BY id`;

/** The done own files of a set not yet moved to the archive, oldest first (the commit's archive moves; fewer columns than filesOfSet). */
export function filesToArchive(ledger: Ledger, setId: string): FileToArchive[] {
  return ledger.prepare(FILES_TO_ARCHIVE_SQL).all(setId) as FileToArchive[];
}

/** Stores the classification of a file read successfully. */
function setFileFacts(ledger: Ledger, id: number, facts: FileFacts, now: Date): void {
  ledger
    .prepare(
      `UPDATE files SET data_type = ?, part = ?, role = ?, sample_id = ?, acquired_at = ?, acquired_source = ?, excitation_nm = ?,
              solvent = ?, has_irf_column = ?, updated_at = ? WHERE id = ?`,
    )
    .run(
      facts.dataType,
      facts.part,
      facts.role,
      facts.sampleId,
      facts.acquiredAt,
      facts.acquiredSource ?? null,
      facts.excitationNm,
      facts.solvent,
      facts.hasIrfColumn ? 1 : 0,
      now.toISOString(),
      id,
    );
}

/** Records a file that was read and placed in set `setId` (state `assembled`, with its facts) in one statement; returns its id. */
export function insertAssembledFile(ledger: Ledger, file: NewFile, facts: FileFacts, setId: string, now: Date): number {
  const at = now.toISOString();
  const info = ledger
    .prepare(
      `INSERT INTO files (sha256, path, name, size_bytes, first_seen_at, updated_at, state, data_type, part, role, sample_id,
              acquired_at, acquired_source, excitation_nm, solvent, has_irf_column, set_id)
              VALUES (?, ?, ?, ?, ?, ?, 'assembled', ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    )
    .run(
      file.sha256,
      file.path,
      file.name,
      file.sizeBytes,
      at,
      at,
      facts.dataType,
      facts.part,
      facts.role,
      facts.sampleId,
      facts.acquiredAt,
      facts.acquiredSource ?? null,
      facts.excitationNm,
      facts.solvent,
      facts.hasIrfColumn ? 1 : 0,
      setId,
    );
  return Number(info.lastInsertRowid);
}

/** Stores the facts of a file recorded earlier and places it in set `setId` (state `assembled`). */
export function assembleRecordedFile(ledger: Ledger, id: number, facts: FileFacts, setId: string, now: Date): void {
  setFileFacts(ledger, id, facts, now);
  setFileState(ledger, id, 'assembled', now, setId);
}

/** Moves an assembled file into set `setId` as `part` (a manifest claiming it); `role` null keeps its role. */
export function moveFileToSet(ledger: Ledger, id: number, setId: string, part: string, role: string | null): void {
  ledger
    .prepare('UPDATE files SET set_id = ?, part = ?, role = COALESCE(?, role) WHERE id = ?')
    .run(setId, part, role, id);
}

/** Moves a file to `state`, optionally attaching it to a set. */
export function setFileState(ledger: Ledger, id: number, state: FileState, now: Date, setId?: string | null): void {
  if (setId === undefined) {
    ledger.prepare('UPDATE files SET state = ?, updated_at = ? WHERE id = ?').run(state, now.toISOString(), id);
  } else {
    ledger
      .prepare('UPDATE files SET state = ?, set_id = ?, updated_at = ? WHERE id = ?')
      .run(state, setId, now.toISOString(), id);
  }
}

/** Moves every own file of a set to `state`. */
export function setFilesOfSetState(ledger: Ledger, setId: string, state: FileState, now: Date): void {
  ledger.prepare('UPDATE files SET state = ?, updated_at = ? WHERE set_id = ?').run(state, now.toISOString(), setId);
}

/** Moves the own files of a set that are in state `from` to state `to` (e.g. assembled → queued at dispatch). */
export function advanceFilesOfSet(ledger: Ledger, setId: string, from: FileState, to: FileState, now: Date): void {
  ledger
    .prepare('UPDATE files SET state = ?, updated_at = ? WHERE set_id = ? AND state = ?')
    .run(to, now.toISOString(), setId, from);
}

/** Marks a file rejected or failed with its error (and where it was quarantined). */
export function setFileError(
  ledger: Ledger,
  id: number,
  state: 'rejected' | 'failed',
  error: { code: string; message: string },
  now: Date,
): void {
  ledger
    .prepare('UPDATE files SET state = ?, error_code = ?, error_message = ?, updated_at = ? WHERE id = ?')
    .run(state, error.code, error.message, now.toISOString(), id);
}

/** Records where a file now lives after an archive or quarantine move. */
export function setFileLocation(
  ledger: Ledger,
  id: number,
  where: { archivePath?: string; quarantinePath?: string },
  now: Date,
): void {
  if (where.archivePath !== undefined) {
    ledger
      .prepare('UPDATE files SET archive_path = ?, updated_at = ? WHERE id = ?')
      .run(where.archivePath, now.toISOString(), id);
  }
  if (where.quarantinePath !== undefined) {
    ledger
      .prepare('UPDATE files SET quarantine_path = ?, updated_at = ? WHERE id = ?')
      .run(where.quarantinePath, now.toISOString(), id);
  }
}

/** What pairing needs of a candidate file: who it is, whose set it belongs to, and when it was measured (acquiredAt, else firstSeenAt). */
export type PairingFile = Pick<FileRecord, 'id' | 'setId' | 'sampleId' | 'acquiredAt' | 'firstSeenAt'>;

const PAIRING_COLUMNS =
  'id, set_id AS setId, sample_id AS sampleId, acquired_at AS acquiredAt, first_seen_at AS firstSeenAt';

/** SQL of pairingCandidates (walks index files_part_seen newest first; exported for the query-plan test). Only the columns pairing uses: up to `limit` rows are read per dispatch. */
export const PAIRING_CANDIDATES_SQL = `SELECT ${PAIRING_COLUMNS} FROM files WHERE part = ? AND state IN ('assembled','queued','done') ORDER BY first_seen_at DESC, id DESC LIMIT ?`;

/** Pairing candidates: the newest `limit` files of `part` (by first seen) not rejected; the caller filters by measurement time. */
export function pairingCandidates(ledger: Ledger, part: string, limit = 200): PairingFile[] {
  return ledger.prepare(PAIRING_CANDIDATES_SQL).all(part, limit) as PairingFile[];
}

/** SQL of decayIrfCandidates (the partial index files_irf_decays, named because the planner would otherwise walk every decay). */
export const DECAY_IRF_CANDIDATES_SQL = `SELECT ${PAIRING_COLUMNS} FROM files INDEXED BY files_irf_decays WHERE part = 'decay' AND has_irf_column = 1
  AND state IN ('assembled','queued','done') ORDER BY first_seen_at DESC, id DESC LIMIT ?`;

/** Decay files that carry their own IRF column (usable as an IRF), newest first. */
export function decayIrfCandidates(ledger: Ledger, limit = 200): PairingFile[] {
  return ledger.prepare(DECAY_IRF_CANDIDATES_SQL).all(limit) as PairingFile[];
}
