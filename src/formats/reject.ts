// Small helpers to raise InputRejected with the file, the line and a hint, and to locate model errors.
import { InputRejected } from '../model/errors.js';
import type { ErrorCode } from '../model/error-codes.js';

/** Throws InputRejected with `code`, naming `file` and (when known) the 1-based `line`; `hint` overrides the code's default hint. */
export function reject(code: ErrorCode, message: string, file: string, line?: number, hint?: string): never {
  throw new InputRejected(code, message, {
    file,
    ...(line === undefined ? {} : { line }),
    ...(hint === undefined ? {} : { hint }),
  });
}

/** Runs `build` and adds `file` (and `line`) to any InputRejected it throws (e.g. from the model's constructors). */
export function withFile<T>(file: string, build: () => T, line?: number): T {
  try {
    return build();
  } catch (error) {
    if (error instanceof InputRejected) throw error.withLocation(file, line);
    throw error;
  }
}
