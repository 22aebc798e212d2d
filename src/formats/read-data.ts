// readData(): checks the bytes, sniffs the format by content with the reader table (JSON object,
// JCAMP-DX labels, else delimited text) and returns the parsed spectrum or decay. Any non-typed failure is wrapped so
// that callers only ever see InputRejected.
import { InputRejected } from '../model/errors.js';
import { resolveReadOptions, type ReadOptions } from './read-options.js';
import type { DataFormat, LayoutInfo, ParsedData } from './types.js';
import { bomLength, checkContent, decodeText, normaliseBytes } from './bytes.js';
import { FORMAT_READERS, type FormatReader } from './reader-table.js';
import { itemAt } from '../model/item-at.js';

/** Bytes examined to sniff the format. */
const SNIFF_CHARS = 512;

/** The reader for `content`, judged by its first non-blank characters (the first matching row of FORMAT_READERS). */
function readerFor(content: Uint8Array): FormatReader {
  const start = bomLength(content);
  const head = decodeText(content.subarray(start, Math.min(content.length, start + SNIFF_CHARS))).text.trimStart();
  const reader = FORMAT_READERS.find((candidate) => candidate.matches(head));
  // The last row matches everything, so a reader is always found; this guards edits to the table.
  if (reader === undefined) throw new InputRejected('UNKNOWN_LAYOUT', 'no reader recognises this file');
  return reader;
}

/** The format of `content` judged by its first non-blank characters: `{` → driftlight JSON, `##LABEL=` → JCAMP-DX, else delimited. */
export function sniffFormat(content: Uint8Array): DataFormat {
  return readerFor(normaliseBytes(content).bytes).format;
}

/** Reads a spectrum or a decay histogram from file bytes (the first measurement when the file holds several: see readMeasurements); throws InputRejected with file, line and hint. */
export function readData(content: Uint8Array, options: ReadOptions): ParsedData {
  return itemAt(readMeasurements(content, options), 0);
}

/** Reads every measurement a file holds (several decay columns, spectra sharing an axis, x,y pairs: one each, the column name in its id); throws InputRejected with file, line and hint. */
export function readMeasurements(content: Uint8Array, options: ReadOptions): ParsedData[] {
  const resolved = resolveReadOptions(options);
  const file = resolved.fileName;
  try {
    if (content.length > resolved.maxBytes) checkContent(content, resolved.maxBytes, file);
    const { bytes, utf16, utf16Bom, ctrlZ } = normaliseBytes(content);
    checkContent(bytes, resolved.maxBytes, file);
    const all = readerFor(bytes).read(bytes, resolved);
    if (utf16 === null && !ctrlZ) return all;
    return all.map((data) => {
      const layout: LayoutInfo = Object.freeze({
        ...data.layout,
        ...(utf16 === null ? {} : { encoding: utf16, hasBom: utf16Bom }),
        conversions: ctrlZ
          ? [
              ...data.layout.conversions,
              {
                code: 'end-of-file-mark-dropped' as const,
                detail: 'a final Ctrl-Z (0x1A) end-of-file mark was ignored',
              },
            ]
          : data.layout.conversions,
      });
      return data.type === 'decay' ? { ...data, layout } : { ...data, layout };
    });
  } catch (error) {
    if (error instanceof InputRejected) throw error.withLocation(file);
    if (error instanceof RangeError) {
      throw new InputRejected('FILE_TOO_LARGE', `the file could not be held in memory (${error.message})`, {
        file,
        cause: error,
      });
    }
    throw error;
  }
}
