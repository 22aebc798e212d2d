// Committing finished jobs, in the order that makes a crash at any moment recoverable:
// result JSONs (atomic, fsynced) → outbox files → ledger transaction (sets done, results index,
// files done and listed for the archive re-check of version-watch.ts; durable: the WAL is fsynced
// before any file moves) → archive moves, whose new paths
// are recorded in the next batch's transaction (or on their own when no batch follows at once).
// Jobs finishing together are committed as one batch. Until a move is recorded, dispatch finds the
// moved copy by its sha256 (dispatch.ts readInput), and so does recovery after a crash.
// A failed set's files go to quarantine with the reason, and so do own files the worker's readers
// rejected (the set's result then reports that part missing).
import { dirname } from 'node:path';
import { fsyncDirectoryAsync } from '../output/atomic-write.js';
import type { AnalysisOutput, RejectedInput } from '../analysis/payload.js';
import type { AnalysisResult } from '../analysis/result.js';
import type { DriftlightConfig } from '../config/resolve.js';
import { InputRejected } from '../model/errors.js';
import type { ErrorCode } from '../model/error-codes.js';
import type { Ledger } from '../store/ledger.js';
import {
  filesOfSet,
  filesToArchive,
  setFileError,
  setFileLocation,
  setFilesOfSetState,
  type FileRecord,
} from '../store/files.js';
import { upsertResult, type ResultIndexRecord } from '../store/results.js';
import { addArchiveRechecks } from '../store/file-versions.js';
import { markSetDone, markSetFailed } from '../store/sets.js';
import { uniqueTarget } from '../output/dated-path.js';
import { acquisitionEpochMs } from '../model/acquisition-time.js';
import { moveFile } from '../output/move-file.js';
import { writeOutbox } from '../output/outbox-writer.js';
import { writeResult } from '../output/result-writer.js';
import { archiveFolderOf, rejectFile } from './intake.js';
import { recordAnalysisDuration } from '../store/metrics-queries.js';

/** One finished set to commit: the worker's output, the result after the result stages, and when the set was created (the day folders are named by the result's acquisition time, else by this). */
export interface CommitItem {
  readonly output: AnalysisOutput;
  readonly result: AnalysisResult;
  readonly setCreatedAt: Date;
}

/** The time a set's result and outbox are filed by: its acquisition time (read at intake), else when the set was created. */
function filedAt(item: CommitItem): Date {
  const epochMs = item.result.acquiredAt === undefined ? undefined : acquisitionEpochMs(item.result.acquiredAt);
  return epochMs === undefined ? item.setCreatedAt : new Date(epochMs);
}

/**
 * What became of one item of a batch commit: its result path and rejected-file count, or the error
 * that left it queued. `movesFailed` is the error of file moves that failed after the set was
 * committed done: its inputs stay in the inbox until a later recoverMoves() moves them.
 */
export type CommitItemOutcome =
  | {
      readonly ok: true;
      readonly setId: string;
      readonly path: string;
      readonly filesRejected: number;
      readonly movesFailed?: unknown;
    }
  | { readonly ok: false; readonly setId: string; readonly error: unknown };

/** An archive move done and not yet recorded in the ledger: the file's id and where it went. */
export interface ArchivedFile {
  readonly id: number;
  readonly archivePath: string;
}

/** What commitResults did: one outcome per item, and the archive moves it made, which the caller records later (earlierMoves of the next call, or recordArchiveMoves). */
export interface CommitBatchResult {
  readonly outcomes: CommitItemOutcome[];
  readonly unrecordedMoves: ArchivedFile[];
}

/**
 * Commits a batch of finished sets (group commit): result JSONs written in parallel, one fsync per
 * result folder, outbox files, one ledger transaction for every set (which also records
 * `earlierMoves`, the archive moves of earlier batches), archive moves with one fsync per archive
 * folder, then own files the worker rejected go to quarantine. The new archive moves come back
 * unrecorded (with `earlierMoves` when no transaction ran): one transaction fewer per batch. An item
 * whose result or outbox cannot be written is not committed (the caller keeps it queued) without
 * holding back the others. Moves that fail once the ledger says done do not undo the commit: the
 * item reports them in `movesFailed` and recoverMoves() finishes them later. Throws only when the
 * ledger transaction fails (rolled back: nothing of it, `earlierMoves` included, was recorded).
 */
