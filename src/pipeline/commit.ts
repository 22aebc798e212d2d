// Committing a finished job, in the order that makes a crash at any moment recoverable:
// result JSON (atomic) → outbox files → ledger transaction (set done, results index, files done)
// → archive moves (each recorded). A failed set's files go to quarantine with the reason, and so do
// own files the worker's readers rejected (the set's result then reports that part missing).
import { createHash } from 'node:crypto';
import { dirname, join } from 'node:path';
import { fsyncDirectoryAsync } from '../output/atomic-write.js';
import type { AnalysisOutput, RejectedInput } from '../analysis/payload.js';
import type { AnalysisResult } from '../analysis/result.js';
import type { DriftlightConfig } from '../config/resolve.js';
import { InputRejected } from '../model/errors.js';
import type { ErrorCode } from '../model/error-codes.js';
import type { Ledger } from '../store/ledger.js';
import { filesOfSet, setFileError, setFileLocation, setFilesOfSetState, type FileRecord } from '../store/files.js';
import { upsertResult } from '../store/results.js';
import { getSet, markSetDone, markSetFailed } from '../store/sets.js';
import { dayFolderName, uniqueTarget } from '../output/dated-path.js';
import { moveFile } from '../output/move-file.js';
import { writeOutbox } from '../output/outbox-writer.js';
import { writeResult } from '../output/result-writer.js';
import { rejectFile } from './intake.js';

/** Writes the result and outbox, records the set done, archives its files and quarantines the ones the worker rejected; returns the result path and how many were rejected. */
export async function commitResult(ledger: Ledger, config: DriftlightConfig, output: AnalysisOutput, result: AnalysisResult, now: Date): Promise<{ path: string; filesRejected: number }> {
  const set = getSet(ledger, result.setId);
  if (set === undefined) throw new Error(`ledger: set ${result.setId} does not exist`);
  const createdAt = new Date(set.createdAt);
  const written = await writeResult(config.folders.results, result, createdAt);
  writeOutbox(config.folders.outbox, result.setId, createdAt, output.artifacts);
  const rejected = rejectedOwnFiles(ledger, result.setId, output.rejectedInputs ?? []);
  ledger.transaction(() => {
    markSetDone(ledger, result.setId, written.path, result.partial, now);
    upsertResult(ledger, {
      setId: result.setId, path: written.path, sampleId: result.sampleId, role: result.role,
      acquiredAt: result.acquiredAt ?? null, analyzedAt: result.provenance.analyzedAt, partial: result.partial,
      tauMeanNs: result.decayFit?.tauMeanIntensityNs ?? null, quantumYield: result.quantumYield?.value ?? null,
      krPerS: result.rates?.krPerS ?? null, knrPerS: result.rates?.knrPerS ?? null, configHash: result.provenance.configHash,
      resultSha256: written.sha256, flagsJson: JSON.stringify(result.qc.flags),
    });
    setFilesOfSetState(ledger, result.setId, 'done', now);
    for (const { file, reason } of rejected) setFileError(ledger, file.id, 'rejected', reason, now);
  });
  await archiveSetFiles(ledger, config, result.setId, now);
  for (const { file, reason } of rejected) {
    const error = new InputRejected(reason.code as ErrorCode, reason.message, { hint: reason.hint, file: file.name, ...(reason.line === undefined ? {} : { line: reason.line }) });
    rejectFile(ledger, config, file, error, now, 'rejected', result.setId);
  }
  return { path: written.path, filesRejected: rejected.length };
}

/** The set's own files (still in the inbox) that the worker's readers rejected, each with its reason. */
function rejectedOwnFiles(ledger: Ledger, setId: string, rejectedInputs: readonly RejectedInput[]): { file: FileRecord; reason: RejectedInput }[] {
  if (rejectedInputs.length === 0) return [];
  const out: { file: FileRecord; reason: RejectedInput }[] = [];
  for (const file of filesOfSet(ledger, setId)) {
    const reason = rejectedInputs.find((r) => r.sha256 === file.sha256 && r.name === file.name);
    if (reason !== undefined && file.archivePath === null && file.quarantinePath === null) out.push({ file, reason });
  }
  return out;
}

/** Moves every own file of a done set that is still in the inbox to archive/YYYY-MM-DD/ (idempotent). */
export async function archiveSetFiles(ledger: Ledger, config: DriftlightConfig, setId: string, now: Date): Promise<void> {
  const moved: { id: number; target: string }[] = [];
  for (const file of filesOfSet(ledger, setId)) {
    if (file.archivePath !== null || file.state !== 'done') continue;
    const target = uniqueTarget(join(config.folders.archive, dayFolderName(new Date(file.firstSeenAt))), file.name);
    if (moveFile(file.path, target, { syncFolder: false })) moved.push({ id: file.id, target });
  }
  for (const dir of new Set(moved.map((m) => dirname(m.target)))) await fsyncDirectoryAsync(dir);
  if (moved.length > 0) ledger.transaction(() => { for (const m of moved) setFileLocation(ledger, m.id, { archivePath: m.target }, now); });
}

/** Records a set as failed and quarantines its own files with the failure. */
export function commitFailure(ledger: Ledger, config: DriftlightConfig, setId: string, failure: { code: string; message: string; hint?: string }, now: Date): void {
  ledger.transaction(() => {
    markSetFailed(ledger, setId, failure, now);
    for (const file of filesOfSet(ledger, setId)) {
      if (file.state !== 'rejected') setFileError(ledger, file.id, 'failed', failure, now);
    }
  });
  quarantineFailedFiles(ledger, config, setId, failure, now);
}

/** Quarantines the failed files of a set not yet moved (idempotent; used by recovery too). */
export function quarantineFailedFiles(ledger: Ledger, config: DriftlightConfig, setId: string, failure: { code: string; message: string; hint?: string }, now: Date): void {
  for (const file of filesOfSet(ledger, setId)) {
    if (file.state !== 'failed' || file.quarantinePath !== null) continue;
    const error = new InputRejected('SET_FAILED', `set ${setId} failed: ${failure.code}: ${failure.message}`, failure.hint === undefined ? {} : { hint: failure.hint });
    rejectFile(ledger, config, file, error, now, 'failed', setId);
  }
}

/** sha256 of a string (hex). */
export function sha256Text(text: string): string {
  return createHash('sha256').update(text).digest('hex');
}
