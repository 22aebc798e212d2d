// Fuzzing each reader (issue 20.10): mutations of real files (test fixtures, the example day) and
// fast-check-generated content; every case ends in measurements or an InputRejected with a listed
// code within one second. 1000 cases per reader here; DRIFTLIGHT_FUZZ_RUNS=100000 for the long form.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { readMeasurements, writeDataJson } from '../../src/formats/index.js';
import { InputRejected } from '../../src/model/errors.js';
import {
  applyByteMutation,
  applyLineMutation,
  byteMutation,
  expectTypedOutcome,
  FUZZ_RUNS,
  FUZZ_SEED,
  lineMutation,
  slowest,
  SYNTAX_BYTES,
} from './fuzz-harness.js';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const FOLDERS = ['test/fixtures/formats', 'test/fixtures/formats/layouts', 'examples/day/inbox'];

/** Real files of the repository by reader: JCAMP-DX (.jdx), own JSON (written from real files), delimited (the rest). */
function realFiles(): {
  jcamp: { name: string; content: Uint8Array }[];
  delimited: { name: string; content: Uint8Array }[];
} {
  const jcamp: { name: string; content: Uint8Array }[] = [];
  const delimited: { name: string; content: Uint8Array }[] = [];
  for (const folder of FOLDERS) {
    for (const name of readdirSync(join(ROOT, folder))) {
      const path = join(ROOT, folder, name);
      if (!statSync(path).isFile() || /\.(json|py|ya?ml)$/.test(name)) continue;
      (name.endsWith('.jdx') ? jcamp : delimited).push({ name, content: readFileSync(path) });
    }
  }
  return { jcamp, delimited };
}

const { jcamp, delimited } = realFiles();
const encoder = new TextEncoder();
const decoder = new TextDecoder();
const ownJson = [...jcamp, ...delimited].flatMap(({ name, content }) => {
  try {
    return readMeasurements(content, { fileName: name })
      .slice(0, 1)
      .map((data) => ({ name: `${name}.json`, content: encoder.encode(writeDataJson(data)) }));
  } catch {
    return [];
  }
});
const params = (runs = FUZZ_RUNS): fc.Parameters<unknown> => ({ numRuns: runs, seed: FUZZ_SEED, endOnFailure: true });

/** One reader case: readMeasurements on `content` as `name`. */
function readCase(target: string, name: string, content: Uint8Array): string {
  return expectTypedOutcome(target, [InputRejected], () => {
    const measurements = readMeasurements(content, { fileName: name });
    expect(measurements.length).toBeGreaterThan(0);
  });
}

/** Mutation cases over `files`: byte edits or line edits, half each; returns the outcome counts. */
function mutationRuns(
  target: string,
  files: readonly { name: string; content: Uint8Array }[],
  runs: number,
): Map<string, number> {
  const outcomes = new Map<string, number>();
  const count = (outcome: string): void =>
    void outcomes.set(
      outcome === 'result' ? 'result' : 'rejected',
      (outcomes.get(outcome === 'result' ? 'result' : 'rejected') ?? 0) + 1,
    );
  fc.assert(
    fc.property(
      fc.nat({ max: files.length - 1 }),
      fc.boolean(),
      byteMutation,
      lineMutation,
      (index, byLines, bytes, lines) => {
        const file = files[index] ?? files[0];
        if (file === undefined) return;
        const content = byLines
          ? encoder.encode(applyLineMutation(decoder.decode(file.content), lines))
          : applyByteMutation(file.content, bytes);
        count(readCase(target, file.name, content));
      },
    ),
    params(runs),
  );
  return outcomes;
}

