// Intake classification from a file's head. Set assembly needs only what a file is (spectrum kind or
// decay, IRF column) and its metadata (sample id, role, acquisition time, excitation, solvent), all
// of which sit in the metadata lines, the column header and the first data rows. A delimited text
// file is therefore read only up to HEAD_LINES lines at intake; the full read and validation happen
// in the worker, which reports an unreadable own file back for quarantine (see commit.ts).
// JCAMP-DX, JSON, UTF-16 and short files are read whole, and a head that does not read is read
// whole, so a file bad near its top is still rejected at intake with the reader's own error.
import { InputRejected } from '../model/errors.js';
import { readData, sniffFormat, type ParsedData } from '../formats/index.js';

/** Lines of a delimited file read at intake. */
export const HEAD_LINES = 64;

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

function isUtf16(bytes: Uint8Array): boolean {
  return (bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff);
}

/** Reads what set assembly needs from a data file: its head for long delimited files, else the whole file; throws InputRejected. */
export function readForAssembly(bytes: Uint8Array, options: { fileName: string; maxBytes: number }): ParsedData {
  const end = headEnd(bytes, HEAD_LINES);
  if (end === undefined || isUtf16(bytes) || sniffFormat(bytes) !== 'delimited') return readData(bytes, options);
  try {
    return readData(bytes.subarray(0, end), options);
  } catch (error) {
    if (!(error instanceof InputRejected)) throw error;
    return readData(bytes, options);
  }
}
