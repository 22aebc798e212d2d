// The inputs a `process` run rejected or failed, one `FILE:LINE: CODE: message` line each with its
// hint (README, exit code 3), read from the ledger and each file's NAME.error.json in quarantine.
import { readFileSync } from 'node:fs';
import { errnoCode } from '../output/fs-errors.js';
import type { QuarantineRecord } from '../output/quarantine.js';
import type { Ledger } from '../store/ledger.js';
import { fileErrorsSince } from '../store/status.js';

/** The stderr lines for files rejected or failed at or after `sinceIso`: `FILE:LINE: CODE: message` and `  hint: …`. */
export function rejectionLines(ledger: Ledger, sinceIso: string): string[] {
  return fileErrorsSince(ledger, sinceIso).flatMap((file) => {
    const record = file.quarantinePath === null ? undefined : readRecord(`${file.quarantinePath}.error.json`);
    const line = record?.line === undefined ? '' : `:${record.line}`;
    const where = file.quarantinePath === null ? 'left in place' : `quarantined as ${file.quarantinePath}`;
    return [
      `${file.name}${line}: ${record?.code ?? file.code}: ${record?.message ?? file.message}`,
      `  hint: ${record?.hint ?? 'see NAME.error.json in the quarantine folder'} (${where})`,
    ];
  });
}

/** The quarantine record at `path`, or undefined when it is missing or unreadable (the ledger's code and message stand). */
function readRecord(path: string): Partial<QuarantineRecord> | undefined {
  try {
    return JSON.parse(readFileSync(path, 'utf8')) as Partial<QuarantineRecord>;
  } catch (error) {
    if (errnoCode(error) === 'ENOENT' || error instanceof SyntaxError) return undefined;
    throw error;
  }
}
