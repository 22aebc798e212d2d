// The table of readers, tried in order on the first characters of a file: the first whose `matches`
// accepts them reads the file. Add a format by adding a reader file and a row here (DEVELOPERS.md).
import type { ResolvedReadOptions } from './read-options.js';
import type { DataFormat, ParsedData } from './types.js';
import { readDelimited } from './delimited-reader.js';
import { readJcamp, looksLikeJcamp } from './jcamp-reader.js';
import { readDataJson } from './json-reader.js';
import { interpretTableAll } from './interpret.js';
import { profileDelimiter, type ResolvedFormatProfile } from './profile.js';
import type { LayoutOverrides } from './delimited-layout.js';

/** What a matching profile fixes about a delimited layout. */
function layoutOverrides(profile: ResolvedFormatProfile | undefined): LayoutOverrides {
  if (profile === undefined) return {};
  return {
    ...(profile.delimiter === undefined ? {} : { delimiter: profileDelimiter(profile.delimiter) }),
    ...(profile.decimalMark === undefined ? {} : { decimalMark: profile.decimalMark }),
    ...(profile.headerLines === undefined ? {} : { headerLines: profile.headerLines }),
    ...(profile.columnNamesLine === undefined ? {} : { columnNamesLine: profile.columnNamesLine }),
  };
}

export interface FormatReader {
  readonly format: DataFormat;
  /** True when the file's first non-blank characters (BOM removed, up to 512) look like this format. */
  matches(head: string): boolean;
  /** Reads every measurement of the whole file; throws InputRejected. */
  read(content: Uint8Array, options: ResolvedReadOptions): ParsedData[];
}

export const FORMAT_READERS: readonly FormatReader[] = [
  {
    format: 'driftlight-json',
    matches: (head) => head.startsWith('{'),
    read: (content, options) => [readDataJson(content, options.fileName)],
  },
  {
    format: 'jcamp-dx',
    matches: looksLikeJcamp,
    read: (content, options) => interpretTableAll(readJcamp(content, options.fileName), options),
  },
  {
    // The fallback: anything else is tried as delimited text (which rejects what it cannot read).
    format: 'delimited',
    matches: () => true,
    read: (content, options) =>
      interpretTableAll(readDelimited(content, options.fileName, layoutOverrides(options.profile)), options),
  },
];
