// Locates the first syntax error in JSON text (RFC 8259 grammar), so a rejection can name the line
// and tell a truncated file from a malformed one. Used only after JSON.parse has failed.
import { itemAt } from '../model/item-at.js';

/** Where JSON text first breaks the grammar: the character offset, and whether the text simply ended early. */
export interface JsonSyntaxError {
  readonly offset: number;
  readonly truncated: boolean;
}

const MAX_DEPTH = 10_000;

/** Returns the first syntax error of `text` (null when it parses), per the RFC 8259 grammar. */
export function findJsonSyntaxError(text: string): JsonSyntaxError | null {
  let pos = 0;
  const n = text.length;
  const skipSpace = (): void => {
    while (pos < n && (text[pos] === ' ' || text[pos] === '\t' || text[pos] === '\n' || text[pos] === '\r')) pos++;
  };
  const fail = (): JsonSyntaxError => ({ offset: Math.min(pos, n), truncated: pos >= n });
  const literal = (word: string): JsonSyntaxError | null => {
    for (let k = 0; k < word.length; k++, pos++) if (text[pos] !== word[k]) return fail();
    return null;
  };
  const string = (): JsonSyntaxError | null => {
    pos++;
    while (pos < n) {
      const char = itemAt(text, pos);
      if (char === '"') {
        pos++;
        return null;
      }
      if (char === '\\') {
        pos++;
        if (pos >= n) return fail();
        if (text[pos] === 'u') {
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(pos + 1, pos + 5))) {
            pos = Math.min(n, pos + 1 + text.slice(pos + 1, pos + 5).length);
            return fail();
          }
          pos += 5;
        } else if ('"\\/bfnrt'.includes(itemAt(text, pos))) pos++;
        else return fail();
      } else if (char.charCodeAt(0) < 32) return fail();
      else pos++;
    }
    return fail();
  };
  const number = (): JsonSyntaxError | null => {
    const match = /^-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/.exec(text.slice(pos, pos + 400));
    if (match === null || match[0] === '' || match[0] === '-') {
      pos += match?.[0].length ?? 0;
      return fail();
    }
    pos += match[0].length;
    if (pos >= n && /[.eE+-]$/.test(match[0])) return fail();
    return null;
  };
  const value = (depth: number): JsonSyntaxError | null => {
    if (depth > MAX_DEPTH) return fail();
    skipSpace();
    if (pos >= n) return fail();
    const char = text[pos];
    if (char === '{' || char === '[') {
      const close = char === '{' ? '}' : ']';
      pos++;
      skipSpace();
      if (text[pos] === close) {
        pos++;
        return null;
      }
      for (;;) {
        if (char === '{') {
          skipSpace();
          if (text[pos] !== '"') return fail();
          const keyError = string();
          if (keyError !== null) return keyError;
          skipSpace();
          if (text[pos] !== ':') return fail();
          pos++;
        }
        const inner = value(depth + 1);
        if (inner !== null) return inner;
        skipSpace();
        if (text[pos] === ',') {
          pos++;
          continue;
        }
        if (text[pos] === close) {
          pos++;
          return null;
        }
        return fail();
      }
    }
    if (char === '"') return string();
    if (char === 't') return literal('true');
    if (char === 'f') return literal('false');
    if (char === 'n') return literal('null');
    return number();
  };
  const error = value(0);
  if (error !== null) return error;
  skipSpace();
  return pos < n ? fail() : null;
}
