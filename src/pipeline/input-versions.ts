// Inputs that change at their path after they were read (issue 20): a writer that pauses longer than
// the stability window, or a file rewritten in place. Before a result is committed the set's own
// inputs (in the inbox, or archived) are checked against what was analysed (size, then sha256); a changed
// input is taken again, once it is stable, as a new version of the same file in the same set, which
// is then run again: its result replaces the earlier one (same set id, same result file) and lists
// the versions it supersedes in provenance.supersededInputs. Never a second set for the sample.
// Files moved to the archive are looked at for a while too (a writer holding the file open goes on
// writing into the archived copy): they are listed in the ledger (archive_rechecks) in the commit's
// transaction, before the move, so a crash does not lose the look (version-watch.ts).
import { createHash } from 'node:crypto';
import { closeSync, openSync, readSync, statSync } from 'node:fs';
import type { AnalysisResult, SupersededInput } from '../analysis/result.js';
import type { Ledger } from '../store/ledger.js';
import { filesByPath, filesOfSet, type FileRecord } from '../store/files.js';
import { getSet } from '../store/sets.js';
import { versionsOfSet } from '../store/file-versions.js';
import type { Acquisition } from './intake.js';
import type { ResultStage } from './result-stage.js';

/** sha256 (hex) of the file at `path`, read in 1 MiB chunks; undefined when it is gone. */
export function sha256OfPath(path: string): string | undefined {
  let fd: number;
  try {
    fd = openSync(path, 'r');
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return undefined;
    throw error;
  }
  try {
    const hash = createHash('sha256');
    const chunk = Buffer.alloc(1024 * 1024);
    for (let n = readSync(fd, chunk); n > 0; n = readSync(fd, chunk)) hash.update(chunk.subarray(0, n));
    return hash.digest('hex');
  } finally {
    closeSync(fd);
  }
}

/** Own data files of a set that take part in its analysis (not its manifest, not rejected ones). */
function ownInputs(ledger: Ledger, setId: string): FileRecord[] {
  return filesOfSet(ledger, setId).filter(
    (f) => f.dataType !== 'manifest' && f.part !== null && f.state !== 'rejected',
  );
}

/**
 * The own inputs of `setId` whose bytes are no longer those recorded, where each is now (the inbox,
 * or the archive for an input taken again from its archived copy): a different size, or the same
 * size and a different sha256. A file gone is not reported (it was moved away; the commit and
 * recovery deal with that), nor a quarantined one.
 */
export function inputsChangedOnDisk(ledger: Ledger, setId: string): FileRecord[] {
  const changed: FileRecord[] = [];
  for (const file of ownInputs(ledger, setId)) {
    if (file.quarantinePath !== null) continue;
    const where = file.archivePath ?? file.path;
    const stat = statSync(where, { throwIfNoEntry: false });
    if (stat === undefined || !stat.isFile()) continue;
    if (stat.size !== file.sizeBytes) {
      changed.push(file);
      continue;
    }
    const sha256 = sha256OfPath(where);
    if (sha256 !== undefined && sha256 !== file.sha256) changed.push(file);
  }
  return changed;
}

/**
 * Whether `result` was computed from the set's current own inputs (names and sha256 in
 * provenance.inputs against the ledger): false when a new version of an input was taken while the
 * job ran, so the outcome is stale and a newer job of the set follows.
 */
export function analysedCurrentInputs(ledger: Ledger, setId: string, result: AnalysisResult): boolean {
  const key = (name: string, sha256: string): string => `${name}\0${sha256}`;
  const analysed = result.provenance.inputs
    .filter((i) => i.origin === 'own')
    .map((i) => key(i.file, i.sha256))
    .sort();
  const current = ownInputs(ledger, setId)
    .map((f) => key(f.name, f.sha256))
    .sort();
  return analysed.length === current.length && analysed.every((k, i) => k === current[i]);
}

