// Crash recovery of file moves: a done set's files still in the inbox are archived; a failed set's or
// rejected file's inputs still in the inbox are quarantined. Queued sets are re-enqueued by the
// coordinator; files recorded as `seen` are re-read by the start-up scan.
//
// The transaction that records where files were moved follows the moves and is not fsynced on its
// own, so a power cut just after the moves can leave a done (or rejected) file that is neither in the
// inbox nor recorded where it went. Such a file is looked for in the folder it was moved to (archive
// by first-seen day, quarantine by the day of its error), under its name and the `~N` names a move
// takes when the name is in use, and matched by sha256 (or, for an archived file a writer went on
// writing after the move, by the sha256 of its first bytes); its location is then recorded. Without this,
// a later set could not borrow such an IRF or blank (INPUT_MISSING).
import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { DriftlightConfig } from '../config/resolve.js';
import { InputRejected } from '../model/errors.js';
import type { ErrorCode } from '../model/error-codes.js';
import type { Ledger } from '../store/ledger.js';
import { filesAwaitingMove, setFileLocation, type FileRecord } from '../store/files.js';
import { numberedName } from '../output/dated-path.js';
import { quarantineFolder } from '../output/quarantine.js';
import { setFailedError } from './commit.js';
import { archiveFolderOf, finishArchiveMove, rejectFile } from './intake.js';

/** What recovery did: files moved now, moved files whose unrecorded location it found, and files it could not move now (with the first error). */
export interface MoveRecovery {
  readonly moved: number;
  readonly relocated: number;
  readonly failed: number;
  readonly firstError?: unknown;
}

/** Most `~N` names looked at per file (uniqueTarget takes the smallest free N, so they run without gaps). */
const MAX_SUFFIX = 10_000;

/**
 * The copy of `file` (same sha256) in `dir` under its name or a `~N` name (numberedName, as
 * uniqueTarget gives them), if any. With `grown`, also a copy longer than `file.sizeBytes` whose
 * first `sizeBytes` bytes have its sha256: a file a writer held open and went on writing after its move.
 */
export function findMovedCopy(
  dir: string,
  file: Pick<FileRecord, 'name' | 'sha256'> & { readonly sizeBytes?: number },
  options: { grown?: boolean } = {},
): string | undefined {
  const sizeBytes = file.sizeBytes;
  for (let n = 0; n <= MAX_SUFFIX; n++) {
    const candidate = join(dir, numberedName(file.name, n));
    if (!existsSync(candidate)) {
      if (n > 0) return undefined;
      continue;
    }
    const bytes = readFileSync(candidate);
    const grown = options.grown === true && sizeBytes !== undefined && bytes.byteLength > sizeBytes;
    const head = grown ? bytes.subarray(0, sizeBytes) : bytes;
    if (createHash('sha256').update(head).digest('hex') === file.sha256) return candidate;
  }
  return undefined;
}

/** The archived copy of a done file whose archive path is not recorded: findMovedCopy in the archive folder the commit moved it to (`grown`: see findMovedCopy). */
export function findArchivedCopy(
  config: DriftlightConfig,
  file: Pick<FileRecord, 'name' | 'sha256' | 'firstSeenAt'> & { readonly sizeBytes?: number },
  options: { grown?: boolean } = {},
): string | undefined {
  return findMovedCopy(archiveFolderOf(config, file), file, options);
}

/**
 * Finishes archive and quarantine moves interrupted by a crash (or that failed: a folder not
 * writable) and records moves whose record was lost. A file that cannot be moved now is counted in
 * `failed` and left for the next call; the others are still moved.
 */
export function recoverMoves(ledger: Ledger, config: DriftlightConfig, now: Date): MoveRecovery {
  let moved = 0;
  let relocated = 0;
  let failed = 0;
  let firstError: unknown;
  const attempt = (work: () => void): void => {
    try {
      work();
    } catch (error) {
      failed += 1;
      firstError ??= error;
    }
  };
  for (const file of filesAwaitingMove(ledger, ['done']))
    attempt(() => {
      if (existsSync(file.path)) {
        finishArchiveMove(ledger, config, file, now);
        moved += 1;
        return;
      }
      // A copy that grew after its move (a writer held the file open) is its copy too: the archive
      // re-check (listed at commit) then takes the whole file as a new version.
      const copy = findArchivedCopy(config, file) ?? findArchivedCopy(config, file, { grown: true });
      if (copy !== undefined) {
        ledger.transaction(() => setFileLocation(ledger, file.id, { archivePath: copy }, now));
        relocated += 1;
      }
    });
  for (const file of filesAwaitingMove(ledger, ['rejected', 'failed']))
    attempt(() => {
      if (existsSync(file.path)) {
        // A failed set's file is worded as the commit words it; a rejected file keeps its own code.
        const error =
          file.state === 'failed'
            ? setFailedError(file.setId ?? '?', {
                code: file.errorCode ?? 'SET_FAILED',
                message: file.errorMessage ?? 'unknown reason',
              })
            : new InputRejected(
                (file.errorCode ?? 'SET_FAILED') as ErrorCode,
                file.errorMessage ?? 'rejected before a crash',
              );
        rejectFile(
          ledger,
          config,
          file,
          error,
          now,
          file.state === 'failed' ? 'failed' : 'rejected',
          file.setId ?? undefined,
        );
        moved += 1;
        return;
      }
      // rejectFile records the error (updated_at) and quarantines the file with the same time.
      const copy = findMovedCopy(quarantineFolder(config.folders.quarantine, new Date(file.updatedAt)), file);
      if (copy !== undefined) {
        ledger.transaction(() => setFileLocation(ledger, file.id, { quarantinePath: copy }, now));
        relocated += 1;
      }
    });
  return { moved, relocated, failed, ...(firstError === undefined ? {} : { firstError }) };
}
