// Byte-level checks that run before any parsing: size limit, empty content, binary content, BOM,
// line endings and text decoding (UTF-8, falling back to Latin-1 for legacy exports).
import { reject } from './reject.js';
import { itemAt } from '../model/item-at.js';

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
    const byte = itemAt(content, i);
    if (byte === 0) {
      reject('BINARY_CONTENT', `the file holds a NUL byte at offset ${i}`, file, line);
    }
    if (byte === 10) line++;
    if (byte < 9 || (byte > 13 && byte < 32) || byte === 127) control++;
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

/** The text encoding a file was written in, as far as the reader can tell. */
export type TextEncodingName = 'utf-8' | 'latin1' | 'utf-16le' | 'utf-16be';

/** UTF-16 byte order of `content`: from its BOM, else from where the zero bytes of ASCII text fall (common practice for text sniffing); null for 8-bit text. */
export function utf16Order(content: Uint8Array): { order: 'le' | 'be'; bom: boolean } | null {
  if (content.length >= 2 && content[0] === 0xff && content[1] === 0xfe) return { order: 'le', bom: true };
  if (content.length >= 2 && content[0] === 0xfe && content[1] === 0xff) return { order: 'be', bom: true };
  const end = Math.min(content.length - (content.length % 2), 1024);
  if (end < 8) return null;
  let zeroEven = 0;
  let zeroOdd = 0;
  for (let i = 0; i < end; i += 2) {
    if (content[i] === 0) zeroEven++;
    if (content[i + 1] === 0) zeroOdd++;
  }
  const pairs = end / 2;
  // ASCII text in UTF-16 has a zero in (nearly) every pair, always on the same side.
  if (zeroOdd > 0.9 * pairs && zeroEven < 0.05 * pairs) return { order: 'le', bom: false };
  if (zeroEven > 0.9 * pairs && zeroOdd < 0.05 * pairs) return { order: 'be', bom: false };
  return null;
}

const utf16leDecoder = new TextDecoder('utf-16le');
const utf16beDecoder = new TextDecoder('utf-16be');
const utf8Encoder = new TextEncoder();
const CTRL_Z = 0x1a;

/**
 * Brings file bytes to what the readers scan: UTF-16 (LE/BE, with or without BOM) transcoded to
 * UTF-8, and a final Ctrl-Z (0x1A, the old DOS end-of-file mark) with any blanks after it dropped.
 */
export function normaliseBytes(content: Uint8Array): {
  bytes: Uint8Array;
  utf16: 'utf-16le' | 'utf-16be' | null;
  utf16Bom: boolean;
  ctrlZ: boolean;
} {
  let bytes = content;
  let utf16: 'utf-16le' | 'utf-16be' | null = null;
  let utf16Bom = false;
  const order = utf16Order(content);
  if (order !== null) {
    const body = content.subarray(order.bom ? 2 : 0, content.length - ((content.length - (order.bom ? 2 : 0)) % 2));
    bytes = utf8Encoder.encode((order.order === 'le' ? utf16leDecoder : utf16beDecoder).decode(body));
    utf16 = order.order === 'le' ? 'utf-16le' : 'utf-16be';
    utf16Bom = order.bom;
  }
  let end = bytes.length;
  while (end > 0 && (bytes[end - 1] === 10 || bytes[end - 1] === 13 || bytes[end - 1] === 32 || bytes[end - 1] === 9))
    end--;
  const ctrlZ = end > 0 && bytes[end - 1] === CTRL_Z;
  if (ctrlZ) bytes = bytes.subarray(0, end - 1);
  return { bytes, utf16, utf16Bom, ctrlZ };
}

/** Text of a data file for callers that carry it as a string (UTF-16 or UTF-8, else Latin-1), the same characters the readers see. */
export function decodeDataText(content: Uint8Array): string {
  const { bytes } = normaliseBytes(content);
  return decodeText(bytes).text;
}

/** Text a job payload carries for a data file: UTF-16 transcoded as the readers see it (decodeDataText), else UTF-8 when valid, else Latin-1, otherwise unchanged. */
export function decodeInputText(content: Uint8Array): string {
  return utf16Order(content) !== null ? decodeDataText(content) : decodeText(content).text;
}
