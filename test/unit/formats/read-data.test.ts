// readData(): format sniffing, option checks, and the bad-input list — every rejection is an
// InputRejected with a stable code, the file name, the line where one applies, and a hint.
import { describe, expect, it } from 'vitest';
import { readData, sniffFormat, resolveReadOptions } from '../../../src/formats/index.js';
import { bytes, rejection } from './helpers.js';

const FILE = 'bad/input.csv';

function rejected(
  content: Uint8Array | string,
  options: { maxBytes?: number; kindHint?: 'decay'; valueColumn?: string } = {},
) {
  const data = typeof content === 'string' ? bytes(content) : content;
  return rejection(() => readData(data, { fileName: FILE, ...options }));
}

const TWELVE_ROWS = Array.from({ length: 12 }, (_, i) => `${400 + i},${i + 1}`);

describe('sniffFormat', () => {
  it.each([
    ['{"format":"driftlight.data/1"}', 'driftlight-json'],
    ['\uFEFF  {\n}', 'driftlight-json'],
    ['##TITLE=x\n##JCAMP-DX=5.01\n', 'jcamp-dx'],
    ['  \n##TITLE= a\n', 'jcamp-dx'],
    ['## comment without equals\n400,1\n', 'delimited'],
    ['wavelength,value\n400,1\n', 'delimited'],
  ])('sniffs %j as %s by content', (text, format) => {
    expect(sniffFormat(bytes(text))).toBe(format);
  });
});

describe('resolveReadOptions', () => {
  it('fills the 50 MB default and freezes', () => {
    const options = resolveReadOptions({ fileName: 'a' });
    expect(options.maxBytes).toBe(52_428_800);
    expect(Object.isFrozen(options)).toBe(true);
  });
  it('rejects a bad option with INPUT_INVALID', () => {
    expect(rejection(() => resolveReadOptions({ fileName: 'a', maxBytes: -1 })).code).toBe('INPUT_INVALID');
    expect(rejection(() => resolveReadOptions({ fileName: 'a', valueColumn: 0 })).code).toBe('INPUT_INVALID');
  });
});

