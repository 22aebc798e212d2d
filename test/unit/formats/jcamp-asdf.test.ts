// ASDF decoding against the worked compression example of the JCAMP-DX specification
// (McDonald & Wilks, Appl. Spectrosc. 42, 151 (1988), the table that shows one data line in AFFN,
// PAC, SQZ, DIF and DIFDUP forms). TRANSCRIBED FROM MEMORY, not from the printed table: the line is
// X = 1 with ordinates 2 3 3 2 1 0 −1 −2 −3; the compressed forms below were re-derived by hand from the
// published character tables (SQZ @A–I/a–i, DIF %J–R/j–r, DUP S–Z/s) so that all five agree.
import { describe, expect, it } from 'vitest';
import { decodeAsdfLine, MAX_JCAMP_ORDINATES } from '../../../src/formats/jcamp-asdf.js';
import { readData } from '../../../src/formats/index.js';
import { rejection } from './helpers.js';

const AFFN_VALUES = [1, 2, 3, 3, 2, 1, 0, -1, -2, -3];

describe('decodeAsdfLine: the specification example, five forms (from memory, see header)', () => {
  it.each([
    ['AFFN', '1 2 3 3 2 1 0 -1 -2 -3'],
    ['PAC', '1+2+3+3+2+1+0-1-2-3'],
    ['SQZ', '1BCCBA@abc'],
    ['DIF', '1BJ%jjjjjj'],
    ['DIFDUP', '1BJ%jX'],
  ])('%s form %s decodes to the AFFN numbers', (_form, line) => {
    expect(decodeAsdfLine(line, 1, 'spec').values).toEqual(AFFN_VALUES);
  });

  it('reports the forms seen and whether the line ends in DIF (for the Y-check)', () => {
    const dif = decodeAsdfLine('1BJ%jX', 1, 'spec');
    expect([...dif.forms].sort()).toEqual(['DIF', 'DUP', 'SQZ']);
    expect(dif.endsInDif).toBe(true);
    expect(decodeAsdfLine('1BCCBA@abc', 1, 'spec').endsInDif).toBe(false);
  });
});

describe('decodeAsdfLine: further rules of the specification', () => {
  // Multi-digit SQZ/DIF/DUP tokens: the letter replaces the sign and first digit (spec, ASDF section).
  it('reads multi-digit tokens and DUP counts above 9', () => {
    // A23 = +123; J0 = +10 (J is +1, then the digit 0); S1 = DUP count 11 (S is 1, then the digit 1).
    expect(decodeAsdfLine('100A23J0S1', 1, 'f').values).toEqual([
      100,
      123,
      ...Array.from({ length: 11 }, (_, k) => 133 + 10 * k),
    ]);
    expect(decodeAsdfLine('5a5j5', 1, 'f').values).toEqual([5, -15, -30]); // a5 = −15, then j5 = a difference of −15
  });

  it('reads AFFN exponents and decimals', () => {
    expect(decodeAsdfLine('400 1.5E-3 -2.5e2 7', 1, 'f').values).toEqual([400, 0.0015, -250, 7]);
  });

  it.each([
    ['a DIF with no previous ordinate', '1J2'],
    ['a stray character', '1 2 #'],
    ['a DUP with no ordinate before it', '1S2'],
  ])('rejects %s', (_label, line) => {
    expect(rejection(() => decodeAsdfLine(line, 4, 'f.jdx'))).toMatchObject({ code: 'JCAMP_INVALID', line: 4 });
  });
});

describe('decodeAsdfLine: a DUP count cannot ask for more ordinates than a table may hold (found by test/fuzz, issue 20.10)', () => {
  it('refuses a DUP count that would pass MAX_JCAMP_ORDINATES, without expanding it', () => {
    // "s00011" in a mutated file asked for 900,011 copies; "s99999999" would ask for about 10^9.
    for (const line of ['350 0.0s00011', '350 1 s99999999']) {
      expect(rejection(() => decodeAsdfLine(line, 7, 'f.jdx'))).toMatchObject({
        code: 'JCAMP_INVALID',
        line: 7,
        message: expect.stringContaining(`more than ${MAX_JCAMP_ORDINATES} ordinates`),
      });
    }
    // Below the bound a long DUP is still read: "T00000" repeats the ordinate 200,000 times (T = 2).
    expect(decodeAsdfLine('350 1T00000', 7, 'f.jdx').values.length).toBe(1 + 200_000);
  });

  it('refuses a table whose lines together pass the bound', () => {
    const lines = Array.from({ length: 3 }, (_unused, k) => `${k} 1 s${Math.ceil(MAX_JCAMP_ORDINATES / 2)}`);
    const text = [
      '##TITLE=bomb',
      '##JCAMP-DX=4.24',
      '##XUNITS=NANOMETERS',
      '##YUNITS=ARBITRARY UNITS',
      '##FIRSTX=0',
      '##LASTX=2',
      '##XFACTOR=1',
      '##YFACTOR=1',
      '##XYDATA=(X++(Y..Y))',
      ...lines,
      '##END=',
    ].join('\n');
    expect(rejection(() => readData(new TextEncoder().encode(text), { fileName: 'bomb.jdx' }))).toMatchObject({
      code: 'JCAMP_INVALID',
    });
  });
});
