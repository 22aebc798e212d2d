// The single pass over the numeric block of a delimited file: bytes in, one Float64Array per column
// out, no per-line strings. Blank lines and `#` comment lines inside the block are skipped (and
// remembered, so a row index maps back to its file line). O(bytes) time, O(rows × columns) memory.
import type { DelimiterName } from './types.js';
import { bytesToString, parseNumberBytes } from './number-bytes.js';
import { reject } from './reject.js';
import { decodeText } from './bytes.js';
import { itemAt } from '../model/item-at.js';

export interface ScanRequest {
  readonly delimiter: DelimiterName;
  readonly decimalMark: '.' | ',';
  readonly columnCount: number;
  readonly dataStartByte: number;
  readonly firstDataLine: number;
}

export interface ScanResult {
  /** One array per column, each `rowCount` long (views onto larger buffers). */
  readonly columns: readonly Float64Array[];
  readonly rowCount: number;
  /** 1-based file line of each data row. */
  readonly lineOfRow: (row: number) => number;
  /** A text block after the data (a summary such as an integral line) that ended the data: its first line and its text. */
  readonly trailer?: { readonly line: number; readonly text: string };
}

const NEWLINE = 10;
const CARRIAGE_RETURN = 13;
const SPACE = 32;
const TAB = 9;
const HASH = 35;
const QUOTE = 34;

