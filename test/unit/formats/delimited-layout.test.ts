// Property: a random table written in any supported layout (delimiter × decimal mark × header style ×
// line end × BOM × axis order) reads back to the same numbers. The expected numbers are the table
// itself; each cell is written with Number::toString (ECMA-262), the decimal point swapped for a comma
// where the layout asks for one.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { readMeasurements } from '../../../src/formats/index.js';
import { bytes } from './helpers.js';

type Delimiter = ',' | '\t' | ';' | ' ' | '   ';
type HeaderStyle = 'none' | 'names' | 'metadata+names' | 'commented names' | 'names+units';

interface LayoutCase {
  readonly delimiter: Delimiter;
  readonly decimalComma: boolean;
  readonly header: HeaderStyle;
  readonly lineEnd: '\n' | '\r\n';
  readonly bom: boolean;
  readonly descending: boolean;
}

const layoutCase: fc.Arbitrary<LayoutCase> = fc
  .record({
    delimiter: fc.constantFrom<Delimiter>(',', '\t', ';', ' ', '   '),
    decimalComma: fc.boolean(),
    header: fc.constantFrom<HeaderStyle>('none', 'names', 'metadata+names', 'commented names', 'names+units'),
    lineEnd: fc.constantFrom<'\n' | '\r\n'>('\n', '\r\n'),
    bom: fc.boolean(),
    descending: fc.boolean(),
  })
  .filter((c) => !(c.decimalComma && c.delimiter === ','));

const cell = fc.double({ min: -1e6, max: 1e6, noNaN: true }).map((value) => value + 0);

/** A table: ascending axis in 200–2000 nm and 1–3 value columns. */
const table = fc.integer({ min: 2, max: 25 }).chain((rows) =>
  fc.record({
    axis: fc
      .uniqueArray(fc.double({ min: 200, max: 2000, noNaN: true }), { minLength: rows, maxLength: rows })
      .map((values) => [...values].sort((a, b) => a - b)),
    columns: fc
      .integer({ min: 1, max: 3 })
      .chain((count) =>
        fc.array(fc.array(cell, { minLength: rows, maxLength: rows }), { minLength: count, maxLength: count }),
      ),
  }),
);

function render(axis: readonly number[], columns: readonly number[][], c: LayoutCase): string {
  const format = (value: number): string => (c.decimalComma ? String(value).replace('.', ',') : String(value));
  const names = ['wavelength (nm)', ...columns.map((_, k) => `v${k + 1}`)];
  const header: string[] = [];
  if (c.header === 'metadata+names')
    header.push('Sample: T-1', 'Solvent = water', '# excitation 350 nm', '', 'Operator;nobody');
  if (c.header === 'names' || c.header === 'metadata+names') header.push(names.join(c.delimiter));
  if (c.header === 'commented names') header.push(`# ${names.join(c.delimiter)}`);
  if (c.header === 'names+units')
    header.push(
      ['wavelength', ...columns.map((_, k) => `v${k + 1}`)].join(c.delimiter),
      ['nm', ...columns.map(() => 'a.u.')].join(c.delimiter),
    );
  const order = axis.map((_, i) => i);
  if (c.descending) order.reverse();
  const rows = order.map((i) =>
    [format(axis[i] as number), ...columns.map((column) => format(column[i] as number))].join(c.delimiter),
  );
  return `${c.bom ? '\uFEFF' : ''}${[...header, ...rows].join(c.lineEnd)}${c.lineEnd}`;
}

describe('delimited layouts (property)', () => {
  it('reads back the same numbers in every layout (fast-check, 300 runs)', () => {
    fc.assert(
      fc.property(table, layoutCase, ({ axis, columns }, c) => {
        const all = readMeasurements(bytes(render(axis, columns, c)), { fileName: 'layout.txt' });
        // Several value columns sharing the axis are several spectra (issue 18), each with its column in its id.
        expect(all).toHaveLength(columns.length);
        const data = all[0];
        expect(data?.type).toBe('spectrum');
        if (data?.type !== 'spectrum') return;
        all.forEach((measurement, k) => {
          if (measurement.type !== 'spectrum') throw new Error('expected a spectrum');
          expect(Array.from(measurement.spectrum.wavelengthNm)).toEqual(axis);
          expect(Array.from(measurement.spectrum.values)).toEqual(columns[k]);
          expect(Object.keys(measurement.spectrum.otherColumns)).toEqual([]);
          if (columns.length > 1) expect(measurement.id).toBe(`layout.txt#${measurement.layout.valueColumn}`);
        });
        // A table of whole numbers only shows no decimal mark at all; the reader then reports its default '.'.
        const anyFraction = [...axis, ...columns.flat()].some((value) => String(value).includes('.'));
        expect(data.layout.decimalMark).toBe(c.decimalComma && anyFraction ? ',' : '.');
        expect(data.layout.delimiter).toBe(c.delimiter === ' ' || c.delimiter === '   ' ? 'whitespace' : c.delimiter);
        expect(data.layout.hasBom).toBe(c.bom);
        expect(data.layout.conversions.some((conversion) => conversion.code === 'axis-reversed')).toBe(
          c.descending && axis.length > 1,
        );
      }),
      { numRuns: 300 },
    );
  });
});
