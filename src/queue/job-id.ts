// Job ids: the caller's id (a set's content hash). Both backends accept the same ids, namely the
// ones BullMQ can store: non-empty, no ":" (it separates Redis key parts), not a bare integer.
import { DriftlightError } from '../model/errors.js';

/** Throws INTERNAL (a caller bug) unless `id` can name a job on every backend. */
export function assertJobId(id: string): void {
  if (id === '' || id.includes(':') || /^\d+$/.test(id)) {
    throw new DriftlightError(
      'INTERNAL',
      `invalid job id "${id}": it must be non-empty, without ":", and not only digits`,
      {
        hint: "Use the set's content hash (hex) as the job id.",
      },
    );
  }
}
