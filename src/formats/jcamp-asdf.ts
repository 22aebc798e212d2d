// Decoder for one line of JCAMP-DX ordinate data in AFFN or ASDF form (McDonald & Wilks,
// Appl. Spectrosc. 42, 151 (1988), section on data compression):
//   SQZ  @ A–I (+0…+9), a–i (−1…−9)  start a number, replacing its sign and first digit;
//   DIF  % J–R (+0…+9), j–r (−1…−9)  a difference from the previous ordinate;
//   DUP  S–Z (1…8), s (9)             a repeat count (including the first) of the previous token;
//   PAC  + and − separate numbers without spaces; AFFN: free-format decimal numbers.
import { reject } from './reject.js';
import { itemAt } from '../model/item-at.js';

/** One decoded line: its values in order (the abscissa first) and whether it ended in DIF form. */
export interface AsdfLine {
  readonly values: number[];
  readonly endsInDif: boolean;
  /** Compression forms seen on the line (AFFN, PAC, SQZ, DIF, DUP). */
  readonly forms: ReadonlySet<string>;
}

const COMPRESSED = /[@A-DF-Ia-df-i%J-Rj-rS-Zs]/;

function sqzDigit(char: string): string | undefined {
  if (char === '@') return '0';
  const code = char.charCodeAt(0);
  if (code >= 65 && code <= 73) return String(code - 64);
  if (code >= 97 && code <= 105) return `-${code - 96}`;
  return undefined;
}

function difDigit(char: string): string | undefined {
  if (char === '%') return '0';
  const code = char.charCodeAt(0);
  if (code >= 74 && code <= 82) return String(code - 73);
  if (code >= 106 && code <= 114) return `-${code - 105}`;
  return undefined;
}

function dupDigit(char: string): string | undefined {
  const code = char.charCodeAt(0);
  if (code >= 83 && code <= 90) return String(code - 82);
  if (char === 's') return '9';
  return undefined;
}

/**
 * Most ordinates a JCAMP-DX table may decode to (2^18 = 262,144; this project's bound, far above any
 * spectrum or histogram it reads): a DUP count is a repeat count, so a few bytes could otherwise ask for
 * billions of values (found by the fuzz suite, issue 20.10).
 */
export const MAX_JCAMP_ORDINATES = 262_144;

/** Decodes one data line (1-based `line` for errors); the first value is the abscissa and is never a DIF base; at most `maxValues` values. */
export function decodeAsdfLine(
  text: string,
  line: number,
  file: string,
  maxValues = MAX_JCAMP_ORDINATES + 1,
): AsdfLine {
  const values: number[] = [];
  const forms = new Set<string>();
  const compressed = COMPRESSED.test(text);
  let buffer = '';
  let bufferKind: 'abs' | 'dif' | 'dup' | null = null;
  const last: { kind: 'abs' | 'dif' | null } = { kind: null };
  let lastDifference = 0;
  const fail = (message: string): never => reject('JCAMP_INVALID', message, file, line);
  const flush = (): void => {
    if (bufferKind === null) return;
    const number = Number(buffer);
    if (buffer === '' || buffer === '-' || buffer === '+' || !Number.isFinite(number))
      fail(`"${buffer}" is not a valid JCAMP-DX number`);
    if (bufferKind === 'abs') {
      values.push(number);
      last.kind = 'abs';
    } else if (bufferKind === 'dif') {
      if (values.length < 2) fail('a DIF value needs a previous ordinate on the same line');
      values.push(itemAt(values, values.length - 1) + number);
      last.kind = 'dif';
      lastDifference = number;
    } else {
      if (values.length < 2 || !Number.isInteger(number) || number < 1) fail(`invalid DUP count "${buffer}"`);
      if (values.length + number - 1 > maxValues)
        fail(`the DUP count ${number} would make more than ${MAX_JCAMP_ORDINATES} ordinates`);
      for (let k = 1; k < number; k++) {
        const previous = itemAt(values, values.length - 1);
        values.push(last.kind === 'dif' ? previous + lastDifference : previous);
      }
    }
    buffer = '';
    bufferKind = null;
  };
  for (const char of text) {
    if (char === ' ' || char === '\t' || char === ',') {
      flush();
      continue;
    }
    if ((char >= '0' && char <= '9') || char === '.') {
      if (bufferKind === null) {
        bufferKind = 'abs';
        forms.add('AFFN');
      }
      buffer += char;
      continue;
    }
    if (char === '+' || char === '-') {
      if (!compressed && bufferKind === 'abs' && /[eE]$/.test(buffer)) {
        buffer += char;
        continue;
      }
      flush();
      if (values.length > 0) forms.add('PAC');
      bufferKind = 'abs';
      buffer = char;
      continue;
    }
    if ((char === 'E' || char === 'e') && !compressed && bufferKind === 'abs') {
      buffer += char;
      continue;
    }
    if (char === '?') {
      reject(
        'NON_FINITE',
        'the data hold "?" (a missing or invalid value)',
        file,
        line,
        'Replace missing values or re-export without them.',
      );
    }
    const sqz = sqzDigit(char);
    const dif = sqz === undefined ? difDigit(char) : undefined;
    const dup = sqz === undefined && dif === undefined ? dupDigit(char) : undefined;
    flush();
    if (sqz !== undefined) {
      bufferKind = 'abs';
      buffer = sqz;
      forms.add('SQZ');
    } else if (dif !== undefined) {
      bufferKind = 'dif';
      buffer = dif;
      forms.add('DIF');
    } else if (dup !== undefined) {
      bufferKind = 'dup';
      buffer = dup;
      forms.add('DUP');
    } else fail(`unexpected character "${char}" in the data`);
  }
  flush();
  forms.delete(compressed ? 'AFFN' : '');
  return { values, endsInDif: last.kind === 'dif', forms };
}
