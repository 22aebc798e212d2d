// Intake classification from a file's head. Set assembly needs only what a file is (spectrum kind or
// decay, IRF column) and its metadata (sample id, role, acquisition time, excitation, solvent), all
// of which sit in the metadata lines, the column header and the first data rows. A delimited text
// file is therefore read at intake only up to its first HEAD_DATA_ROWS data rows (at most
// HEAD_LINES lines); the full read and validation happen in the worker, which reports an
// unreadable own file back for quarantine (see commit.ts).
// JCAMP-DX, JSON, UTF-16 and short files are read whole, and a head that does not read is read
// whole, so a file bad near its top is still rejected at intake with the reader's own error.
import { InputRejected } from '../model/errors.js';
import { readData, sniffFormat, utf16Order, type FormatProfile, type ParsedData } from '../formats/index.js';

/** Most lines of a delimited file read at intake. */
export const HEAD_LINES = 64;
/** Data rows read at intake: enough for layout detection (a run of 4 numeric rows) and the axis step. */
export const HEAD_DATA_ROWS = 8;

const NEWLINE = 0x0a;

/** Byte offset just past the `lines`-th newline, or undefined when the file has no more lines than that. */
export function headEnd(bytes: Uint8Array, lines: number): number | undefined {
  let seen = 0;
  for (let at = bytes.indexOf(NEWLINE); at >= 0; at = bytes.indexOf(NEWLINE, at + 1)) {
    seen += 1;
    if (seen === lines) return at + 1 < bytes.length ? at + 1 : undefined;
  }
  return undefined;
}

const CR = 0x0d;
const SPACE = 0x20;
const TAB = 0x09;

/** Whether the line starting at byte `at` looks like a data row: its first visible character is a digit, sign or decimal mark. */
function looksNumeric(bytes: Uint8Array, at: number): boolean {
  let i = at;
  while (i < bytes.length && (bytes[i] === SPACE || bytes[i] === TAB)) i++;
  const c = bytes[i] ?? 0;
  return (c >= 0x30 && c <= 0x39) || c === 0x2b || c === 0x2d || c === 0x2e || c === 0x2c;
}

/** Byte offset just past the head read at intake: after HEAD_DATA_ROWS consecutive data-looking lines, or after HEAD_LINES lines; undefined when the file is not longer than that. */
export function intakeHeadEnd(bytes: Uint8Array): number | undefined {
  let seen = 0;
  let dataRun = 0;
  let lineStart = 0;
  for (let at = bytes.indexOf(NEWLINE); at >= 0; at = bytes.indexOf(NEWLINE, at + 1)) {
    seen += 1;
    const blank = at === lineStart || (at === lineStart + 1 && bytes[lineStart] === CR);
    if (!blank) dataRun = looksNumeric(bytes, lineStart) ? dataRun + 1 : 0;
    if (dataRun === HEAD_DATA_ROWS || seen === HEAD_LINES) return at + 1 < bytes.length ? at + 1 : undefined;
    lineStart = at + 1;
  }
  return undefined;
}

function isUtf16(bytes: Uint8Array): boolean {
  return utf16Order(bytes) !== null;
}

/** Reads what set assembly needs from a data file: its head for long delimited files, else the whole file; throws InputRejected. */
export function readForAssembly(
  bytes: Uint8Array,
  options: { fileName: string; maxBytes: number; profiles?: readonly FormatProfile[] },
): ParsedData {
  const end = intakeHeadEnd(bytes);
  if (end === undefined || isUtf16(bytes) || sniffFormat(bytes) !== 'delimited') return readData(bytes, options);
  try {
    return readData(bytes.subarray(0, end), options);
  } catch (error) {
    if (!(error instanceof InputRejected)) throw error;
    return readData(bytes, options);
  }
}
