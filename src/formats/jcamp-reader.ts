// Reader for JCAMP-DX 4.24 / 5.x single-spectrum files (IUPAC; McDonald & Wilks, Appl. Spectrosc.
// 42, 151 (1988)): labelled data records (LDRs), ##XYDATA=(X++(Y..Y)) in AFFN or ASDF form with the
// DIF Y-check, ##XYPOINTS / ##PEAK TABLE=(XY..XY). Compound files (##BLOCKS, ##NTUPLES) are refused.
import type { HeaderEntry } from './metadata-vocabulary.js';
import { lookupKey } from './metadata-vocabulary.js';
import type { RawTable } from './raw-table.js';
import { bomLength, decodeText, detectLineEnding, splitLines } from './bytes.js';
import { decodeAsdfLine, MAX_JCAMP_ORDINATES } from './jcamp-asdf.js';
import { reject } from './reject.js';
import { itemAt } from '../model/item-at.js';

interface Ldr {
  readonly label: string;
  readonly rawLabel: string;
  value: string;
  readonly line: number;
  readonly dataLines: Array<{ text: string; line: number }>;
}

/** Labels that describe the data table itself and are not carried as metadata. */
const STRUCTURAL = new Set([
  'JCAMPDX',
  'XUNITS',
  'YUNITS',
  'XFACTOR',
  'YFACTOR',
  'FIRSTX',
  'LASTX',
  'NPOINTS',
  'FIRSTY',
  'DELTAX',
  'MAXX',
  'MINX',
  'MAXY',
  'MINY',
  'XYDATA',
  'XYPOINTS',
  'PEAKTABLE',
  'END',
  'RESOLUTION',
]);
/** Y check tolerance (relative), for AFFN ordinates written with decimals. */
const Y_CHECK_TOLERANCE = 1e-9;

/** Normalised label: upper case with spaces, dashes, slashes and underscores removed (JCAMP-DX label rule). */
export function normaliseLabel(label: string): string {
  return label.toUpperCase().replace(/[\s\-/_]/g, '');
}

/** True when the text starts like a JCAMP-DX file (first non-blank line is an LDR `##LABEL=`). */
export function looksLikeJcamp(text: string): boolean {
  return /^\s*##[^=\r\n]*=/.test(text);
}

function parseLdrs(lines: readonly string[], file: string): { ldrs: Ldr[]; ended: boolean } {
  const ldrs: Ldr[] = [];
  let current: Ldr | undefined;
  for (let i = 0; i < lines.length; i++) {
    const raw = lines[i] ?? '';
    const commentAt = raw.indexOf('$$');
    const text = (commentAt >= 0 ? raw.slice(0, commentAt) : raw).trim();
    if (text === '') continue;
    if (text.startsWith('##')) {
      const equals = text.indexOf('=');
      if (equals < 0) reject('JCAMP_INVALID', `the label line "${text.slice(0, 40)}" has no "="`, file, i + 1);
      const rawLabel = text.slice(2, equals).trim();
      const label = normaliseLabel(rawLabel);
      if (label === 'END') return { ldrs, ended: true };
      if (label === 'BLOCKS' || label === 'NTUPLES') {
        reject(
          'UNKNOWN_LAYOUT',
          `compound JCAMP-DX files (##${rawLabel}) are not read`,
          file,
          i + 1,
          'Export one spectrum per JCAMP-DX file (##XYDATA, ##XYPOINTS or ##PEAK TABLE).',
        );
      }
      current = { label, rawLabel, value: text.slice(equals + 1).trim(), line: i + 1, dataLines: [] };
      ldrs.push(current);
    } else if (current === undefined) {
      reject('JCAMP_INVALID', 'text before the first ##label', file, i + 1);
    } else current.dataLines.push({ text, line: i + 1 });
  }
  return { ldrs, ended: false };
}

function numberLdr(ldrs: readonly Ldr[], label: string, file: string): number | undefined {
  const ldr = ldrs.find((entry) => entry.label === label);
  if (ldr === undefined) return undefined;
  const value = Number(ldr.value.replace(/,/g, '.'));
  if (ldr.value === '' || !Number.isFinite(value))
    reject('JCAMP_INVALID', `##${ldr.rawLabel} is not a number: "${ldr.value}"`, file, ldr.line);
  return value;
}