export async function commitResults(
  ledger: Ledger,
  config: DriftlightConfig,
  items: readonly CommitItem[],
  now: Date,
  earlierMoves: readonly ArchivedFile[] = [],
): Promise<CommitBatchResult> {
  const outcomes = new Map<string, CommitItemOutcome>();
  const written = await Promise.all(
    items.map(async (item) => {
      const setId = item.result.setId;
      try {
        const options = { syncFolder: false, timeZone: config.instrument.timeZone };
        // A file holding several measurements gives one result each (issue 18.3): all are written before the set counts as done.
        const [file, ...more] = await Promise.all(
          [item.result, ...(item.output.measurements ?? []).map((m) => m.result)].map((result) =>
            writeResult(config.folders.results, result, filedAt(item), options),
          ),
        );
        if (file === undefined) throw new Error(`no result file written for ${setId}`);
        return { item, file, more };
      } catch (error) {
        outcomes.set(setId, { ok: false, setId, error });
        return undefined;
      }
    }),
  );
  const durable = written.filter((w) => w !== undefined);
  await Promise.all(
    [...new Set(durable.flatMap((w) => [w.file, ...w.more].map((f) => dirname(f.path))))].map((dir) =>
      fsyncDirectoryAsync(dir),
    ),
  );
  const committed: {
    item: CommitItem;
    path: string;
    sha256: string;
    more: readonly { path: string; sha256: string }[];
    rejected: { file: FileRecord; reason: RejectedInput }[];
  }[] = [];
  for (const { item, file, more } of durable) {
    const setId = item.result.setId;
    try {
      writeOutbox(config.folders.outbox, setId, filedAt(item), item.output.artifacts, config.instrument.timeZone);
      for (const measurement of item.output.measurements ?? []) {
        writeOutbox(
          config.folders.outbox,
          measurement.result.setId,
          filedAt(item),
          measurement.artifacts,
          config.instrument.timeZone,
        );
      }
      const rejectedInputs = item.output.rejectedInputs ?? [];
      const rejected = rejectedInputs.length === 0 ? [] : rejectedOwnFiles(filesOfSet(ledger, setId), rejectedInputs);
      committed.push({ item, path: file.path, sha256: file.sha256, more, rejected });
    } catch (error) {
      outcomes.set(setId, { ok: false, setId, error });
    }
  }
  if (committed.length > 0) {
    ledger.durableTransaction(() => {
      recordMoves(ledger, earlierMoves, now);
      for (const {
        item: { result, output },
        path,
        sha256,
        more,
        rejected,
      } of committed) {
        markSetDone(ledger, result.setId, path, result.partial, now);
        if (output.analysisDurationMs !== undefined)
          recordAnalysisDuration(ledger, result.setId, output.analysisDurationMs, now.toISOString());
        upsertResult(ledger, resultIndexRecord(result, path, sha256));
        (output.measurements ?? []).forEach((measurement, index) => {
          const file = more[index];
          if (file !== undefined) upsertResult(ledger, resultIndexRecord(measurement.result, file.path, file.sha256));
        });
        setFilesOfSetState(ledger, result.setId, 'done', now);
        for (const { file, reason } of rejected) setFileError(ledger, file.id, 'rejected', reason, now);
        // Before the moves: a file that grows after its move, even after a crash, is looked at again.
        addArchiveRechecks(ledger, result.setId, now);
      }
    });
  }
  let archiveError: unknown;
  const unrecordedMoves: ArchivedFile[] = committed.length > 0 ? [] : [...earlierMoves];
  if (committed.length > 0) {
    try {
      await archiveSetFiles(
        ledger,
        config,
        committed.map((c) => c.item.result.setId),
        unrecordedMoves,
      );
    } catch (error) {
      archiveError = error;
    }
  }
  for (const {
    item: { result },
    path,
    rejected,
  } of committed) {
    const quarantineError = errorOf(() => quarantineRejectedOwnFiles(ledger, config, result.setId, rejected, now));
    const movesFailed = archiveError ?? quarantineError;
    outcomes.set(result.setId, {
      ok: true,
      setId: result.setId,
      path,
      filesRejected: rejected.length,
      ...(movesFailed === undefined ? {} : { movesFailed }),
    });
  }
  return {
    outcomes: items.map(
      (item) =>
        outcomes.get(item.result.setId) ?? { ok: false, setId: item.result.setId, error: new Error('not committed') },
    ),
    unrecordedMoves,
  };
}

