// Shared parts of the fuzz suite (issue 20.10): the number of cases per target, byte and line
// mutations of real files, and the check that each case ends in a result or a typed rejection within
// one second (the slowest case is kept for the report line).
import fc from 'fast-check';
import { expect } from 'vitest';
import { ERROR_CODES } from '../../src/model/error-codes.js';
import { DriftlightError } from '../../src/model/errors.js';

/** Cases per target: 1000 in CI, DRIFTLIGHT_FUZZ_RUNS for the long form (docs/formats.md, "Fuzzing"). */
export const FUZZ_RUNS = Number(process.env['DRIFTLIGHT_FUZZ_RUNS'] ?? 1000);
/** Seed of every property (DRIFTLIGHT_FUZZ_SEED replays a reported failure). */
export const FUZZ_SEED = Number(process.env['DRIFTLIGHT_FUZZ_SEED'] ?? 2026_12_05);
/** The bound each case must end within (issue 20.10). */
export const CASE_LIMIT_MS = 1000;

/** Characters that matter to the readers (separators, signs, exponents, JCAMP and YAML markers). */
export const SYNTAX_BYTES = fc.constantFrom(
  ...'0123456789.,;:\t -+eE#\n\r{}[]"\'=$@%JjSs?()/\\*|&!~'.split('').map((char) => char.charCodeAt(0)),
);

export interface ByteEdit {
  readonly at: number;
  readonly byte: number;
  readonly kind: 'set' | 'insert' | 'delete';
}

/** Byte edits (set, insert, delete) at random places, and an optional cut of the end. */
export const byteMutation = fc.record({
  edits: fc.array(
    fc.record({
      at: fc.nat(),
      byte: fc.oneof(SYNTAX_BYTES, fc.integer({ min: 0, max: 255 })),
      kind: fc.constantFrom<ByteEdit['kind']>('set', 'insert', 'delete'),
    }),
    { minLength: 1, maxLength: 12 },
  ),
  cut: fc.option(fc.nat(), { nil: undefined }),
});

/** Line edits: delete, duplicate, swap with another line, or replace by a generated line. */
export const lineMutation = fc.array(
  fc.record({
    at: fc.nat(),
    other: fc.nat(),
    kind: fc.constantFrom('delete', 'duplicate', 'swap', 'replace'),
    text: fc.string({ maxLength: 40 }),
  }),
  { minLength: 1, maxLength: 6 },
);

/** `content` with the byte edits applied (then cut), as bytes. */
export function applyByteMutation(
  content: Uint8Array,
  mutation: { edits: readonly ByteEdit[]; cut: number | undefined },
): Uint8Array {
  const out = Array.from(content);
  for (const edit of mutation.edits) {
    const at = out.length === 0 ? 0 : edit.at % out.length;
    if (edit.kind === 'set') out[at] = edit.byte;
    else if (edit.kind === 'insert') out.splice(at, 0, edit.byte);
    else out.splice(at, 1);
  }
  return Uint8Array.from(mutation.cut === undefined ? out : out.slice(0, mutation.cut % (out.length + 1)));
}

/** `text` with the line edits applied. */
export function applyLineMutation(
  text: string,
  edits: readonly { at: number; other: number; kind: string; text: string }[],
): string {
  const lines = text.split('\n');
  for (const edit of edits) {
    if (lines.length === 0) break;
    const at = edit.at % lines.length;
    const other = edit.other % lines.length;
    if (edit.kind === 'delete') lines.splice(at, 1);
    else if (edit.kind === 'duplicate') lines.splice(at, 0, lines[at] ?? '');
    else if (edit.kind === 'swap') [lines[at], lines[other]] = [lines[other] ?? '', lines[at] ?? ''];
    else lines[at] = edit.text;
  }
  return lines.join('\n');
}

/** Slowest case seen per target (ms), for the summary line. */
export const slowest = new Map<string, number>();

/**
 * Runs one case: `work` must return, or throw a DriftlightError of an `expected` class whose code is in the
 * error-code table, within CASE_LIMIT_MS. Returns what happened ('result' or the code).
 */
export function expectTypedOutcome(
  target: string,
  expected: readonly (abstract new (...args: never[]) => DriftlightError)[],
  work: () => unknown,
): string {
  const started = performance.now();
  let outcome = 'result';
  try {
    work();
  } catch (error) {
    if (!expected.some((kind) => error instanceof kind)) throw error;
    const code = (error as DriftlightError).code;
    expect(Object.keys(ERROR_CODES)).toContain(code);
    expect((error as DriftlightError).message.length).toBeGreaterThan(0);
    outcome = code;
  }
  const elapsedMs = performance.now() - started;
  slowest.set(target, Math.max(slowest.get(target) ?? 0, elapsedMs));
  expect(elapsedMs, `${target}: a case took ${elapsedMs.toFixed(0)} ms`).toBeLessThan(CASE_LIMIT_MS);
  return outcome;
}