/** Decodes an (X++(Y..Y)) table: ordinates only, with the DIF Y-check between lines. */
function decodeXyData(ldr: Ldr, file: string, forms: Set<string>): number[] {
  const ordinates: number[] = [];
  let previousEndedInDif = false;
  for (const { text, line } of ldr.dataLines) {
    // The abscissa, plus the ordinates the table may still hold (one more than the bound, so that passing it is seen).
    const decoded = decodeAsdfLine(text, line, file, MAX_JCAMP_ORDINATES - ordinates.length + 2);
    if (ordinates.length + decoded.values.length - 1 > MAX_JCAMP_ORDINATES) {
      reject('JCAMP_INVALID', `the table holds more than ${MAX_JCAMP_ORDINATES} ordinates`, file, line);
    }
    for (const form of decoded.forms) forms.add(form);
    if (decoded.values.length === 0) continue;
    let ys = decoded.values.slice(1);
    if (previousEndedInDif && ys.length > 0) {
      const expected = itemAt(ordinates, ordinates.length - 1);
      const check = itemAt(ys, 0);
      if (Math.abs(check - expected) > Y_CHECK_TOLERANCE * Math.max(1, Math.abs(expected))) {
        reject(
          'JCAMP_INVALID',
          `DIF Y-check failed: the line starts with ${check} but the previous line ended at ${expected}`,
          file,
          line,
        );
      }
      ys = ys.slice(1);
    }
    for (const y of ys) ordinates.push(y);
    previousEndedInDif = decoded.endsInDif;
  }
  return ordinates;
}

/** Decodes an (XY..XY) or (XYW..XYW) table into pairs. */
function decodeXyPairs(ldr: Ldr, file: string): { x: number[]; y: number[] } {
  const width = /XYW/i.test(ldr.value) ? 3 : 2;
  const x: number[] = [];
  const y: number[] = [];
  for (const { text, line } of ldr.dataLines) {
    const fields = text.split(/[\s,;]+/).filter((field) => field !== '');
    if (fields.length % width !== 0)
      reject(
        'TRUNCATED',
        `the line holds ${fields.length} numbers, not whole (${width === 3 ? 'X,Y,W' : 'X,Y'}) groups`,
        file,
        line,
      );
    for (let k = 0; k < fields.length; k += width) {
      for (const field of [fields[k] ?? '', fields[k + 1] ?? '']) {
        if (field === '?') reject('NON_FINITE', 'the data hold "?" (a missing value)', file, line);
        if (!/^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/.test(field))
          reject('NON_NUMERIC', `"${field}" is not a number`, file, line);
      }
      x.push(Number(fields[k]));
      y.push(Number(fields[k + 1]));
    }
  }
  return { x, y };
}

const Y_NAMES: Readonly<Record<string, string>> = {
  ABSORBANCE: 'absorbance',
  TRANSMITTANCE: 'transmittance',
  COUNTS: 'counts',
  ARBITRARYUNITS: 'intensity',
};
const Y_UNITS: Readonly<Record<string, string>> = {
  ABSORBANCE: 'absorbance',
  COUNTS: 'counts',
  ARBITRARYUNITS: 'a.u.',
};