/** What intake knows of a new content at a path: its sample id and data type, and when it was measured. */
export interface NewVersionCandidate {
  readonly path: string;
  readonly sampleId: string;
  readonly dataType: 'spectrum' | 'decay';
  readonly acquisition: Acquisition;
}

/**
 * The file an intake of new content at `candidate.path` is a new version of, if any: the newest
 * record at the same path that belongs to a set still open, queued or done, of the same sample id and
 * data type, and of the same measurement: the same acquisition time when both carry one in their
 * metadata, else seen within `windowMs` before (a daily control exported under one name each day is
 * a new measurement, not a version).
 */
export function findEarlierVersion(
  ledger: Ledger,
  candidate: NewVersionCandidate,
  now: Date,
  windowMs: number,
): FileRecord | undefined {
  const records = filesByPath(ledger, candidate.path).reverse();
  for (const record of records) {
    if (record.setId === null || record.dataType === 'manifest') continue;
    if (record.state !== 'assembled' && record.state !== 'queued' && record.state !== 'done') continue;
    if (record.sampleId !== candidate.sampleId || record.dataType !== candidate.dataType) return undefined;
    const set = getSet(ledger, record.setId);
    if (set === undefined || set.state === 'failed') return undefined;
    const bothMetadata = record.acquiredSource === 'metadata' && candidate.acquisition.source === 'metadata';
    const sameMeasurement = bothMetadata
      ? record.acquiredAt === candidate.acquisition.acquiredAt
      : now.getTime() - Date.parse(record.firstSeenAt) <= windowMs;
    return sameMeasurement ? record : undefined;
  }
  return undefined;
}

/** The job id of a set's next run: the set id, then `SETID~v2`, `~v3`… once inputs were replaced (a queue may keep finished job ids). */
export function versionedJobId(setId: string, earlierVersions: number): string {
  return earlierVersions === 0 ? setId : `${setId}~v${earlierVersions + 1}`;
}

/** Result stage: lists the earlier versions of the set's inputs in provenance.supersededInputs (nothing when there are none). */
export const supersededInputsStage: ResultStage = {
  name: 'superseded-inputs',
  apply(result, { ledger }) {
    const versions = versionsOfSet(ledger, result.setId);
    if (versions.length === 0) return result;
    const supersededInputs: SupersededInput[] = versions.map((v) => ({
      file: v.name,
      sha256: v.sha256,
      sizeBytes: v.sizeBytes,
      replacedAt: v.replacedAt,
      ...(v.resultSha256 === null ? {} : { resultSha256: v.resultSha256 }),
      reason: v.reason,
    }));
    return { ...result, provenance: { ...result.provenance, supersededInputs } };
  },
};

/** Whether `jobId` re-runs a finished set (`reprocess`: `SETID~r…`; the session's reference arrived: `SETID~ref-…`), as opposed to a set's own run or its run after a new input version (`~v…`). */
export function isRerunJob(jobId: string): boolean {
  return jobId.includes('~r');
}

/** Why an input's earlier version was replaced, by the state its set had reached. */
export function replacementReason(state: string): string {
  if (state === 'done') return "the file was rewritten at its path after the set's result was written";
  if (state === 'queued') return 'the file changed at its path while the set was being analysed';
  return 'the file changed at its path before the set was complete';
}

/**
 * How long a file moved to the archive is looked at for, in ms of `watch` running time after its move
 * was recorded (a restart gives every file still listed a full window again): a writer that held
 * the file open and paused longer than the stability window goes on writing into the archived copy
 * (a move within one file system keeps the open file). 10 stability windows, at least 5 s.
 */
export function archiveRecheckMs(stabilityWindowMs: number): number {
  return Math.max(5000, 10 * stabilityWindowMs);
}

/** How often the files in their archive re-check window are looked at (one stat each), in ms: half a stability window, at least watch.pollIntervalMs. */
export function archiveRecheckIntervalMs(stabilityWindowMs: number, pollIntervalMs: number): number {
  return Math.max(pollIntervalMs, Math.floor(stabilityWindowMs / 2));
}