/** Reads the numeric block; throws NON_NUMERIC, NON_FINITE, LENGTH_MISMATCH or TRUNCATED with the file line. */
export function scanDelimited(content: Uint8Array, request: ScanRequest, file: string): ScanResult {
  const { columnCount, firstDataLine } = request;
  const whitespace = request.delimiter === 'whitespace';
  const delimiter = whitespace ? SPACE : request.delimiter === '\t' ? TAB : request.delimiter.charCodeAt(0);
  const decimalMark = request.decimalMark.charCodeAt(0);
  const length = content.length;
  const sampleBytes = Math.min(4096, length - request.dataStartByte);
  let sampleRows = 1;
  for (let i = request.dataStartByte; i < request.dataStartByte + sampleBytes; i++)
    if (content[i] === NEWLINE) sampleRows++;
  let capacity = Math.max(
    16,
    Math.ceil(((length - request.dataStartByte) / Math.max(1, sampleBytes)) * sampleRows * 1.05) + 16,
  );
  let columns: Float64Array[] = Array.from({ length: columnCount }, () => new Float64Array(capacity));
  const skippedBeforeRow: number[] = [];
  let row = 0;
  let line = firstDataLine;
  let pos = request.dataStartByte;
  while (pos < length) {
    // Skip leading blanks of the line; detect blank and comment lines.
    let lineStart = pos;
    while (lineStart < length && (content[lineStart] === SPACE || content[lineStart] === TAB)) lineStart++;
    const first = content[lineStart];
    if (lineStart >= length) break;
    if (row > 0 && first !== undefined && startsText(content, lineStart, delimiter)) {
      const trailer = readTrailer(content, lineStart, line, file);
      return finish(columns, row, skippedBeforeRow, firstDataLine, trailer);
    }
    if (first === NEWLINE || first === CARRIAGE_RETURN || first === HASH) {
      let end = lineStart;
      while (end < length && content[end] !== NEWLINE && content[end] !== CARRIAGE_RETURN) end++;
      pos = end < length && content[end] === CARRIAGE_RETURN && content[end + 1] === NEWLINE ? end + 2 : end + 1;
      skippedBeforeRow.push(row);
      line++;
      continue;
    }
    if (row === capacity) {
      capacity = Math.ceil(capacity * 1.5);
      columns = columns.map((column) => {
        const grown = new Float64Array(capacity);
        grown.set(column);
        return grown;
      });
    }
    let cursor = lineStart;
    for (let column = 0; column < columnCount; column++) {
      while (cursor < length && (content[cursor] === SPACE || (content[cursor] === TAB && delimiter !== TAB))) cursor++;
      const fieldStart = cursor;
      // Fast path: a plain decimal parsed while scanning, then a separator or the line end.
      const quick = fastField(content, cursor, decimalMark, delimiter);
      if (!Number.isNaN(quick)) {
        cursor = fastEnd;
        while (cursor < length && (content[cursor] === SPACE || (content[cursor] === TAB && delimiter !== TAB)))
          cursor++;
        const next = content[cursor];
        const atEnd = cursor >= length || next === NEWLINE || next === CARRIAGE_RETURN;
        if (atEnd || whitespace || next === delimiter) {
          if (atEnd && column < columnCount - 1) shortRow(content, cursor, line, column + 1, columnCount, file);
          itemAt(columns, column)[row] = quick;
          if (!atEnd && !whitespace) cursor++;
          continue;
        }
        cursor = fieldStart;
      }
      let byte = content[cursor];
      if (byte === QUOTE) {
        // A quoted number ("1.5"): parse inside the quotes, then expect a separator or the line end.
        let close = cursor + 1;
        while (
          close < length &&
          content[close] !== QUOTE &&
          content[close] !== NEWLINE &&
          content[close] !== CARRIAGE_RETURN
        )
          close++;
        if (content[close] !== QUOTE) badField('text', content, fieldStart, close, line, column, file);
        let innerStart = fieldStart + 1;
        let innerEnd = close;
        while (innerStart < innerEnd && content[innerStart] === SPACE) innerStart++;
        while (innerEnd > innerStart && content[innerEnd - 1] === SPACE) innerEnd--;
        const value = parseNumberBytes(content, innerStart, innerEnd, decimalMark);
        if (typeof value !== 'number') badField(value, content, innerStart, innerEnd, line, column, file);
        cursor = close + 1;
        while (cursor < length && (content[cursor] === SPACE || (content[cursor] === TAB && delimiter !== TAB)))
          cursor++;
        const next = content[cursor];
        const atEnd = cursor >= length || next === NEWLINE || next === CARRIAGE_RETURN;
        if (!atEnd && !whitespace && next !== delimiter)
          badField('text', content, fieldStart, cursor + 1, line, column, file);
        if (atEnd && column < columnCount - 1) shortRow(content, cursor, line, column + 1, columnCount, file);
        itemAt(columns, column)[row] = value;
        if (!atEnd && !whitespace) cursor++;
        continue;
      }
      while (
        cursor < length &&
        byte !== NEWLINE &&
        byte !== CARRIAGE_RETURN &&
        byte !== delimiter &&
        !(whitespace && byte === TAB)
      ) {
        byte = content[++cursor];
      }
      let fieldEnd = cursor;
      while (fieldEnd > fieldStart && (content[fieldEnd - 1] === SPACE || content[fieldEnd - 1] === TAB)) fieldEnd--;
      const atLineEnd = cursor >= length || byte === NEWLINE || byte === CARRIAGE_RETURN;
      if (fieldStart === fieldEnd && (atLineEnd || column === columnCount - 1)) {
        shortRow(content, cursor, line, column, columnCount, file);
      }
      if (atLineEnd && column < columnCount - 1) {
        const value = parseNumberBytes(content, fieldStart, fieldEnd, decimalMark);
        if (typeof value !== 'number') badField(value, content, fieldStart, fieldEnd, line, column, file);
        shortRow(content, cursor, line, column + 1, columnCount, file);
      }
      const value = parseNumberBytes(content, fieldStart, fieldEnd, decimalMark);
      if (typeof value !== 'number') badField(value, content, fieldStart, fieldEnd, line, column, file);
      itemAt(columns, column)[row] = value;
      if (!atLineEnd && !whitespace) cursor++;
    }
    // After the last column: allow trailing blanks and trailing delimiters (empty spreadsheet cells), then the line end.
    while (cursor < length && (content[cursor] === SPACE || content[cursor] === TAB)) cursor++;
    while (!whitespace && cursor < length && content[cursor] === delimiter) {
      cursor++;
      while (cursor < length && (content[cursor] === SPACE || content[cursor] === TAB)) cursor++;
    }
    if (cursor < length && content[cursor] !== NEWLINE && content[cursor] !== CARRIAGE_RETURN) {
      reject('LENGTH_MISMATCH', `the row has more than the ${columnCount} columns of the rows above`, file, line);
    }
    pos =
      cursor < length && content[cursor] === CARRIAGE_RETURN && content[cursor + 1] === NEWLINE
        ? cursor + 2
        : cursor + 1;
    row++;
    line++;
  }
  return finish(columns, row, skippedBeforeRow, firstDataLine, undefined);
}

function finish(
  columns: Float64Array[],
  rowCount: number,
  skippedBeforeRow: readonly number[],
  firstDataLine: number,
  trailer: ScanResult['trailer'],
): ScanResult {
  const views = columns.map((column) => column.subarray(0, rowCount));
  return {
    columns: views,
    rowCount,
    lineOfRow: (target: number) => firstDataLine + target + countAtMost(skippedBeforeRow, target),
    ...(trailer === undefined ? {} : { trailer }),
  };
}

/** True when the line at `at` starts with a word (a letter, "[" or a non-ASCII character) that is not NaN or Inf: text after the data. */
function startsText(content: Uint8Array, at: number, delimiter: number): boolean {
  const byte = itemAt(content, at);
  const letter = (byte >= 65 && byte <= 90) || (byte >= 97 && byte <= 122) || byte === 91 || byte >= 128;
  if (!letter) return false;
  let end = at;
  while (
    end < content.length &&
    content[end] !== delimiter &&
    content[end] !== NEWLINE &&
    content[end] !== CARRIAGE_RETURN &&
    content[end] !== TAB &&
    content[end] !== SPACE
  )
    end++;
  return !/^(?:nan|inf|infinity)$/i.test(bytesToString(content, at, end));
}

