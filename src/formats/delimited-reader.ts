// Reader for delimited text exports (comma, tab, semicolon or white space; decimal point or
// comma; optional header block and column names): layout detection, then one byte pass.
import type { RawTable } from './raw-table.js';
import { detectDelimitedLayout, type LayoutOverrides } from './delimited-layout.js';
import { scanDelimited } from './delimited-scan.js';
import { bomLength, detectLineEnding } from './bytes.js';
import { reject } from './reject.js';
import { parseHeaderLine } from './header-lines.js';
import { itemAt } from '../model/item-at.js';

/** Reads delimited text into a RawTable; throws InputRejected (NO_DATA, NON_NUMERIC, NON_FINITE, LENGTH_MISMATCH, TRUNCATED, …) with file and line. */
export function readDelimited(content: Uint8Array, file: string, overrides: LayoutOverrides = {}): RawTable {
  const start = bomLength(content);
  const layout = detectDelimitedLayout(content, start, file, overrides);
  const scan = scanDelimited(content, layout, file);
  if (scan.rowCount === 0) reject('NO_DATA', 'no data rows follow the header', file);
  const names = layout.columnNames ?? Array.from({ length: layout.columnCount }, (_, index) => `column ${index + 1}`);
  const seen = new Map<string, number>();
  const uniqueNames = names.map((name, index) => {
    const base = name === '' ? `column ${index + 1}` : name;
    const count = seen.get(base) ?? 0;
    seen.set(base, count + 1);
    return count === 0 ? base : `${base} (${count + 1})`;
  });
  const headerEntries = [...layout.headerEntries];
  let trailer: RawTable['trailer'];
  if (scan.trailer !== undefined) {
    const lines = scan.trailer.text.split(/\r\n|\n|\r/);
    while (lines.length > 0 && (lines[lines.length - 1] ?? '').trim() === '') lines.pop();
    lines.forEach((text, index) => {
      const entry = parseHeaderLine(
        text,
        scan.trailer === undefined ? 0 : scan.trailer.line + index,
        layout.delimiter === 'whitespace' ? null : layout.delimiter,
      );
      if (entry !== null) headerEntries.push(entry);
    });
    trailer = { line: scan.trailer.line, lineCount: lines.length };
  }
  return {
    ...(trailer === undefined ? {} : { trailer }),
    columns: uniqueNames.map((name, index) => ({ name, values: itemAt(scan.columns, index) })),
    headerEntries,
    lineOfRow: scan.lineOfRow,
    unitLine: layout.nameLine,
    layout: {
      format: 'delimited',
      delimiter: layout.delimiter,
      decimalMark: layout.decimalMark,
      headerLineCount: layout.headerLineCount,
      hasBom: start > 0,
      lineEnding: detectLineEnding(content, start),
      encoding: layout.encoding,
    },
    namedColumns: layout.columnNames !== null,
  };
}
