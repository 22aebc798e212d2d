// Byte-level checks that run before any parsing: size limit, empty content, binary content, BOM,
// line endings and text decoding (UTF-8, falling back to Latin-1 for legacy exports).
import { reject } from './reject.js';

/** How many leading bytes the binary check inspects. */
const SNIFF_BYTES = 65_536;
/** Share of control bytes above which content counts as binary (common practice for text sniffing). */
const MAX_CONTROL_RATIO = 0.01;

const utf8Decoder = new TextDecoder('utf-8', { fatal: true });
const latin1Decoder = new TextDecoder('latin1');

/** Length of a UTF-8 byte-order mark at the start of `content` (3 or 0). */
export function bomLength(content: Uint8Array): number {
  return content.length >= 3 && content[0] === 0xef && content[1] === 0xbb && content[2] === 0xbf ? 3 : 0;
}

/** Rejects content over `maxBytes` (FILE_TOO_LARGE), empty or whitespace-only (EMPTY_FILE) or binary (BINARY_CONTENT: a NUL or > 1 % control bytes in the first 64 KiB). */
export function checkContent(content: Uint8Array, maxBytes: number, file: string): void {
  if (content.length > maxBytes) {
    reject('FILE_TOO_LARGE', `the file has ${content.length} bytes, over the limit of ${maxBytes} bytes`, file);
  }
  const start = bomLength(content);
  const end = Math.min(content.length, start + SNIFF_BYTES);
  let control = 0;
  let printable = 0;
  let line = 1;
  for (let i = start; i < end; i++) {
    const byte = content[i] as number;
    if (byte === 0) {
      reject('BINARY_CONTENT', `the file holds a NUL byte at offset ${i}`, file, line);
    }
    if (byte === 10) line++;
    if ((byte < 9 || (byte > 13 && byte < 32) || byte === 127)) control++;
    else if (byte > 32) printable++;
  }
  if (printable === 0 && control === 0) {
    reject('EMPTY_FILE', content.length === 0 ? 'the file is empty' : 'the file holds only white space', file);
  }
  if (control > MAX_CONTROL_RATIO * (end - start)) {
    reject('BINARY_CONTENT', `${control} of the first ${end - start} bytes are control characters`, file);
  }
}

/** The first line ending in `content` from `start`. */
export function detectLineEnding(content: Uint8Array, start: number): 'lf' | 'crlf' | 'cr' | 'none' {
  for (let i = start; i < content.length; i++) {
    const byte = content[i];
    if (byte === 10) return 'lf';
    if (byte === 13) return content[i + 1] === 10 ? 'crlf' : 'cr';
  }
  return 'none';
}

/** Decodes bytes as UTF-8, or as Latin-1 when they are not valid UTF-8 (legacy exports with "µs" or "°C"). */
export function decodeText(bytes: Uint8Array): { text: string; encoding: 'utf-8' | 'latin1' } {
  try {
    return { text: utf8Decoder.decode(bytes), encoding: 'utf-8' };
  } catch {
    return { text: latin1Decoder.decode(bytes), encoding: 'latin1' };
  }
}

/** Splits text into lines on LF, CRLF or CR (the terminators are dropped). */
export function splitLines(text: string): string[] {
  return text.split(/\r\n|\n|\r/);
}
