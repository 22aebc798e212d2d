// readData(): checks the bytes, sniffs the format by content (JSON object, JCAMP-DX labels, else
// delimited text) and returns the parsed spectrum or decay. Any non-typed failure is wrapped so
// that callers only ever see InputRejected.
import { InputRejected } from '../model/errors.js';
import { resolveReadOptions, type ReadOptions } from './read-options.js';
import type { DataFormat, ParsedData } from './types.js';
import { bomLength, checkContent, decodeText } from './bytes.js';
import { readDelimited } from './delimited-reader.js';
import { readJcamp, looksLikeJcamp } from './jcamp-reader.js';
import { readDataJson } from './json-reader.js';
import { interpretTable } from './interpret.js';

/** Bytes examined to sniff the format. */
const SNIFF_CHARS = 512;

/** The format of `content` judged by its first non-blank characters: `{` → driftlight JSON, `##LABEL=` → JCAMP-DX, else delimited. */
export function sniffFormat(content: Uint8Array): DataFormat {
  const start = bomLength(content);
  const head = decodeText(content.subarray(start, Math.min(content.length, start + SNIFF_CHARS))).text;
  const first = head.trimStart();
  if (first.startsWith('{')) return 'driftlight-json';
  if (looksLikeJcamp(first)) return 'jcamp-dx';
  return 'delimited';
}

/** Reads a spectrum or a decay histogram from file bytes (any supported layout, sniffed by content); throws InputRejected with file, line and hint. */
export function readData(content: Uint8Array, options: ReadOptions): ParsedData {
  const resolved = resolveReadOptions(options);
  const file = resolved.fileName;
  try {
    checkContent(content, resolved.maxBytes, file);
    const format = sniffFormat(content);
    if (format === 'driftlight-json') return readDataJson(content, file);
    const table = format === 'jcamp-dx' ? readJcamp(content, file) : readDelimited(content, file);
    return interpretTable(table, resolved);
  } catch (error) {
    if (error instanceof InputRejected) throw error.withLocation(file);
    if (error instanceof RangeError) {
      throw new InputRejected('FILE_TOO_LARGE', `the file could not be held in memory (${error.message})`, { file, cause: error });
    }
    throw error;
  }
}
