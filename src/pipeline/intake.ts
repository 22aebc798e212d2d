// Intake of one stable file: hash, check the ledger (known, unfinished move, duplicate), record it,
// then read what set assembly needs (a data file's head, see sniff.ts, or a set manifest). Bad files
// are quarantined with their reason.
import { createHash } from 'node:crypto';
import {
  closeSync,
  existsSync,
  lstatSync,
  openSync,
  readFileSync,
  readlinkSync,
  readSync,
  realpathSync,
  renameSync,
  statSync,
} from 'node:fs';
import { basename, relative, resolve, isAbsolute } from 'node:path';
import { DriftlightError, InputRejected } from '../model/errors.js';
import { ERROR_CODES } from '../model/error-codes.js';
import { decodeText, type ParsedData } from '../formats/index.js';
import type { DriftlightConfig } from '../config/resolve.js';
import type { Ledger } from '../store/ledger.js';
import {
  filesBySha256,
  insertFile,
  setFileError,
  setFileLocation,
  type AcquiredSource,
  type FileRecord,
  type NewFile,
} from '../store/files.js';
import { isoFromEpochMs, readAcquisitionTime } from '../model/acquisition-time.js';
import { dayFolderName, uniqueTarget } from '../output/dated-path.js';
import { moveFile } from '../output/move-file.js';
import { errnoCode, isGoneError } from '../output/fs-errors.js';
import { quarantineFile } from '../output/quarantine.js';
import { isManifestName, parseManifest, type SetManifest } from './manifest.js';
import { readForAssembly } from './sniff.js';
import { join } from 'node:path';

/** When a file was measured, as stored in the ledger: canonical UTC ISO 8601 and where it came from. */
export interface Acquisition {
  readonly acquiredAt: string;
  readonly source: AcquiredSource;
}

/**
 * The acquisition time of a file read at intake: its metadata read by the one reader
 * (readAcquisitionTime, with instrument.dateOrder and instrument.timeZone), else the file's
 * modification time, recorded as such (never the analysis time). Throws InputRejected
 * DATE_AMBIGUOUS or DATE_INVALID for a time that cannot be read as one instant.
 */
export function acquisitionOf(
  parsed: ParsedData,
  modifiedMs: number,
  config: DriftlightConfig,
  fileName: string,
): Acquisition {
  const text = parsed.type === 'spectrum' ? parsed.spectrum.metadata.acquiredAt : parsed.decay.metadata.acquiredAt;
  if (text === undefined || text.trim() === '')
    return { acquiredAt: isoFromEpochMs(Math.round(modifiedMs)), source: 'file-modified' };
  const reading = readAcquisitionTime(text, {
    ...(config.instrument.dateOrder === undefined ? {} : { dateOrder: config.instrument.dateOrder }),
    timeZone: config.instrument.timeZone,
  });
  if (!reading.ok) throw new InputRejected(reading.code, reading.message, { file: fileName, hint: reading.hint });
  return { acquiredAt: reading.iso, source: 'metadata' };
}

/** A file read at intake: already in the ledger (`id`), or to be recorded in the same transaction that assembles it. */
export type IntakeFile = NewFile & { readonly id?: number };

export type IntakeResult =
  | { readonly kind: 'gone' }
  | { readonly kind: 'known' }
  | { readonly kind: 'rejected' }
  | {
      readonly kind: 'data';
      readonly file: IntakeFile;
      readonly parsed: ParsedData;
      readonly bytes: Uint8Array;
      readonly acquisition: Acquisition;
    }
  | {
      readonly kind: 'manifest';
      readonly file: IntakeFile;
      readonly manifest: SetManifest;
      readonly bytes: Uint8Array;
    };

/** Files read earlier in the same intake batch but not recorded yet, by sha256 (for duplicate detection). */
export type PendingIntake = ReadonlyMap<string, { readonly name: string; readonly path: string }>;

function sha256OfFile(path: string, sizeBytes: number): { sha256: string; bytes?: Buffer } {
  if (sizeBytes <= 64 * 1024 * 1024) {
    const bytes = readFileSync(path);
    return { sha256: createHash('sha256').update(bytes).digest('hex'), bytes };
  }
  const hash = createHash('sha256');
  const fd = openSync(path, 'r');
  try {
    const chunk = Buffer.alloc(1024 * 1024);
    for (let n = readSync(fd, chunk); n > 0; n = readSync(fd, chunk)) hash.update(chunk.subarray(0, n));
  } finally {
    closeSync(fd);
  }
  return { sha256: hash.digest('hex') };
}

