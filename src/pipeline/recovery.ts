// Crash recovery of file moves: a done set's files still in the inbox are archived; a failed set's or
// rejected file's inputs still in the inbox are quarantined. Queued sets are re-enqueued by the
// coordinator; files recorded as `seen` are re-read by the start-up scan.
import { existsSync } from 'node:fs';
import type { DriftlightConfig } from '../config/resolve.js';
import { InputRejected } from '../model/errors.js';
import type { ErrorCode } from '../model/error-codes.js';
import type { Ledger } from '../store/ledger.js';
import { filesAwaitingMove } from '../store/files.js';
import { finishArchiveMove, rejectFile } from './intake.js';

/** Finishes archive and quarantine moves interrupted by a crash; returns how many files it moved. */
export function recoverMoves(ledger: Ledger, config: DriftlightConfig, now: Date): number {
  let moved = 0;
  for (const file of filesAwaitingMove(ledger, ['done'])) {
    if (file.archivePath === null && existsSync(file.path)) {
      finishArchiveMove(ledger, config, file, now);
      moved += 1;
    }
  }
  for (const file of filesAwaitingMove(ledger, ['rejected', 'failed'])) {
    if (file.quarantinePath === null && existsSync(file.path)) {
      const error = new InputRejected((file.errorCode ?? 'SET_FAILED') as ErrorCode, file.errorMessage ?? 'rejected before a crash');
      rejectFile(ledger, config, file, error, now, file.state === 'failed' ? 'failed' : 'rejected', file.setId ?? undefined);
      moved += 1;
    }
  }
  return moved;
}
