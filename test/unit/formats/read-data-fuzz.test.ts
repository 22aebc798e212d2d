// Property: random bytes, and fixtures with random mutations, only ever give a result or an
// InputRejected (never another exception), each within one second.
import { describe, expect, it } from 'vitest';
import { readdirSync, statSync } from 'node:fs';
import fc from 'fast-check';
import { readData } from '../../../src/formats/index.js';
import { InputRejected } from '../../../src/model/errors.js';
import { FIXTURES, fixture } from './helpers.js';

const FIXTURE_NAMES = readdirSync(FIXTURES).filter(
  (name) => !name.endsWith('.json') && statSync(`${FIXTURES}${name}`).isFile(),
);
const PRINTABLE = fc.constantFrom(
  ...'0123456789.,;:\t -+eE#\n\r\nabcXYZ=$@%JjSs?'.split('').map((char) => char.charCodeAt(0)),
);

/** Runs readData and returns how long it took; fails on anything but success or InputRejected. */
function readTimed(content: Uint8Array): number {
  const started = performance.now();
  try {
    readData(content, { fileName: 'fuzz.bin' });
  } catch (error) {
    if (!(error instanceof InputRejected)) throw error;
    expect(error.file).toBe('fuzz.bin');
  }
  return performance.now() - started;
}

describe('readData on hostile bytes (property)', () => {
  it('random bytes give only typed errors (fast-check, 200 runs)', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 2000 }), (content) => {
        expect(readTimed(content)).toBeLessThan(1000);
      }),
      { numRuns: 200 },
    );
  });

  it('random text-like bytes give only typed errors (fast-check, 200 runs)', () => {
    fc.assert(
      fc.property(fc.array(PRINTABLE, { maxLength: 2000 }), (codes) => {
        expect(readTimed(Uint8Array.from(codes))).toBeLessThan(1000);
      }),
      { numRuns: 200 },
    );
  });

  it('mutated fixtures give a result or a typed error (fast-check, 300 runs)', () => {
    const mutation = fc.record({
      name: fc.constantFrom(...FIXTURE_NAMES),
      edits: fc.array(
        fc.record({
          at: fc.nat(),
          byte: fc.oneof(PRINTABLE, fc.integer({ min: 0, max: 255 })),
          kind: fc.constantFrom('set', 'insert', 'delete'),
        }),
        { minLength: 1, maxLength: 8 },
      ),
      cut: fc.option(fc.nat(), { nil: undefined }),
    });
    fc.assert(
      fc.property(mutation, ({ name, edits, cut }) => {
        const content = Array.from(fixture(name));
        for (const edit of edits) {
          const at = content.length === 0 ? 0 : edit.at % content.length;
          if (edit.kind === 'set') content[at] = edit.byte;
          else if (edit.kind === 'insert') content.splice(at, 0, edit.byte);
          else content.splice(at, 1);
        }
        const bytesOut = Uint8Array.from(cut === undefined ? content : content.slice(0, cut % (content.length + 1)));
        expect(readTimed(bytesOut)).toBeLessThan(1000);
      }),
      { numRuns: 300 },
    );
  });
});