/** Quarantines a recorded file with `error` and marks it rejected (or failed). */
export function rejectFile(
  ledger: Ledger,
  config: DriftlightConfig,
  file: FileRecord,
  error: DriftlightError,
  now: Date,
  state: 'rejected' | 'failed' = 'rejected',
  setId?: string,
): void {
  ledger.transaction(() => setFileError(ledger, file.id, state, { code: error.code, message: error.message }, now));
  const target = quarantineFile(
    config.folders.quarantine,
    file.path,
    file.name,
    {
      code: error.code,
      message: error.message,
      hint: error.hint,
      ...(error.line === undefined ? {} : { line: error.line }),
      ...(setId === undefined ? {} : { setId }),
    },
    now,
    file.sha256,
  );
  ledger.transaction(() => setFileLocation(ledger, file.id, { quarantinePath: target }, now));
}

/** The folder a done file is archived in: archive/YYYY-MM-DD/ of the day it was first seen. */
export function archiveFolderOf(config: DriftlightConfig, file: Pick<FileRecord, 'firstSeenAt'>): string {
  return join(config.folders.archive, dayFolderName(new Date(file.firstSeenAt)));
}

/** Finishes an interrupted archive move of a done file still in the inbox. */
export function finishArchiveMove(ledger: Ledger, config: DriftlightConfig, file: FileRecord, now: Date): void {
  if (file.archivePath !== null || !existsSync(file.path)) return;
  const target = uniqueTarget(archiveFolderOf(config, file), file.name);
  moveFile(file.path, target);
  ledger.transaction(() => setFileLocation(ledger, file.id, { archivePath: target }, now));
}

/** Reads a stable file; returns what it is and its bytes (recorded by the caller when it assembles it), or that it was handled (known, rejected, gone); `pending` lists files of the same batch not yet recorded. */
export function intakeFile(
  ledger: Ledger,
  config: DriftlightConfig,
  path: string,
  now: Date,
  pending: PendingIntake = new Map(),
): IntakeResult {
  let sizeBytes: number;
  let modifiedMs: number;
  try {
    const link = lstatSync(path, { throwIfNoEntry: false });
    if (link === undefined) return { kind: 'gone' };
    if (link.isSymbolicLink()) {
      const refusal = takeLink(config, path);
      if (refusal !== undefined) return rejectLink(ledger, config, path, refusal, now);
    }
    const stat = statSync(path);
    if (!stat.isFile()) return { kind: 'gone' };
    sizeBytes = stat.size;
    modifiedMs = stat.mtimeMs;
  } catch (error) {
    // Moved or deleted since it was seen; any other error (EACCES, EIO, ELOOP) reaches the caller,
    // which logs it with the path and leaves the file in the inbox to be taken again.
    if (isGoneError(error)) return { kind: 'gone' };
    throw error;
  }
  const name = basename(path);
  const { sha256, bytes } = sha256OfFile(path, sizeBytes);
  const known = filesBySha256(ledger, sha256);
  const samePath = known.filter((f) => f.path === path);
  for (const record of samePath) {
    if (record.state === 'seen')
      return readRecorded(ledger, config, record, bytes ?? readFileSync(path), now, modifiedMs);
    if (record.state === 'assembled' || record.state === 'queued') return { kind: 'known' };
    if (record.state === 'done' && record.archivePath === null) {
      finishArchiveMove(ledger, config, record, now);
      return { kind: 'known' };
    }
    if ((record.state === 'rejected' || record.state === 'failed') && record.quarantinePath === null) {
      rejectFile(
        ledger,
        config,
        record,
        new InputRejected(
          (record.errorCode ?? 'SET_FAILED') as keyof typeof ERROR_CODES,
          record.errorMessage ?? 'rejected',
        ),
        now,
        record.state,
      );
      return { kind: 'known' };
    }
  }
  const inBatch = pending.get(sha256);
  if (inBatch?.path === path) return { kind: 'known' };
  const recorded = known.find((f) => f.state !== 'rejected' && f.state !== 'failed');
  const original = recorded ?? (inBatch === undefined ? undefined : { name: inBatch.name, setId: null });
  const newFile: NewFile = { sha256, path, name, sizeBytes };
  if (original === undefined && sizeBytes <= config.limits.maxFileBytes) {
    return readRecorded(ledger, config, newFile, bytes ?? readFileSync(path), now, modifiedMs);
  }
  const file = ledger.transaction(() => insertFile(ledger, newFile, now));
  if (original !== undefined) {
    const where = original.setId === null ? '' : ` in set ${original.setId}`;
    rejectFile(
      ledger,
      config,
      file,
      new InputRejected(
        'DUPLICATE_INPUT',
        `the same content was already received as ${original.name}${where} (sha256 ${sha256.slice(0, 12)}…)`,
        { file: name },
      ),
      now,
    );
    return { kind: 'rejected' };
  }
  rejectFile(
    ledger,
    config,
    file,
    new InputRejected(
      'FILE_TOO_LARGE',
      `the file has ${sizeBytes} bytes, more than limits.maxFileBytes = ${config.limits.maxFileBytes}`,
      { file: name },
    ),
    now,
  );
  return { kind: 'rejected' };
}