describe(`fuzzing the readers (${FUZZ_RUNS} cases per reader; seed ${FUZZ_SEED})`, () => {
  afterAll(() => {
    // The slowest case per reader, for the CI log (a figure, not a check beyond the one-second bound).
    console.info(
      `fuzz readers, slowest case (ms): ${[...slowest].map(([target, ms]) => `${target} ${ms.toFixed(1)}`).join(', ')}`,
    );
  });

  it('delimited text: mutated real files and generated tables give measurements or a typed rejection', () => {
    expect(delimited.length).toBeGreaterThan(50);
    const mutated = mutationRuns('delimited', delimited, Math.ceil(FUZZ_RUNS * 0.7));
    // Both outcomes are reached: the mutations are neither all harmless nor all fatal.
    expect(mutated.get('result') ?? 0).toBeGreaterThan(0);
    expect(mutated.get('rejected') ?? 0).toBeGreaterThan(0);
    const cell = fc.oneof(
      fc.double({ noNaN: false }).map(String),
      fc.integer().map(String),
      fc.string({ maxLength: 8 }),
      fc.constantFrom('', 'nan', '1,5', '1e400', '-0', 'time (ns)', 'wavelength (nm)', 'counts', 'IRF'),
    );
    const table = fc.record({
      rows: fc.array(fc.array(cell, { minLength: 1, maxLength: 6 }), { minLength: 0, maxLength: 60 }),
      separator: fc.constantFrom(',', ';', '\t', ' ', '|'),
      name: fc.constantFrom('fuzz.csv', 'fuzz_decay.csv', 'fuzz_em.txt', 'fuzz_abs.tsv', 'fuzz.dat'),
    });
    fc.assert(
      fc.property(table, ({ rows, separator, name }) => {
        readCase('delimited', name, encoder.encode(rows.map((row) => row.join(separator)).join('\n')));
      }),
      params(Math.ceil(FUZZ_RUNS * 0.3)),
    );
  });

  it('JCAMP-DX: mutated real files and generated labelled records give measurements or a typed rejection', () => {
    expect(jcamp.length).toBeGreaterThan(3);
    const mutated = mutationRuns('jcamp-dx', jcamp, Math.ceil(FUZZ_RUNS * 0.7));
    expect(mutated.get('result') ?? 0).toBeGreaterThan(0);
    expect(mutated.get('rejected') ?? 0).toBeGreaterThan(0);
    const label = fc.constantFrom(
      'TITLE',
      'JCAMP-DX',
      'DATA TYPE',
      'XUNITS',
      'YUNITS',
      'XFACTOR',
      'YFACTOR',
      'FIRSTX',
      'LASTX',
      'NPOINTS',
      'FIRSTY',
      'DELTAX',
      'XYDATA',
      'XYPOINTS',
      'PEAK TABLE',
      'END',
    );
    const record = fc.array(
      fc.oneof(
        fc
          .tuple(
            label,
            fc.oneof(
              fc.string({ maxLength: 12 }),
              fc.double().map(String),
              fc.constantFrom('(X++(Y..Y))', '(XY..XY)', 'NANOMETERS', '1/CM', '4.24'),
            ),
          )
          .map(([l, v]) => `##${l}=${v}`),
        fc.array(SYNTAX_BYTES, { maxLength: 40 }).map((codes) => String.fromCharCode(...codes)),
        fc
          .array(fc.integer({ min: -1e6, max: 1e6 }), { minLength: 1, maxLength: 10 })
          .map((values) => values.join(' ')),
      ),
      { maxLength: 40 },
    );
    fc.assert(
      fc.property(record, (lines) => {
        readCase('jcamp-dx', 'fuzz.jdx', encoder.encode(['##TITLE=fuzz', ...lines].join('\n')));
      }),
      params(Math.ceil(FUZZ_RUNS * 0.3)),
    );
  });

  it('own JSON: mutated files written from real data and generated JSON give measurements or a typed rejection', () => {
    expect(ownJson.length).toBeGreaterThan(20);
    const mutated = mutationRuns('driftlight-json', ownJson, Math.ceil(FUZZ_RUNS * 0.6));
    expect(mutated.get('rejected') ?? 0).toBeGreaterThan(0);
    fc.assert(
      fc.property(fc.json({ maxDepth: 4 }), fc.constantFrom(...ownJson), fc.nat(), (json, file, at) => {
        // Arbitrary JSON, alone and spliced into a real record in place of one of its values.
        readCase('driftlight-json', 'fuzz.json', encoder.encode(json.startsWith('{') ? json : `{"x":${json}}`));
        const text = decoder.decode(file.content);
        const colon = text.indexOf(':', at % Math.max(text.length, 1));
        if (colon > 0) {
          const end = text.slice(colon + 1).search(/[,}\]]/);
          readCase(
            'driftlight-json',
            file.name,
            encoder.encode(`${text.slice(0, colon + 1)}${json}${end < 0 ? '' : text.slice(colon + 1 + end)}`),
          );
        }
      }),
      params(Math.ceil(FUZZ_RUNS * 0.4)),
    );
  });

  it('any bytes at all (no format chosen) give measurements or a typed rejection', () => {
    fc.assert(
      fc.property(
        fc.oneof(
          fc.uint8Array({ maxLength: 4000 }),
          fc.array(SYNTAX_BYTES, { maxLength: 4000 }).map((codes) => Uint8Array.from(codes)),
        ),
        (content) => {
          readCase('any-bytes', 'fuzz.bin', content);
        },
      ),
      params(Math.ceil(FUZZ_RUNS * 0.3)),
    );
  });
});