/** Reads a JCAMP-DX file into a RawTable (axis column "x", one value column); throws InputRejected with file and line. */
export function readJcamp(content: Uint8Array, file: string): RawTable {
  const start = bomLength(content);
  const { text, encoding } = decodeText(content.subarray(start));
  const lines = splitLines(text);
  const { ldrs, ended } = parseLdrs(lines, file);
  let lastLine = lines.length;
  while (lastLine > 1 && (lines[lastLine - 1] ?? '').trim() === '') lastLine--;
  if (!ended)
    reject(
      'TRUNCATED',
      'the JCAMP-DX file has no ##END= record',
      file,
      lastLine,
      'The export was cut short; re-export it or wait until it is complete.',
    );
  const version = ldrs.find((ldr) => ldr.label === 'JCAMPDX');
  if (version === undefined) reject('JCAMP_INVALID', 'the file has no ##JCAMP-DX= version record', file, 1);
  const table = ldrs.find((ldr) => ldr.label === 'XYDATA' || ldr.label === 'XYPOINTS' || ldr.label === 'PEAKTABLE');
  if (table === undefined)
    return reject('NO_DATA', 'the file has no ##XYDATA, ##XYPOINTS or ##PEAK TABLE record', file);
  const xFactor = numberLdr(ldrs, 'XFACTOR', file) ?? 1;
  const yFactor = numberLdr(ldrs, 'YFACTOR', file) ?? 1;
  const nPoints = numberLdr(ldrs, 'NPOINTS', file);
  const forms = new Set<string>();
  let x: number[];
  let y: number[];
  if (table.label === 'XYDATA') {
    if (!/\(\s*X\+\+\s*\(\s*Y\.\.Y\s*\)\s*\)/i.test(table.value)) {
      reject('JCAMP_INVALID', `##XYDATA=${table.value} is not the (X++(Y..Y)) form`, file, table.line);
    }
    const firstX = numberLdr(ldrs, 'FIRSTX', file);
    const lastX = numberLdr(ldrs, 'LASTX', file);
    if (firstX === undefined || lastX === undefined) {
      return reject('JCAMP_INVALID', '##XYDATA needs ##FIRSTX and ##LASTX', file, table.line);
    }
    y = decodeXyData(table, file, forms).map((value) => value * yFactor);
    const count = y.length;
    if (nPoints !== undefined && nPoints !== count) {
      reject('JCAMP_INVALID', `##NPOINTS says ${nPoints} but ${count} ordinates were decoded`, file, table.line);
    }
    const step = count > 1 ? (lastX - firstX) / (count - 1) : 0;
    x = Array.from({ length: count }, (_, i) => (i === count - 1 ? lastX : firstX + i * step));
  } else {
    const pairs = decodeXyPairs(table, file);
    x = pairs.x.map((value) => value * xFactor);
    y = pairs.y.map((value) => value * yFactor);
    forms.add('AFFN');
    if (nPoints !== undefined && nPoints !== x.length) {
      reject('JCAMP_INVALID', `##NPOINTS says ${nPoints} but ${x.length} points were read`, file, table.line);
    }
  }
  const xUnits = ldrs.find((ldr) => ldr.label === 'XUNITS');
  const yUnits = ldrs.find((ldr) => ldr.label === 'YUNITS');
  const yKey = normaliseLabel(yUnits?.value ?? '');
  const headerEntries: HeaderEntry[] = [];
  let valueColumnName: string | undefined;
  for (const ldr of ldrs) {
    if (STRUCTURAL.has(ldr.label)) continue;
    const key = ldr.rawLabel.startsWith('$') ? ldr.rawLabel.slice(1) : ldr.rawLabel;
    const value = [ldr.value, ...ldr.dataLines.map((entry) => entry.text)].join(' ').trim();
    if (lookupKey(key)?.field === 'valueColumn') valueColumnName = value;
    headerEntries.push({ key, value, line: ldr.line });
  }
  const percentT = /PERCENT|%/.test(yUnits?.value ?? '');
  const yName = valueColumnName ?? (percentT ? '%T' : (Y_NAMES[yKey] ?? (yUnits?.value.toLowerCase() || 'y')));
  const declaredValueUnit = Y_UNITS[yKey];
  const dataType = ldrs.find((ldr) => ldr.label === 'DATATYPE');
  return {
    columns: [
      { name: 'x', values: Float64Array.from(x) },
      { name: yName, values: Float64Array.from(y) },
    ],
    headerEntries,
    lineOfRow: () => undefined,
    unitLine: xUnits?.line,
    layout: {
      format: 'jcamp-dx',
      delimiter: null,
      decimalMark: '.',
      headerLineCount: table.line,
      hasBom: start > 0,
      lineEnding: detectLineEnding(content, start),
      encoding,
      jcamp: { version: version?.value ?? '', table: `##${table.rawLabel}=${table.value}`, compression: [...forms] },
    },
    namedColumns: true,
    axisColumnIndex: 0,
    ...(xUnits === undefined ? {} : { declaredAxisUnit: xUnits.value }),
    ...(dataType === undefined ? {} : { declaredKind: dataType.value }),
    ...(declaredValueUnit === undefined ? {} : { declaredValueUnit }),
  };
}