/** Reads a data file's head or a manifest; a bad file is recorded (if it is not yet) and quarantined. */
function readRecorded(
  ledger: Ledger,
  config: DriftlightConfig,
  file: FileRecord | NewFile,
  bytes: Uint8Array,
  now: Date,
  modifiedMs: number,
): IntakeResult {
  try {
    if (isManifestName(file.name, config.assembly.manifestSuffixes)) {
      return { kind: 'manifest', file, manifest: parseManifest(decodeText(bytes).text, file.name), bytes };
    }
    const parsed = readForAssembly(bytes, {
      fileName: file.name,
      maxBytes: config.limits.maxFileBytes,
      profiles: config.formats.profiles,
    });
    return { kind: 'data', file, parsed, bytes, acquisition: acquisitionOf(parsed, modifiedMs, config, file.name) };
  } catch (error) {
    if (!(error instanceof InputRejected)) throw error;
    const record = 'id' in file ? file : ledger.transaction(() => insertFile(ledger, file, now));
    rejectFile(ledger, config, record, error.withLocation(file.name), now);
    return { kind: 'rejected' };
  }
}

/** Whether `path` lies inside `folder` (both resolved). */
function isInside(path: string, folder: string): boolean {
  const rel = relative(folder, path);
  return rel !== '' && !rel.startsWith('..') && !isAbsolute(rel);
}

/**
 * Decides about a symbolic link in the inbox (watch.symlinks): returns why it is refused, or
 * undefined once the file it points to (inside the inbox, `inside-inbox` only) has been renamed
 * over the link, so that the file itself is taken, archived and hashed, never the link.
 */
function takeLink(config: DriftlightConfig, path: string): string | undefined {
  let target = '?';
  try {
    target = readlinkSync(path);
  } catch (error) {
    // Gone meanwhile: refused below with the target unknown.
    if (!isGoneError(error)) throw error;
  }
  let real: string;
  try {
    real = realpathSync(path);
  } catch (error) {
    const code = errnoCode(error);
    if (code === 'ELOOP')
      return `${basename(path)} is a symbolic link to ${target} that leads back to itself (a link loop)`;
    if (!isGoneError(error)) throw error;
    return `${basename(path)} is a symbolic link to ${target}, which does not exist (a dangling link)`;
  }
  if (config.watch.symlinks !== 'inside-inbox') {
    return `${basename(path)} is a symbolic link (to ${target}); links are not followed (watch.symlinks: refuse), so nothing outside the inbox is read or moved`;
  }
  let inbox: string;
  try {
    inbox = realpathSync(config.folders.inbox);
  } catch (error) {
    if (!isGoneError(error)) throw error;
    inbox = resolve(config.folders.inbox);
  }
  if (!isInside(real, inbox))
    return `${basename(path)} is a symbolic link to ${real}, outside the inbox ${inbox}; only links resolving inside the inbox are taken (watch.symlinks: inside-inbox)`;
  if (!statSync(real).isFile())
    return `${basename(path)} is a symbolic link to the folder ${real}; links to folders are never followed`;
  try {
    renameSync(real, path);
  } catch (error) {
    return `${basename(path)} is a symbolic link to ${real}, which could not be moved in its place (${(error as NodeJS.ErrnoException).code ?? 'error'})`;
  }
  return undefined;
}

/** Records a refused symbolic link and quarantines the link itself (what it points to is left alone). */
function rejectLink(ledger: Ledger, config: DriftlightConfig, path: string, reason: string, now: Date): IntakeResult {
  let target = '';
  try {
    target = readlinkSync(path);
  } catch (error) {
    // Gone meanwhile: recorded with an empty target.
    if (!isGoneError(error)) throw error;
  }
  const sha256 = createHash('sha256').update(`symlink\0${path}\0${target}`).digest('hex');
  const file = ledger.transaction(() => insertFile(ledger, { sha256, path, name: basename(path), sizeBytes: 0 }, now));
  rejectFile(ledger, config, file, new InputRejected('SYMLINK_REFUSED', reason, { file: basename(path) }), now);
  return { kind: 'rejected' };
}
