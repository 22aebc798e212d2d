// A manifest set that got none of its files (issue 20, item 9): past its deadline, or at the end of a
// `process` batch, with no own file it is not analysed (that gave an empty result). Its manifest is
// quarantined with MANIFEST_NO_FILES, naming each listed file and what became of it (never seen, or
// rejected with its code), and the set is recorded failed.
import { join } from 'node:path';
import { InputRejected } from '../model/errors.js';
import type { DriftlightConfig } from '../config/resolve.js';
import type { Ledger } from '../store/ledger.js';
import { filesByPath, filesOfSet, setFileError, type FileRecord } from '../store/files.js';
import { markSetFailed } from '../store/sets.js';
import { rejectFile } from './intake.js';
import type { OpenSet } from './open-sets.js';

/** Whether `set` is a manifest set that has none of its listed files. */
export function isUnfulfilledManifestSet(set: OpenSet): boolean {
  return set.manifest !== undefined && set.files.length === 0;
}

/** What became of one listed file, from the ledger's newest record at its path. */
function fateOf(ledger: Ledger, path: string, name: string): string {
  const newest = filesByPath(ledger, path).at(-1);
  if (newest === undefined) return `${name} (never arrived)`;
  if (newest.state === 'rejected' || newest.state === 'failed')
    return `${name} (rejected: ${newest.errorCode ?? 'unknown code'})`;
  return `${name} (taken by set ${newest.setId ?? '?'} before the manifest came)`;
}

/**
 * The MANIFEST_NO_FILES rejection of manifest set `set`: the folder, each listed file's fate, and
 * when the wait ended (`endOfBatch`: the end of a `process` batch; else the deadline).
 */
export function unfulfilledManifestError(
  ledger: Ledger,
  set: OpenSet,
  setTimeoutMs: number,
  endOfBatch: boolean,
): InputRejected {
  const stored = set.manifest;
  if (stored === undefined) throw new Error(`set ${set.id} has no manifest`);
  const fates = stored.manifest.files.map((f) => fateOf(ledger, join(stored.dir, f.file), f.file));
  const when = endOfBatch
    ? 'by the end of the batch'
    : `by its deadline (assembly.setTimeoutMs = ${setTimeoutMs} ms after it arrived)`;
  return new InputRejected(
    'MANIFEST_NO_FILES',
    `none of the ${fates.length} file(s) the manifest lists in ${stored.dir} could be used ${when}: ${fates.join(', ')}; set ${set.id} is not analysed`,
  );
}

/** Records set `setId` failed and its manifest rejected with `error` (inside the caller's transaction); returns the manifest's file records. */
export function recordUnfulfilledManifest(
  ledger: Ledger,
  setId: string,
  error: InputRejected,
  now: Date,
): FileRecord[] {
  const failure = { code: error.code, message: error.message };
  markSetFailed(ledger, setId, failure, now);
  const manifests = filesOfSet(ledger, setId).filter((f) => f.dataType === 'manifest');
  for (const file of manifests) setFileError(ledger, file.id, 'rejected', failure, now);
  return manifests;
}

/** Quarantines the manifest files of a set recorded by recordUnfulfilledManifest; returns what a failed move threw (recovery moves it later), else undefined. */
export function quarantineUnfulfilledManifest(
  ledger: Ledger,
  config: DriftlightConfig,
  setId: string,
  manifests: readonly FileRecord[],
  error: InputRejected,
  now: Date,
): unknown {
  try {
    for (const file of manifests)
      rejectFile(ledger, config, file, error.withLocation(file.name), now, 'rejected', setId);
    return undefined;
  } catch (failure) {
    return failure;
  }
}
