// Turns any thrown value into the one-line user message and the exit code; no stack trace for users.
import { ERROR_CODES } from '../model/error-codes.js';
import { AnalysisFailed, DriftlightError, InputRejected } from '../model/errors.js';
import { EXIT_CODES } from './exit-codes.js';

/** Writes `FILE:LINE: CODE: message` (+ hint) to stderr and returns the exit code for the error. */
export function reportError(error: unknown, stderr: NodeJS.WritableStream = process.stderr): number {
  if (error instanceof DriftlightError) {
    stderr.write(`${error.toUserLine()}\n  hint: ${error.hint}\n`);
    if (error instanceof InputRejected || error instanceof AnalysisFailed) return EXIT_CODES.rejected.code;
    return ERROR_CODES[error.code].kind === 'config' ? EXIT_CODES.usage.code : EXIT_CODES.internal.code;
  }
  const message = error instanceof Error ? error.message : String(error);
  stderr.write(
    `INTERNAL: ${message}\n  hint: this is a driftlight bug; rerun with DRIFTLIGHT_DEBUG=1 for the stack trace and report it.\n`,
  );
  if (process.env['DRIFTLIGHT_DEBUG'] === '1' && error instanceof Error && error.stack !== undefined) {
    stderr.write(`${error.stack}\n`);
  }
  return EXIT_CODES.internal.code;
}
