// Typed errors with stable codes. A message says what went wrong, where (file:line or config path)
// and how to fix it (the hint). InputRejected is never retried; Transient is.
import { ERROR_CODES, type ErrorCode } from './error-codes.js';

export interface ErrorLocation {
  /** Input file path or name, when known. */
  readonly file?: string | undefined;
  /** 1-based line number in the file, when the problem is on one line. */
  readonly line?: number | undefined;
  /** Config path such as `controls[0].targetYield`, for config errors. */
  readonly configPath?: string | undefined;
}

export interface ErrorDetails extends ErrorLocation {
  readonly hint?: string | undefined;
  readonly cause?: unknown;
}

/** Base class of every driftlight error: a stable `code`, a `hint`, and an optional location. */
export class DriftlightError extends Error {
  readonly code: ErrorCode;
  readonly hint: string;
  readonly file: string | undefined;
  readonly line: number | undefined;
  readonly configPath: string | undefined;

  constructor(code: ErrorCode, message: string, details: ErrorDetails = {}) {
    super(message, details.cause === undefined ? undefined : { cause: details.cause });
    this.name = new.target.name;
    this.code = code;
    // A code read back from the ledger may be one this version does not list (another version's, or a
    // system error code carried by a job failure): no hint then, rather than a TypeError.
    this.hint =
      details.hint ??
      (ERROR_CODES as Readonly<Record<string, { readonly hint: string } | undefined>>)[code]?.hint ??
      'See the message and the log.';
    this.file = details.file;
    this.line = details.line;
    this.configPath = details.configPath;
  }

  /**
   * `FILE:LINE: CODE: message` (parts omitted when unknown), the form shown to users: one line per problem
   * when the message holds several (one per line), each with the config path once.
   */
  toUserLine(): string {
    const where = this.file === undefined ? '' : `${this.file}${this.line === undefined ? '' : `:${this.line}`}: `;
    const lines = this.message.split('\n');
    // A message of several lines names each line's own path; a one-line message gets the path once.
    const path =
      this.configPath === undefined || lines.length > 1 || this.message.startsWith(`${this.configPath}:`)
        ? ''
        : `${this.configPath}: `;
    return lines.map((line) => `${where}${this.code}: ${path}${line}`).join('\n');
  }

  /** Plain JSON form for quarantine records and logs. */
  toJSON(): { code: ErrorCode; message: string; hint: string; file?: string; line?: number; configPath?: string } {
    return {
      code: this.code,
      message: this.message,
      hint: this.hint,
      ...(this.file === undefined ? {} : { file: this.file }),
      ...(this.line === undefined ? {} : { line: this.line }),
      ...(this.configPath === undefined ? {} : { configPath: this.configPath }),
    };
  }
}

/** Bad input file or data: never retried; the file goes to quarantine with this reason. */
export class InputRejected extends DriftlightError {
  /** A copy of this error that names the file (and line, if given and not already known). */
  withLocation(file: string, line?: number): InputRejected {
    return new InputRejected(this.code, this.message, {
      hint: this.hint,
      file: this.file ?? file,
      line: this.line ?? line,
      cause: this.cause,
    });
  }
}

/** Invalid configuration: names the config path and the problem. */
export class ConfigInvalid extends DriftlightError {
  constructor(message: string, details: ErrorDetails = {}) {
    super('CONFIG_INVALID', message, details);
  }
}

/** A temporary failure (busy resource, lost connection): the job is retried with backoff. */
export class Transient extends DriftlightError {
  constructor(message: string, details: ErrorDetails = {}) {
    super('TRANSIENT', message, details);
  }
}

/** The analysis ran but cannot give a trustworthy result (non-convergence, invalid regime). */
export class AnalysisFailed extends DriftlightError {}
