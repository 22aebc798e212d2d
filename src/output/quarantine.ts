// Rejected inputs: the file moves to quarantine/YYYY-MM-DD/ and NAME.error.json beside it says
// why (code, message, hint, line, time), so nothing bad is dropped silently.
import { join } from 'node:path';
import { writeFileAtomic } from './atomic-write.js';
import { dayFolderName, uniqueTarget } from './dated-path.js';
import { moveFile } from './move-file.js';

export interface QuarantineReason {
  readonly code: string;
  readonly message: string;
  readonly hint: string;
  readonly line?: number;
  /** Set the file belonged to, when known. */
  readonly setId?: string;
}

/** The error record written next to a quarantined file. */
export interface QuarantineRecord extends QuarantineReason {
  readonly file: string;
  readonly originalPath: string;
  readonly sha256?: string;
  readonly quarantinedAt: string;
}

/** The folder a file quarantined at `at` goes to: quarantine/YYYY-MM-DD/. */
export function quarantineFolder(quarantineDir: string, at: Date): string {
  return join(quarantineDir, dayFolderName(at));
}

/** Moves `path` into the quarantine folder with its NAME.error.json; returns the new path. */
export function quarantineFile(
  quarantineDir: string,
  path: string,
  name: string,
  reason: QuarantineReason,
  now: Date,
  sha256?: string,
): string {
  const dir = quarantineFolder(quarantineDir, now);
  const target = uniqueTarget(dir, name);
  const record: QuarantineRecord = {
    file: name,
    originalPath: path,
    ...reason,
    ...(sha256 === undefined ? {} : { sha256 }),
    quarantinedAt: now.toISOString(),
  };
  writeFileAtomic(`${target}.error.json`, `${JSON.stringify(record, null, 2)}\n`);
  moveFile(path, target);
  return target;
}