/** The results-index row of a written result. */
function resultIndexRecord(result: AnalysisResult, path: string, sha256: string): ResultIndexRecord {
  return {
    setId: result.setId,
    path,
    sampleId: result.sampleId,
    role: result.role,
    acquiredAt: result.acquiredAt ?? null,
    analyzedAt: result.provenance.analyzedAt,
    partial: result.partial,
    tauMeanNs: result.decayFit?.tauMeanIntensityNs ?? null,
    quantumYield: result.quantumYield?.value ?? null,
    krPerS: result.rates?.krPerS ?? null,
    knrPerS: result.rates?.knrPerS ?? null,
    configHash: result.provenance.configHash,
    resultSha256: sha256,
    flagsJson: JSON.stringify(result.qc.flags),
  };
}

/** Among a set's own files (`files`), those still in the inbox that the worker's readers rejected, each with its reason. */
function rejectedOwnFiles(
  files: readonly FileRecord[],
  rejectedInputs: readonly RejectedInput[],
): { file: FileRecord; reason: RejectedInput }[] {
  const out: { file: FileRecord; reason: RejectedInput }[] = [];
  for (const file of files) {
    const reason = rejectedInputs.find((r) => r.sha256 === file.sha256 && r.name === file.name);
    if (reason !== undefined && file.archivePath === null && file.quarantinePath === null) out.push({ file, reason });
  }
  return out;
}

/** Quarantines own files of `setId` the worker's readers rejected, each with its own reason (code, line, hint). */
function quarantineRejectedOwnFiles(
  ledger: Ledger,
  config: DriftlightConfig,
  setId: string,
  rejected: readonly { file: FileRecord; reason: RejectedInput }[],
  now: Date,
): void {
  for (const { file, reason } of rejected) {
    const error = new InputRejected(reason.code as ErrorCode, reason.message, {
      hint: reason.hint,
      file: file.name,
      ...(reason.line === undefined ? {} : { line: reason.line }),
    });
    rejectFile(ledger, config, file, error, now, 'rejected', setId);
  }
}

/**
 * Moves every own file of the done sets `setIds` still in the inbox to archive/YYYY-MM-DD/, with one
 * fsync per archive folder, and appends each move to `moved` as it happens (so a move made before a
 * later one fails is not lost); the caller records them (recordArchiveMoves, or the next commit).
 */
export async function archiveSetFiles(
  ledger: Ledger,
  config: DriftlightConfig,
  setIds: readonly string[],
  moved: ArchivedFile[],
): Promise<void> {
  const folders = new Set<string>();
  try {
    for (const setId of setIds) {
      for (const file of filesToArchive(ledger, setId)) {
        const target = uniqueTarget(archiveFolderOf(config, file), file.name);
        if (moveFile(file.path, target, { syncFolder: false })) {
          moved.push({ id: file.id, archivePath: target });
          folders.add(dirname(target));
        }
      }
    }
  } finally {
    await Promise.all([...folders].map((dir) => fsyncDirectoryAsync(dir)));
  }
}

/** Records archive moves in the ledger, in the caller's transaction. */
function recordMoves(ledger: Ledger, moves: readonly ArchivedFile[], now: Date): void {
  for (const m of moves) setFileLocation(ledger, m.id, { archivePath: m.archivePath }, now);
}