/** Reads the text block that ended the data; throws UNKNOWN_LAYOUT when numeric rows follow it again (a second data block). */
function readTrailer(content: Uint8Array, start: number, line: number, file: string): { line: number; text: string } {
  const text = decodeText(content.subarray(start)).text;
  const lines = text.split(/\r\n|\n|\r/);
  let numericRun = 0;
  for (let i = 0; i < lines.length; i++) {
    const numeric = /^\s*[-+]?(?:\d|\.\d)/.test(lines[i] ?? '');
    numericRun = numeric ? numericRun + 1 : (lines[i] ?? '').trim() === '' ? numericRun : 0;
    if (numericRun >= 2) {
      reject(
        'UNKNOWN_LAYOUT',
        `the data ends at line ${line} with "${(lines[0] ?? '').trim().slice(0, 40)}", but numeric rows follow again at line ${line + i}: the file holds a second block of data`,
        file,
        line + i,
        'Export one measurement per file, or declare the layout in a formats profile (docs/formats.md).',
      );
    }
  }
  return { line, text };
}

const POW10: readonly number[] = Array.from({ length: 23 }, (_, k) => 10 ** k);
/** End offset of the last successful fastField() (a module-level slot avoids allocating a result object per field). */
let fastEnd = 0;

/**
 * Parses a plain decimal ([+-]digits[.digits], ≤ 15 significant digits, ≤ 22 decimals) starting at
 * `start` and ending at a separator, blank, line end or the end of the bytes; NaN when the field
 * is anything else (the caller then takes the general path). Exact: one correctly rounded division
 * of exact integers (Clinger 1990), the same double as Number().
 */
function fastField(content: Uint8Array, start: number, decimalMark: number, delimiter: number): number {
  let p = start;
  let byte = content[p];
  let negative = false;
  if (byte === 45 || byte === 43) {
    negative = byte === 45;
    byte = content[++p];
  }
  let mantissa = 0;
  let significant = 0;
  let fraction = 0;
  let anyDigit = false;
  while (byte !== undefined && byte >= 48 && byte <= 57) {
    anyDigit = true;
    if (mantissa !== 0 || byte !== 48) {
      mantissa = mantissa * 10 + (byte - 48);
      significant++;
    }
    byte = content[++p];
  }
  if (byte === decimalMark) {
    byte = content[++p];
    while (byte !== undefined && byte >= 48 && byte <= 57) {
      anyDigit = true;
      fraction++;
      if (mantissa !== 0 || byte !== 48) {
        mantissa = mantissa * 10 + (byte - 48);
        significant++;
      }
      byte = content[++p];
    }
  }
  if (!anyDigit || significant > 15 || fraction > 22) return Number.NaN;
  if (
    byte !== undefined &&
    byte !== delimiter &&
    byte !== NEWLINE &&
    byte !== CARRIAGE_RETURN &&
    byte !== SPACE &&
    byte !== TAB
  )
    return Number.NaN;
  fastEnd = p;
  const value = fraction === 0 ? mantissa : mantissa / itemAt(POW10, fraction);
  return negative ? -value : value;
}

/** Number of entries ≤ value in a sorted array (binary search). */
function countAtMost(sorted: readonly number[], value: number): number {
  let low = 0;
  let high = sorted.length;
  while (low < high) {
    const mid = (low + high) >>> 1;
    if (itemAt(sorted, mid) <= value) low = mid + 1;
    else high = mid;
  }
  return low;
}

/** A row that ends before its last column: TRUNCATED when it is the file's final line without a line end, else LENGTH_MISMATCH. */
function shortRow(
  content: Uint8Array,
  cursor: number,
  line: number,
  found: number,
  expected: number,
  file: string,
): never {
  let end = cursor;
  while (end < content.length && content[end] !== NEWLINE && content[end] !== CARRIAGE_RETURN) end++;
  const finalLine = end >= content.length;
  if (finalLine) {
    return reject('TRUNCATED', `the last row has ${found} of ${expected} columns and no line end`, file, line);
  }
  return reject('LENGTH_MISMATCH', `the row has ${found} of the ${expected} columns of the rows above`, file, line);
}

function badField(
  failure: 'empty' | 'text' | 'non-finite',
  content: Uint8Array,
  start: number,
  end: number,
  line: number,
  column: number,
  file: string,
): never {
  const text = bytesToString(content, start, Math.min(end, start + 40));
  if (failure === 'non-finite') {
    return reject('NON_FINITE', `column ${column + 1} holds "${text}", not a finite number`, file, line);
  }
  if (failure === 'empty') return reject('NON_NUMERIC', `column ${column + 1} is empty`, file, line);
  return reject('NON_NUMERIC', `column ${column + 1} holds "${text}", not a number`, file, line);
}