describe('bad input', () => {
  // [label, content, code, line (undefined where no single line applies)]
  const cases: ReadonlyArray<readonly [string, string | Uint8Array, string, number | undefined]> = [
    ['an empty file', '', 'EMPTY_FILE', undefined],
    ['white space only', ' \n\t\r\n', 'EMPTY_FILE', undefined],
    ['a NUL byte', Uint8Array.from([52, 48, 48, 44, 49, 10, 0, 1, 2]), 'BINARY_CONTENT', 2],
    [
      'many control bytes',
      Uint8Array.from({ length: 400 }, (_, i) => (i % 10 === 0 ? 7 : 65)),
      'BINARY_CONTENT',
      undefined,
    ],
    ['a last row with fewer columns and no line end', `a (nm),b\n${TWELVE_ROWS.join('\n')}\n412`, 'TRUNCATED', 14],
    [
      'a short row in the middle',
      `a (nm),b\n${TWELVE_ROWS.slice(0, 8).join('\n')}\n408\n${TWELVE_ROWS.slice(9).join('\n')}\n`,
      'LENGTH_MISMATCH',
      10,
    ],
    ['a row with an extra column', `a (nm),b\n${TWELVE_ROWS.slice(0, 8).join('\n')}\n408,1,2\n`, 'LENGTH_MISMATCH', 10],
    [
      'text in a numeric column (early row)',
      'wavelength (nm),b\n400,1\n401,x\n402,3\n403,4\n404,5\n405,6\n406,7\n',
      'NON_NUMERIC',
      3,
    ],
    [
      'text in a numeric column (late row)',
      `wavelength (nm),b\n${TWELVE_ROWS.slice(0, 10).join('\n')}\n410,12a\n`,
      'NON_NUMERIC',
      12,
    ],
    [
      'an empty field',
      `wavelength (nm),b,c\n${TWELVE_ROWS.map((r) => `${r},1`)
        .slice(0, 8)
        .join('\n')}\n408,,1\n`,
      'NON_NUMERIC',
      10,
    ],
    ['NaN', `wavelength (nm),b\n${TWELVE_ROWS.slice(0, 6).join('\n')}\n406,NaN\n`, 'NON_FINITE', 8],
    ['Infinity', `wavelength (nm),b\n${TWELVE_ROWS.slice(0, 6).join('\n')}\n406,-Infinity\n`, 'NON_FINITE', 8],
    ['an overflowing number', `wavelength (nm),b\n${TWELVE_ROWS.slice(0, 6).join('\n')}\n406,1e999\n`, 'NON_FINITE', 8],
    ['negative counts', 'time (ns),counts\n0,5\n0.1,4\n0.2,-1\n0.3,2\n0.4,1\n', 'NEGATIVE_COUNTS', 4],
    ['a non-monotonic axis', 'wavelength (nm),b\n400,1\n401,1\n403,1\n402,1\n404,1\n', 'AXIS_NOT_ASCENDING', 5],
    ['a duplicated axis value', 'wavelength (nm),b\n400,1\n401,1\n401,1\n402,1\n403,1\n', 'AXIS_DUPLICATE', 4],
    ['an unequally spaced decay', 'time (ns),counts\n0,5\n0.1,4\n0.2,3\n0.35,2\n0.4,1\n', 'AXIS_NOT_UNIFORM', 5],
    ['an unknown axis unit', '# note\nwavelength (furlongs),b\n400,1\n401,2\n402,3\n', 'UNKNOWN_UNIT', 2],
    ['a time axis without unit', 'time,counts\n0,1\n1,2\n2,3\n3,4\n', 'UNKNOWN_UNIT', 1],
    ['channel numbers without a channel width', 'channel,counts\n0,1\n1,2\n2,3\n3,4\n', 'UNKNOWN_UNIT', 1],
    [
      'a metadata number that is not one',
      'Excitation: about 350\nwavelength (nm),b\n400,1\n401,2\n',
      'METADATA_INVALID',
      1,
    ],
    [
      'a metadata unit that is unknown',
      'Excitation: 350 parsecs\nwavelength (nm),b\n400,1\n401,2\n',
      'METADATA_INVALID',
      1,
    ],
    ['an unknown role', 'Role: spare\nwavelength (nm),b\n400,1\n401,2\n', 'METADATA_INVALID', 1],
    ['a header without data', 'Sample: x\nSolvent: water\n', 'NO_DATA', undefined],
    [
      'a single numeric column without a channel width (issue 18: read as a histogram only with one)',
      '400\n401\n402\n403\n',
      'MISSING_COLUMN',
      undefined,
    ],
    ['%T at zero', 'wavelength (nm),%T\n400,50\n401,0\n402,20\n', 'NON_FINITE', 3],
    [
      'JCAMP-DX without ##END',
      '##TITLE=t\n##JCAMP-DX=5.01\n##XUNITS=NANOMETERS\n##FIRSTX=1\n##LASTX=3\n##XYDATA=(X++(Y..Y))\n1 1 2 3\n',
      'TRUNCATED',
      7,
    ],
    [
      'JCAMP-DX without version',
      '##TITLE=t\n##XUNITS=NANOMETERS\n##FIRSTX=400\n##LASTX=402\n##XYDATA=(X++(Y..Y))\n400 1 2 3\n##END=\n',
      'JCAMP_INVALID',
      1,
    ],
    [
      'JCAMP-DX with a failed DIF Y-check',
      '##TITLE=t\n##JCAMP-DX=5.01\n##XUNITS=NANOMETERS\n##FIRSTX=1\n##LASTX=6\n##XYDATA=(X++(Y..Y))\n1A1J\n3C4J\n##END=\n',
      'JCAMP_INVALID',
      8,
    ],
    [
      'JCAMP-DX NPOINTS disagreeing with the data',
      '##TITLE=t\n##JCAMP-DX=5.01\n##XUNITS=NANOMETERS\n##FIRSTX=1\n##LASTX=3\n##NPOINTS=4\n##XYDATA=(X++(Y..Y))\n1 1 2 3\n##END=\n',
      'JCAMP_INVALID',
      7,
    ],
    [
      'JCAMP-DX with an unknown x unit',
      '##TITLE=t\n##JCAMP-DX=5.01\n##XUNITS=FURLONGS\n##FIRSTX=1\n##LASTX=3\n##XYDATA=(X++(Y..Y))\n1 1 2 3\n##END=\n',
      'UNKNOWN_UNIT',
      3,
    ],
    [
      'JCAMP-DX with a missing value "?"',
      '##TITLE=t\n##JCAMP-DX=5.01\n##XUNITS=NANOMETERS\n##XYPOINTS=(XY..XY)\n1, 2\n2, ?\n##END=\n',
      'NON_FINITE',
      6,
    ],
    ['compound JCAMP-DX', '##TITLE=t\n##JCAMP-DX=5.01\n##BLOCKS=2\n##END=\n', 'UNKNOWN_LAYOUT', 3],
    [
      'JSON cut short',
      '{"format":"driftlight.data/1","type":"spectrum","spectrum":{"kind":"emission",\n"wavelengthNm":[400,401',
      'TRUNCATED',
      2,
    ],
    ['JSON with a syntax error', '{"format":"driftlight.data/1",\n"type":spectrum}\n', 'JSON_INVALID', 2],
    ['JSON breaking the schema', '{"format":"driftlight.data/1","type":"spectrum"}', 'JSON_INVALID', undefined],
  ];

  it.each(cases)('rejects %s', (_label, content, code, line) => {
    const error = rejected(content);
    expect(error.code).toBe(code);
    expect(error.file).toBe(FILE);
    expect(error.line).toBe(line);
    expect(error.hint.length).toBeGreaterThan(10);
    expect(error.toUserLine()).toMatch(new RegExp(`^${FILE}${line === undefined ? '' : `:${line}`}: ${code}: `));
  });

  it('rejects a file over the size limit before parsing', () => {
    const error = rejected('wavelength (nm),b\n400,1\n401,2\n', { maxBytes: 10 });
    expect(error.code).toBe('FILE_TOO_LARGE');
    expect(error.file).toBe(FILE);
  });

  it('rejects a requested value column that does not exist', () => {
    expect(rejected('wavelength (nm),b\n400,1\n401,2\n', { valueColumn: 'c' }).code).toBe('MISSING_COLUMN');
  });

  it('rejects a decay kind hint on a nm axis only when the header says decay', () => {
    expect(rejected('Type: TCSPC decay\nwavelength (nm),counts\n400,1\n401,2\n402,3\n403,4\n').code).toBe(
      'UNKNOWN_UNIT',
    );
  });
});
