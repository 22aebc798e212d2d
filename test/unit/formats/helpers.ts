// Shared helpers of the formats tests: fixture loading and typed-error capture.
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { InputRejected } from '../../../src/model/errors.js';

export const FIXTURES = fileURLToPath(new URL('../../fixtures/formats/', import.meta.url));

/** Bytes of a fixture file. */
export function fixture(name: string): Uint8Array {
  return readFileSync(`${FIXTURES}${name}`);
}

/** UTF-8 bytes of a string. */
export function bytes(text: string): Uint8Array {
  return new TextEncoder().encode(text);
}

/** The InputRejected thrown by `fn` (fails the test when nothing, or something untyped, is thrown). */
export function rejection(fn: () => unknown): InputRejected {
  try {
    fn();
  } catch (error) {
    if (error instanceof InputRejected) return error;
    throw new Error(`expected InputRejected, got ${String(error)}`, { cause: error });
  }
  throw new Error('expected InputRejected, but nothing was thrown');
}
