// Reads one header line of a delimited export into a key/value entry. Accepted forms:
// `key: value`, `key=value`, `key<TAB|,|;>value`, and `# key value` (comment marker, then a key
// from the vocabulary or the first word). Lines that fit none are kept as `header line N`.
import type { HeaderEntry } from './metadata-vocabulary.js';
import { lookupKey } from './metadata-vocabulary.js';
import { itemAt } from '../model/item-at.js';

const COMMENT_MARKER = /^(?:#+|%+|;+|\/\/|!+|\*+)\s*/;

/** Strips a leading comment marker (#, %, ;, //, !, *); returns the rest and whether one was found. */
export function stripCommentMarker(line: string): { text: string; commented: boolean } {
  const match = COMMENT_MARKER.exec(line);
  return match === null ? { text: line, commented: false } : { text: line.slice(match[0].length), commented: true };
}

/** Section lines ("[Header]", "[Data]", "[Measurement 1]") and rows of empty spreadsheet cells are structure, not metadata. */
export function isStructureLine(text: string): boolean {
  const trimmed = text.trim();
  return /^\[[^\]=:]*\]$/.test(trimmed) || /^[,;\t ]+$/.test(trimmed);
}

/** Parses one header line (1-based `line`) given the data delimiter character (or null for white space); null for a blank line. */
export function parseHeaderLine(raw: string, line: number, delimiter: string | null): HeaderEntry | null {
  const { text: body, commented } = stripCommentMarker(raw.trim());
  const text = body.trim();
  if (text === '' || isStructureLine(text)) return null;
  const colon = text.indexOf(':');
  const equals = text.indexOf('=');
  const cut = colon < 0 ? equals : equals < 0 ? colon : Math.min(colon, equals);
  if (cut > 0) return { key: text.slice(0, cut).trim(), value: text.slice(cut + 1).trim(), line };
  for (const separator of [delimiter, '\t', ';', ','].filter((s): s is string => s !== null && s !== ' ')) {
    const at = text.indexOf(separator);
    if (at > 0) {
      const value = text
        .slice(at + 1)
        .split(separator)
        .map((part) => part.trim())
        .filter((part) => part !== '')
        .join(separator === '\t' ? ' ' : separator);
      return { key: text.slice(0, at).trim(), value, line };
    }
  }
  const words = text.split(/\s+/);
  if (commented && words.length > 1) {
    for (let take = words.length - 1; take >= 1; take--) {
      const key = words.slice(0, take).join(' ');
      if (lookupKey(key) !== undefined) return { key, value: words.slice(take).join(' '), line };
    }
    return { key: words[0] ?? text, value: words.slice(1).join(' '), line };
  }
  return { key: `header line ${line}`, value: text, line };
}

/** Splits a column-name line by `delimiter` (null = white space), honouring double quotes. */
export function splitNameLine(line: string, delimiter: string | null): string[] {
  const text = stripCommentMarker(line.trim()).text;
  if (delimiter === null) {
    if (text.includes('\t')) return text.split(/\t+/).map((part) => part.trim());
    return text.split(/\s{2,}/).map((part) => part.trim());
  }
  const names: string[] = [];
  let current = '';
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const char = itemAt(text, i);
    if (char === '"') {
      if (quoted && text[i + 1] === '"') {
        current += '"';
        i++;
      } else quoted = !quoted;
    } else if (char === delimiter && !quoted) {
      names.push(current.trim());
      current = '';
    } else current += char;
  }
  names.push(current.trim());
  return names;
}