/** Records archive moves that no commit has recorded yet, in one transaction. */
export function recordArchiveMoves(ledger: Ledger, moves: readonly ArchivedFile[], now: Date): void {
  if (moves.length > 0) ledger.transaction(() => recordMoves(ledger, moves, now));
}

/**
 * When the worker's readers rejected every own data file of a set (files are classified from their
 * head at intake, so a file broken further down is found only there), the set fails instead of
 * getting an empty result: each file goes to quarantine with its own reason and the set records the
 * first one. Returns the number of files rejected (0 when some own file was readable) and the error
 * of quarantine moves that failed once the failure was recorded (the files then stay in the inbox
 * until a later recoverMoves()).
 */
export function commitUnreadableSet(
  ledger: Ledger,
  config: DriftlightConfig,
  setId: string,
  rejectedInputs: readonly RejectedInput[],
  now: Date,
): { files: number; movesFailed?: unknown } {
  if (rejectedInputs.length === 0) return { files: 0 };
  const files = filesOfSet(ledger, setId);
  const own = files.filter((f) => f.dataType !== 'manifest' && f.part !== null && f.state !== 'rejected');
  const rejected = rejectedOwnFiles(files, rejectedInputs);
  const first = rejected[0];
  if (first === undefined || rejected.length < own.length) return { files: 0 };
  const names = rejected.map((r) => r.file.name).join(', ');
  ledger.durableTransaction(() => {
    markSetFailed(
      ledger,
      setId,
      {
        code: first.reason.code,
        message: `no file of the set could be read (${names}); first: ${first.reason.message}`,
      },
      now,
    );
    for (const { file, reason } of rejected) setFileError(ledger, file.id, 'rejected', reason, now);
  });
  const movesFailed = errorOf(() => quarantineRejectedOwnFiles(ledger, config, setId, rejected, now));
  return { files: rejected.length, ...(movesFailed === undefined ? {} : { movesFailed }) };
}

/**
 * Records a set as failed and quarantines its own files with the failure. Returns the error of
 * quarantine moves that failed once the failure was recorded (the files then stay in the inbox until
 * a later recoverMoves()), or undefined; a ledger error is thrown.
 */
export function commitFailure(
  ledger: Ledger,
  config: DriftlightConfig,
  setId: string,
  failure: { code: string; message: string; hint?: string },
  now: Date,
): unknown {
  ledger.durableTransaction(() => {
    markSetFailed(ledger, setId, failure, now);
    for (const file of filesOfSet(ledger, setId)) {
      if (file.state !== 'rejected') setFileError(ledger, file.id, 'failed', failure, now);
    }
  });
  return errorOf(() => quarantineFailedFiles(ledger, config, setId, failure, now));
}

/** The error a failed set's own files are quarantined with (SET_FAILED, naming the set's failure); recovery words it the same way. */
export function setFailedError(
  setId: string,
  failure: { code: string; message: string; hint?: string },
): InputRejected {
  return new InputRejected(
    'SET_FAILED',
    `set ${setId} failed: ${failure.code}: ${failure.message}`,
    failure.hint === undefined ? {} : { hint: failure.hint },
  );
}

/** Quarantines the failed files of a set not yet moved (idempotent). */
export function quarantineFailedFiles(
  ledger: Ledger,
  config: DriftlightConfig,
  setId: string,
  failure: { code: string; message: string; hint?: string },
  now: Date,
): void {
  for (const file of filesOfSet(ledger, setId)) {
    if (file.state !== 'failed' || file.quarantinePath !== null) continue;
    rejectFile(ledger, config, file, setFailedError(setId, failure), now, 'failed', setId);
  }
}

/** Runs `work` and returns what it threw (undefined when it did not): for file moves that must not undo what the ledger already recorded. */
function errorOf(work: () => void): unknown {
  try {
    work();
    return undefined;
  } catch (error) {
    return error;
  }
}
