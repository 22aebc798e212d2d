// Detects the layout of a delimited text export from its first 64 KiB: column separator, decimal
// mark, where the numeric block starts, the column-name line (and an optional units line) and the
// header lines above it. The numeric block itself is read by delimited-scan.ts in one byte pass.
import type { DelimiterName } from './types.js';
import type { HeaderEntry } from './metadata-vocabulary.js';
import { lookupKey } from './metadata-vocabulary.js';
import { parseHeaderLine, splitNameLine, stripCommentMarker } from './header-lines.js';
import { decodeText, splitLines } from './bytes.js';
import { lookupAxisUnit, readAxisName } from './units.js';
import { reject } from './reject.js';
import { itemAt } from '../model/item-at.js';

const SAMPLE_BYTES = 65_536;
/** Consecutive numeric rows with one column count that mark the start of the data block. */
const RUN_LENGTH = 4;

interface Candidate {
  readonly delimiter: DelimiterName;
  readonly decimalMark: '.' | ',';
}

const CANDIDATES: readonly Candidate[] = [
  { delimiter: '\t', decimalMark: '.' },
  { delimiter: ';', decimalMark: '.' },
  { delimiter: ',', decimalMark: '.' },
  { delimiter: 'whitespace', decimalMark: '.' },
  { delimiter: '\t', decimalMark: ',' },
  { delimiter: ';', decimalMark: ',' },
  { delimiter: 'whitespace', decimalMark: ',' },
];

const NUMERIC: Readonly<Record<'.' | ',', RegExp>> = {
  '.': /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$|^[+-]?(?:nan|inf|infinity)$/i,
  ',': /^[+-]?(?:\d+,?\d*|,\d+)(?:[eE][+-]?\d+)?$|^[+-]?(?:nan|inf|infinity)$/i,
};

/** The detected layout of a delimited file. */
export interface DelimitedLayout {
  readonly delimiter: DelimiterName;
  readonly decimalMark: '.' | ',';
  readonly columnCount: number;
  /** Byte offset of the first data line. */
  readonly dataStartByte: number;
  /** 1-based line number of the first data line. */
  readonly firstDataLine: number;
  readonly headerLineCount: number;
  /** Column names from the file (null when the file names none). */
  readonly columnNames: readonly string[] | null;
  readonly headerEntries: readonly HeaderEntry[];
  /** 1-based line of the column-name line, when there is one. */
  readonly nameLine: number | undefined;
  readonly encoding: 'utf-8' | 'latin1';
}

/** Splits a candidate data line into trimmed fields (one trailing empty field from a trailing delimiter is dropped). */
function splitFields(line: string, delimiter: DelimiterName): string[] {
  const trimmed = line.trim();
  if (trimmed === '') return [];
  const fields = (
    delimiter === 'whitespace' ? trimmed.split(/[ \t]+/) : trimmed.split(delimiter).map((field) => field.trim())
  ).map((field) =>
    field.length >= 2 && field.startsWith('"') && field.endsWith('"') ? field.slice(1, -1).trim() : field,
  );
  // Spreadsheets pad rows with empty cells: every trailing empty field is dropped.
  while (fields.length > 1 && fields[fields.length - 1] === '') fields.pop();
  return fields;
}

