// Parses one decimal number straight from bytes without building a string. The fast path is exact:
// an integer mantissa below 2^53 scaled by an exactly representable power of ten (≤ 10^22) with a
// single correctly rounded multiply or divide gives the same double as Number() (Clinger, "How to
// read floating point numbers accurately", PLDI 1990). Anything else falls back to Number().
import { itemAt } from '../model/item-at.js';

const POW10: readonly number[] = Array.from({ length: 23 }, (_, k) => 10 ** k);
/** Largest mantissa digit count kept on the fast path (10^15 < 2^53). */
const MAX_FAST_DIGITS = 15;
const NUMBER_SYNTAX = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const NON_FINITE_WORD = /^[+-]?(?:nan|inf|infinity|1\.#inf|1\.#qnan|1\.#ind)$/i;

/** Result of a failed parse: 'empty', 'text' (not a number) or 'non-finite' (NaN, Infinity or overflow). */
export type NumberFailure = 'empty' | 'text' | 'non-finite';

/** Latin-1 view of bytes[start, end) (used for fallbacks and messages). */
export function bytesToString(bytes: Uint8Array, start: number, end: number): string {
  let text = '';
  for (let i = start; i < end; i++) text += String.fromCharCode(itemAt(bytes, i));
  return text;
}

/** Parses bytes[start, end) (already trimmed) as a decimal number with `decimalMark` (46 '.' or 44 ','); returns the number or a NumberFailure. */
export function parseNumberBytes(
  bytes: Uint8Array,
  start: number,
  end: number,
  decimalMark: number,
): number | NumberFailure {
  if (start >= end) return 'empty';
  let i = start;
  let negative = false;
  let byte = itemAt(bytes, i);
  if (byte === 45 || byte === 43) {
    negative = byte === 45;
    i++;
  }
  let mantissa = 0;
  let significant = 0;
  let fractionDigits = 0;
  let anyDigit = false;
  while (i < end) {
    byte = itemAt(bytes, i);
    if (byte < 48 || byte > 57) break;
    anyDigit = true;
    if (mantissa !== 0 || byte !== 48) {
      mantissa = mantissa * 10 + (byte - 48);
      significant++;
    }
    i++;
  }
  if (i < end && bytes[i] === decimalMark) {
    i++;
    while (i < end) {
      byte = itemAt(bytes, i);
      if (byte < 48 || byte > 57) break;
      anyDigit = true;
      fractionDigits++;
      if (mantissa !== 0 || byte !== 48) {
        mantissa = mantissa * 10 + (byte - 48);
        significant++;
      }
      i++;
    }
  }
  let exponent = 0;
  if (anyDigit && i < end && (bytes[i] === 101 || bytes[i] === 69)) {
    i++;
    let exponentNegative = false;
    if (i < end && (bytes[i] === 45 || bytes[i] === 43)) {
      exponentNegative = bytes[i] === 45;
      i++;
    }
    const exponentStart = i;
    while (i < end && itemAt(bytes, i) >= 48 && itemAt(bytes, i) <= 57 && i - exponentStart < 6) {
      exponent = exponent * 10 + (itemAt(bytes, i) - 48);
      i++;
    }
    if (i === exponentStart) return slowParse(bytes, start, end, decimalMark);
    if (exponentNegative) exponent = -exponent;
  }
  if (!anyDigit || i !== end || significant > MAX_FAST_DIGITS) return slowParse(bytes, start, end, decimalMark);
  const scale = exponent - fractionDigits;
  let value: number;
  if (mantissa === 0) value = 0;
  else if (scale >= 0 && scale <= 22) value = mantissa * itemAt(POW10, scale);
  else if (scale < 0 && scale >= -22) value = mantissa / itemAt(POW10, -scale);
  else return slowParse(bytes, start, end, decimalMark);
  return negative ? -value : value;
}

/** The exact fallback: validates the syntax, then Number() on the text (decimal comma replaced). */
function slowParse(bytes: Uint8Array, start: number, end: number, decimalMark: number): number | NumberFailure {
  let text = bytesToString(bytes, start, end);
  if (decimalMark === 44) {
    if (text.includes('.')) return 'text';
    text = text.replace(',', '.');
  }
  if (!NUMBER_SYNTAX.test(text)) return NON_FINITE_WORD.test(text) ? 'non-finite' : 'text';
  const value = Number(text);
  return Number.isFinite(value) ? value : 'non-finite';
}

/** Parses a number from a string with `decimalMark`, with the same rules as parseNumberBytes. */
export function parseNumberText(text: string, decimalMark: '.' | ','): number | NumberFailure {
  const trimmed = text.trim();
  if (trimmed === '') return 'empty';
  const normalised = decimalMark === ',' ? (trimmed.includes('.') ? 'x' : trimmed.replace(',', '.')) : trimmed;
  if (!NUMBER_SYNTAX.test(normalised)) return NON_FINITE_WORD.test(trimmed) ? 'non-finite' : 'text';
  const value = Number(normalised);
  return Number.isFinite(value) ? value : 'non-finite';
}
