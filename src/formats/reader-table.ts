// The table of readers, tried in order on the first characters of a file: the first whose `matches`
// accepts them reads the file. Add a format by adding a reader file and a row here (DEVELOPERS.md).
import type { ResolvedReadOptions } from './read-options.js';
import type { DataFormat, ParsedData } from './types.js';
import { readDelimited } from './delimited-reader.js';
import { readJcamp, looksLikeJcamp } from './jcamp-reader.js';
import { readDataJson } from './json-reader.js';
import { interpretTable } from './interpret.js';

export interface FormatReader {
  readonly format: DataFormat;
  /** True when the file's first non-blank characters (BOM removed, up to 512) look like this format. */
  matches(head: string): boolean;
  /** Reads the whole file; throws InputRejected. */
  read(content: Uint8Array, options: ResolvedReadOptions): ParsedData;
}

export const FORMAT_READERS: readonly FormatReader[] = [
  {
    format: 'driftlight-json',
    matches: (head) => head.startsWith('{'),
    read: (content, options) => readDataJson(content, options.fileName),
  },
  {
    format: 'jcamp-dx',
    matches: looksLikeJcamp,
    read: (content, options) => interpretTable(readJcamp(content, options.fileName), options),
  },
  {
    // The fallback: anything else is tried as delimited text (which rejects what it cannot read).
    format: 'delimited',
    matches: () => true,
    read: (content, options) => interpretTable(readDelimited(content, options.fileName), options),
  },
];
