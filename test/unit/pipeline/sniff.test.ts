// Intake reads only the head of a long delimited file (what set assembly needs); a file bad near its
// top is still rejected there with the reader's own line, a file bad further down passes to the worker.
import { describe, expect, it } from 'vitest';
import { readData } from '../../../src/formats/index.js';
import { InputRejected } from '../../../src/model/errors.js';
import { HEAD_DATA_ROWS, HEAD_LINES, headEnd, intakeHeadEnd, readForAssembly } from '../../../src/pipeline/sniff.js';

const encoder = new TextEncoder();
const HEADER = [
  '# kind: emission',
  '# sample id: head-01',
  '# excitation wavelength (nm): 480',
  '# acquired at: 2026-03-14T10:00:00Z',
  'wavelength (nm),intensity',
];

/** An emission CSV of `rows` data rows; `badRow` (0-based data row) holds a broken number. */
function emissionCsv(rows: number, badRow?: number): Uint8Array {
  const data = Array.from({ length: rows }, (_u, i) => `${490 + i},${i === badRow ? '12.5.3' : (100 + i).toFixed(3)}`);
  return encoder.encode(`${[...HEADER, ...data].join('\n')}\n`);
}

const options = { fileName: 'head-01_em.csv', maxBytes: 50_000_000 };

describe('readForAssembly', () => {
  it('finds the end of the first N lines, or undefined for a file no longer than that', () => {
    expect(headEnd(encoder.encode('a\nb\nc\n'), 2)).toBe(4);
    expect(headEnd(encoder.encode('a\nb\n'), 2)).toBeUndefined();
    expect(headEnd(encoder.encode('a\nb'), 2)).toBeUndefined();
  });

  it('ends the intake head after the first data rows, or after HEAD_LINES lines when no data run shows', () => {
    const bytes = emissionCsv(300);
    const end = intakeHeadEnd(bytes);
    const head = new TextDecoder()
      .decode(bytes.subarray(0, end))
      .split('\n')
      .filter((l) => l !== '');
    expect(head).toHaveLength(HEADER.length + HEAD_DATA_ROWS);
    const prose = encoder.encode(`${Array.from({ length: 100 }, (_u, i) => `# note ${i}`).join('\n')}\n`);
    expect(intakeHeadEnd(prose)).toBe(headEnd(prose, HEAD_LINES));
    expect(intakeHeadEnd(emissionCsv(3))).toBeUndefined();
  });

  it('classifies a long file from its head exactly as the full read does', () => {
    const bytes = emissionCsv(300);
    const head = readForAssembly(bytes, options);
    const full = readData(bytes, options);
    expect(head.type).toBe('spectrum');
    if (head.type !== 'spectrum' || full.type !== 'spectrum') return;
    expect(head.spectrum.kind).toBe(full.spectrum.kind);
    expect(head.spectrum.metadata).toEqual(full.spectrum.metadata);
  });

  it('rejects a file broken within its head with the line number of the full read', () => {
    const bytes = emissionCsv(300, 2);
    expect(() => readForAssembly(bytes, options)).toThrow(InputRejected);
    try {
      readForAssembly(bytes, options);
    } catch (error) {
      expect(error).toMatchObject({ code: 'NON_NUMERIC', line: HEADER.length + 3 });
    }
  });

  it('lets a file broken below its head through (the worker rejects it, with its line)', () => {
    const badRow = HEAD_DATA_ROWS + 20;
    const bytes = emissionCsv(300, badRow);
    expect(readForAssembly(bytes, options).type).toBe('spectrum');
    expect(() => readData(bytes, options)).toThrow(
      expect.objectContaining({ code: 'NON_NUMERIC', line: HEADER.length + badRow + 1 }),
    );
  });
});
