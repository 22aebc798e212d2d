// parseNumberBytes must give exactly what Number() gives (the ECMAScript reference conversion) on
// every decimal text, through the fast path and the fallback alike.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { parseNumberBytes, parseNumberText } from '../../../src/formats/number-bytes.js';
import { bytes } from './helpers.js';

function parse(text: string, decimalMark = '.'): number | string {
  const data = bytes(text);
  return parseNumberBytes(data, 0, data.length, decimalMark.charCodeAt(0));
}

describe('parseNumberBytes', () => {
  // Expected values: Number(text) per ECMAScript StringToNumber (the reference), written out.
  it.each([
    ['0', 0],
    ['-0', -0],
    ['12', 12],
    ['+7.5', 7.5],
    ['.5', 0.5],
    ['5.', 5],
    ['0.1', 0.1],
    ['1e3', 1000],
    ['1.5E-3', 0.0015],
    ['123456789012345678', 123456789012345680],
    ['9007199254740993', 9007199254740992],
    ['1e-30', 1e-30],
    ['2.2250738585072014e-308', 2.2250738585072014e-308],
    ['0.000000000000000000000001', 1e-24],
  ])('reads %s like Number()', (text, expected) => {
    expect(parse(text)).toBe(expected);
    expect(parse(text)).toBe(Number(text));
  });

  it('reads a decimal comma when asked', () => {
    expect(parse('3,25', ',')).toBe(3.25); // Number('3.25')
    expect(parse('-0,5e2', ',')).toBe(-50);
    expect(parse('3.25', ',')).toBe('text');
  });

  it.each([
    ['', 'empty'],
    ['abc', 'text'],
    ['1.2.3', 'text'],
    ['0x10', 'text'],
    ['1e', 'text'],
    ['-', 'text'],
    ['NaN', 'non-finite'],
    ['inf', 'non-finite'],
    ['-Infinity', 'non-finite'],
    ['1e400', 'non-finite'],
  ])('classifies %j as %s', (text, failure) => {
    expect(parse(text)).toBe(failure);
  });

  it('equals Number() on the shortest, fixed and exponential texts of random doubles (fast-check, 300 runs)', () => {
    fc.assert(
      fc.property(
        fc.double({ noNaN: true, noDefaultInfinity: true }),
        fc.integer({ min: 0, max: 17 }),
        (value, digits) => {
          for (const text of [
            String(value),
            value.toExponential(Math.min(digits, 16)),
            Math.abs(value) < 1e15 ? value.toFixed(digits) : String(value),
          ]) {
            const reference = Number(text);
            // Rounding to fewer digits can overflow (1.5e308 → "2e+308"): Number() then gives Infinity, which the reader rejects.
            expect(Object.is(parse(text), Number.isFinite(reference) ? reference : 'non-finite')).toBe(true);
          }
        },
      ),
      { numRuns: 300 },
    );
  });

  it('parseNumberText follows the same rules', () => {
    expect(parseNumberText(' 2,5 ', ',')).toBe(2.5);
    expect(parseNumberText('nan', '.')).toBe('non-finite');
    expect(parseNumberText('12 nm', '.')).toBe('text');
  });
});
