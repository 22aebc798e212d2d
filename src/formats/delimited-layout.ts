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
  const fields = (delimiter === 'whitespace' ? trimmed.split(/[ \t]+/) : trimmed.split(delimiter).map((field) => field.trim()))
    .map((field) => (field.length >= 2 && field.startsWith('"') && field.endsWith('"') ? field.slice(1, -1).trim() : field));
  if (fields.length > 1 && fields[fields.length - 1] === '') fields.pop();
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
function findDataStart(lines: readonly string[], candidate: Candidate, lastLine: number): { index: number; columns: number } | null {
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

/** Detects the layout of delimited text starting at byte `start` (after any BOM); throws NO_DATA, NON_NUMERIC or UNKNOWN_LAYOUT. */
export function detectDelimitedLayout(content: Uint8Array, start: number, file: string): DelimitedLayout {
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
  for (const candidate of CANDIDATES) {
    const found = findDataStart(lines, candidate, lastLine);
    if (found === null) continue;
    if (best === null || found.index < best.index || (found.index === best.index && found.columns > best.columns)) {
      best = { candidate, ...found };
    }
  }
  if (best === null) {
    return reject('NO_DATA', 'no block of rows with two or more numeric columns was found', file, undefined,
      'Put one row per point: an axis column and one or more value columns, separated by comma, tab, semicolon or spaces.');
  }
  const { candidate, index, columns } = best;
  const delimiterChar = candidate.delimiter === 'whitespace' ? null : candidate.delimiter;
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
  if (lastHeader >= 0) {
    const candidateNames = nameSplits(lines[lastHeader] ?? '', candidate.delimiter).find((split) => dropTrailingEmpty(split).length === columns);
    if (candidateNames !== undefined) {
      const names = dropTrailingEmpty(candidateNames);
      let above = lastHeader - 1;
      while (above >= 0 && (lines[above] ?? '').trim() === '') above--;
      const aboveNames = above >= 0 ? nameSplits(lines[above] ?? '', candidate.delimiter).map(dropTrailingEmpty).find((split) => split.length === columns) : undefined;
      if (isUnitsRow(names) && aboveNames !== undefined && looksLikeNames(aboveNames, candidate)) {
        columnNames = aboveNames.map((name, k) => ((names[k] ?? '') === '' ? name : `${name} (${(names[k] ?? '').replace(/^[([{]\s*|\s*[)\]}]$/g, '')})`));
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
  return fields.length > 1 && fields[fields.length - 1] === '' ? fields.slice(0, -1) : [...fields];
}

/** A split is a column-name row when no field is numeric, and it is not a `key,value` metadata entry. */
function looksLikeNames(fields: readonly string[], candidate: Candidate): boolean {
  const pattern = NUMERIC[candidate.decimalMark];
  if (fields.some((field) => pattern.test(field))) return false;
  if (fields.length === 2 && lookupKey(fields[0] ?? '') !== undefined && !readAxisName(fields[0] ?? '').looksLikeAxis) return false;
  return true;
}