/** Characters a numeric field (or its opening quote) can start with: digits, sign, decimal marks, NaN/Inf. */
const NUMERIC_START = /^[\s"]*[-+0-9.,nNiI]/;

/** Number of numeric fields when every field of `line` is numeric under `candidate` (and ≥ 2), else 0. */
function numericFieldCount(line: string, candidate: Candidate): number {
  // Cheap refusals first (header lines, other separators), so most candidate lines are never split.
  if (!NUMERIC_START.test(line)) return 0;
  if (candidate.delimiter === 'whitespace' ? !/\S[ \t]+\S/.test(line) : !line.includes(candidate.delimiter)) return 0;
  const fields = splitFields(line, candidate.delimiter);
  if (fields.length < 2) return 0;
  const pattern = NUMERIC[candidate.decimalMark];
  for (const field of fields) if (!pattern.test(field)) return 0;
  return fields.length;
}

/** First line index starting a run of numeric rows under `candidate` (blank lines skipped), with the column count. */
function findDataStart(
  lines: readonly string[],
  candidate: Candidate,
  lastLine: number,
): { index: number; columns: number } | null {
  for (let i = 0; i <= lastLine; i++) {
    const columns = numericFieldCount(lines[i] ?? '', candidate);
    if (columns === 0) continue;
    let run = 1;
    let ok = true;
    for (let j = i + 1; j < lastLine && run < RUN_LENGTH; j++) {
      const line = lines[j] ?? '';
      if (line.trim() === '') continue;
      if (numericFieldCount(line, candidate) !== columns) {
        ok = false;
        break;
      }
      run++;
    }
    if (ok) return { index: i, columns };
  }
  return null;
}

/** Byte offset where 0-based line `lineIndex` starts (LF, CRLF or CR terminators). */
function byteOffsetOfLine(content: Uint8Array, start: number, lineIndex: number): number {
  let line = 0;
  let i = start;
  while (line < lineIndex && i < content.length) {
    const byte = content[i];
    if (byte === 10) line++;
    else if (byte === 13) {
      if (content[i + 1] === 10) i++;
      line++;
    }
    i++;
  }
  return i;
}

const VALUE_UNIT_WORDS = /^(?:counts?|cts|cps|a\.?u\.?|arb\.?|arbitrary units?|%|%t|absorbance|au|od|factor|1\/s|-|)$/i;

/** True when every field of a line reads as a unit label (a units row under the column names). */
function isUnitsRow(fields: readonly string[]): boolean {
  return fields.every((field) => {
    const inner = field.replace(/^[([{]\s*|\s*[)\]}]$/g, '');
    return VALUE_UNIT_WORDS.test(inner) || lookupAxisUnit(inner) !== undefined;
  });
}

/** Candidate splits of a column-name line; white-space files may hold names with spaces ("wavelength (nm)"). */
function nameSplits(line: string, delimiter: DelimiterName): string[][] {
  if (delimiter !== 'whitespace') return [splitNameLine(line, delimiter)];
  const text = stripCommentMarker(line.trim()).text;
  const tokens = text.split(/\s+/);
  const merged: string[] = [];
  for (const token of tokens) {
    if (/^[([{]/.test(token) && merged.length > 0) merged[merged.length - 1] += ` ${token}`;
    else merged.push(token);
  }
  return [splitNameLine(line, null), merged, tokens];
}

/** What a profile fixes about a delimited layout (anything left undefined is sniffed). */
export interface LayoutOverrides {
  readonly delimiter?: DelimiterName;
  readonly decimalMark?: '.' | ',';
  /** Lines before the first data row. */
  readonly headerLines?: number;
  /** 1-based line of the column names; 0 = none. */
  readonly columnNamesLine?: number;
}

/** A run of RUN_LENGTH lines holding exactly one number each (a single-column histogram), from the top. */
function findSingleColumn(lines: readonly string[], lastLine: number): { index: number; columns: number } | null {
  const single = (line: string): boolean => NUMERIC['.'].test(line.trim().replace(/[,;\t ]+$/, ''));
  for (let i = 0; i <= lastLine; i++) {
    if (!single(lines[i] ?? '')) continue;
    let run = 1;
    for (let j = i + 1; j <= lastLine && run < RUN_LENGTH; j++) {
      const line = lines[j] ?? '';
      if (line.trim() === '') continue;
      if (!single(line)) break;
      run++;
    }
    if (run >= Math.min(RUN_LENGTH, lastLine - i + 1)) return { index: i, columns: 1 };
  }
  return null;
}

/** True when `values` are strictly monotonic and all within [low, high]. */
function monotonicWithin(values: readonly number[], low: number, high: number): boolean {
  if (values.length < 2 || values.some((value) => !(value >= low && value <= high))) return false;
  const direction = Math.sign(itemAt(values, 1) - itemAt(values, 0));
  return (
    direction !== 0 && values.every((value, i) => i === 0 || Math.sign(value - itemAt(values, i - 1)) === direction)
  );
}

/** Wavelength range (nm) in which the axes of an excitation–emission matrix are looked for. */
const MATRIX_NM = [150, 2000] as const;

/** Throws MATRIX_LAYOUT when the block is an excitation–emission matrix: a row of wavelengths over a column of wavelengths. */
function rejectMatrix(
  lines: readonly string[],
  index: number,
  lastLine: number,
  candidate: Candidate,
  columns: number,
  file: string,
): void {
  if (columns < 4) return;
  const numbers = (fields: readonly string[]): number[] =>
    fields.map((field) => Number(candidate.decimalMark === ',' ? field.replace(',', '.') : field));
  const hint =
    'An excitation–emission matrix is not analysed yet: export one emission spectrum per excitation wavelength (axis column and one value column), or several spectra sharing one axis with the excitation in each column name.';
  let above = index - 1;
  while (above >= 0 && (lines[above] ?? '').trim() === '') above--;
  const firstColumn: number[] = [];
  for (let i = index; i <= lastLine && firstColumn.length < 8; i++) {
    const fields = splitFields(lines[i] ?? '', candidate.delimiter);
    if (fields.length > 0) firstColumn.push(...numbers(fields.slice(0, 1)));
  }
  if (above >= 0) {
    const fields = splitFields(stripCommentMarker(lines[above] ?? '').text, candidate.delimiter);
    const pattern = NUMERIC[candidate.decimalMark];
    if (
      fields.length === columns &&
      !pattern.test(fields[0] ?? '') &&
      fields.slice(1).every((field) => pattern.test(field)) &&
      monotonicWithin(numbers(fields.slice(1)), MATRIX_NM[0], MATRIX_NM[1])
    ) {
      reject(
        'MATRIX_LAYOUT',
        `the line above the data holds ${columns - 1} wavelengths (${fields[1] ?? ''} … ${fields[columns - 1] ?? ''}) over a column of wavelengths: an excitation–emission matrix`,
        file,
        above + 1,
        hint,
      );
    }
  }
  const top = splitFields(lines[index] ?? '', candidate.delimiter);
  const corner = Number(top[0]);
  if (
    corner === 0 &&
    monotonicWithin(numbers(top.slice(1)), MATRIX_NM[0], MATRIX_NM[1]) &&
    monotonicWithin(firstColumn.slice(1), MATRIX_NM[0], MATRIX_NM[1])
  ) {
    reject(
      'MATRIX_LAYOUT',
      `the first row holds a 0 corner and ${columns - 1} wavelengths (${top[1] ?? ''} … ${top[columns - 1] ?? ''}) over a column of wavelengths: an excitation–emission matrix`,
      file,
      index + 1,
      hint,
    );
  }
}

/** Detects the layout of delimited text starting at byte `start` (after any BOM); throws NO_DATA, NON_NUMERIC, MATRIX_LAYOUT or UNKNOWN_LAYOUT. */
export function detectDelimitedLayout(
  content: Uint8Array,
  start: number,
  file: string,
  overrides: LayoutOverrides = {},
): DelimitedLayout {
  const sampleEnd = Math.min(content.length, start + SAMPLE_BYTES);
  let cut = sampleEnd;
  if (sampleEnd < content.length) {
    while (cut > start && content[cut - 1] !== 10 && content[cut - 1] !== 13) cut--;
  }
  const { text, encoding } = decodeText(content.subarray(start, cut));
  const lines = splitLines(text);
  let lastLine = lines.length - 1;
  while (lastLine > 0 && (lines[lastLine] ?? '').trim() === '') lastLine--;
  let best: { candidate: Candidate; index: number; columns: number } | null = null;
  const candidates = CANDIDATES.filter(
    (candidate) =>
      (overrides.delimiter === undefined || candidate.delimiter === overrides.delimiter) &&
      (overrides.decimalMark === undefined || candidate.decimalMark === overrides.decimalMark),
  );
  if (candidates.length === 0 && overrides.delimiter !== undefined)
    candidates.push({ delimiter: overrides.delimiter, decimalMark: overrides.decimalMark ?? '.' });
  for (const candidate of candidates) {
    if (overrides.headerLines !== undefined) {
      let index = overrides.headerLines;
      while (index <= lastLine && (lines[index] ?? '').trim() === '') index++;
      const columns = numericFieldCount(lines[index] ?? '', candidate);
      if (columns > 0 && (best === null || columns > best.columns)) best = { candidate, index, columns };
      continue;
    }
    const found = findDataStart(lines, candidate, lastLine);
    if (found === null) continue;
    if (best === null || found.index < best.index || (found.index === best.index && found.columns > best.columns)) {
      best = { candidate, ...found };
    }
  }
  let singleColumn = false;
  if (best === null && overrides.delimiter === undefined && overrides.headerLines === undefined) {
    const found = findSingleColumn(lines, lastLine);
    if (found !== null) {
      best = { candidate: { delimiter: 'whitespace', decimalMark: '.' }, ...found };
      singleColumn = true;
    }
  }
  if (best === null && overrides.headerLines !== undefined) {
    return reject(
      'NO_DATA',
      `line ${overrides.headerLines + 1} (after the ${overrides.headerLines} header lines of the profile) is not a row of numbers`,
      file,
      overrides.headerLines + 1,
      'Check headerLines, delimiter and decimalMark of the formats profile matching this file.',
    );
  }
  if (best === null) {
    return reject(
      'NO_DATA',
      'no block of rows with two or more numeric columns was found',
      file,
      undefined,
      'Put one row per point: an axis column and one or more value columns, separated by comma, tab, semicolon or spaces.',
    );
  }
  const { candidate, index, columns } = best;
  const delimiterChar = candidate.delimiter === 'whitespace' ? null : candidate.delimiter;
  if (overrides.headerLines === undefined) rejectMatrix(lines, index, lastLine, candidate, columns, file);
  // A header line just above the block that has the block's column count and a numeric first field
  // is a data row with a bad value: report it instead of silently treating it as header.
  for (let i = index - 1; i >= 0; i--) {
    const line = lines[i] ?? '';
    if (line.trim() === '') continue;
    const fields = splitFields(line, candidate.delimiter);
    const pattern = NUMERIC[candidate.decimalMark];
    if (fields.length === columns && pattern.test(fields[0] ?? '')) {
      const bad = fields.findIndex((field) => !pattern.test(field));
      reject('NON_NUMERIC', `column ${bad + 1} holds "${fields[bad] ?? ''}", not a number`, file, i + 1);
    }
    break;
  }
  let nameLineIndex = -1;
  let columnNames: string[] | null = null;
  let lastHeader = index - 1;
  while (lastHeader >= 0 && (lines[lastHeader] ?? '').trim() === '') lastHeader--;
  if (overrides.columnNamesLine !== undefined) {
    const named = overrides.columnNamesLine - 1;
    if (named >= 0) {
      const names = dropTrailingEmpty(
        nameSplits(lines[named] ?? '', candidate.delimiter).find(
          (split) => dropTrailingEmpty(split).length === columns,
        ) ?? [],
      );
      if (names.length !== columns) {
        reject(
          'MISSING_COLUMN',
          `line ${named + 1} (the profile's columnNamesLine) does not hold ${columns} column names`,
          file,
          named + 1,
          'Check columnNamesLine and delimiter of the formats profile matching this file.',
        );
      }
      columnNames = names;
      nameLineIndex = named;
    }
  } else if (lastHeader >= 0 && columns > 1) {
    const candidateNames = nameSplits(lines[lastHeader] ?? '', candidate.delimiter).find(
      (split) => dropTrailingEmpty(split).length === columns,
    );
    if (candidateNames !== undefined) {
      const names = dropTrailingEmpty(candidateNames);
      let above = lastHeader - 1;
      while (above >= 0 && (lines[above] ?? '').trim() === '') above--;
      const aboveNames =
        above >= 0
          ? nameSplits(lines[above] ?? '', candidate.delimiter)
              .map(dropTrailingEmpty)
              .find((split) => split.length === columns)
          : undefined;
      if (isUnitsRow(names) && aboveNames !== undefined && looksLikeNames(aboveNames, candidate)) {
        columnNames = aboveNames.map((name, k) =>
          (names[k] ?? '') === '' ? name : `${name} (${(names[k] ?? '').replace(/^[([{]\s*|\s*[)\]}]$/g, '')})`,
        );
        nameLineIndex = above;
      } else if (looksLikeNames(names, candidate)) {
        columnNames = names;
        nameLineIndex = lastHeader;
      }
    }
  }
  const headerEntries: HeaderEntry[] = [];
  const headerEnd = nameLineIndex >= 0 ? nameLineIndex : index;
  for (let i = 0; i < headerEnd; i++) {
    const entry = parseHeaderLine(lines[i] ?? '', i + 1, delimiterChar);
    if (entry !== null) headerEntries.push(entry);
  }
  if (singleColumn && columnNames === null && lastHeader >= 0 && lastHeader === index - 1) {
    const name = stripCommentMarker((lines[lastHeader] ?? '').trim()).text.trim();
    if (
      /^[A-Za-z][\w ()[\]/.-]*$/.test(name) &&
      lookupKey(name) === undefined &&
      !name.includes(':') &&
      !name.includes('=')
    ) {
      columnNames = [name];
      nameLineIndex = lastHeader;
    }
  }
  return {
    delimiter: candidate.delimiter,
    decimalMark: candidate.decimalMark,
    columnCount: columns,
    dataStartByte: byteOffsetOfLine(content, start, index),
    firstDataLine: index + 1,
    headerLineCount: index,
    columnNames,
    headerEntries,
    nameLine: nameLineIndex >= 0 ? nameLineIndex + 1 : undefined,
    encoding,
  };
}

function dropTrailingEmpty(fields: readonly string[]): string[] {
  let end = fields.length;
  while (end > 1 && fields[end - 1] === '') end--;
  return fields.slice(0, end);
}

/** A split is a column-name row when no field is numeric, and it is not a `key,value` metadata entry. */
function looksLikeNames(fields: readonly string[], candidate: Candidate): boolean {
  const pattern = NUMERIC[candidate.decimalMark];
  if (fields.some((field) => pattern.test(field))) return false;
  if (fields.length === 2 && lookupKey(fields[0] ?? '') !== undefined && !readAxisName(fields[0] ?? '').looksLikeAxis)
    return false;
  return true;
}
