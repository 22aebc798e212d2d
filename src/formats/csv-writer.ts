// Writers for comma-separated text: a spectrum (axis in nm, value column, other columns) and a decay
// (time in ns, counts, IRF, extra columns such as a fitted curve). Numbers are written with the
// shortest text that reads back to the same double (ECMAScript Number::toString), so they round-trip exactly.
import type { Spectrum } from '../model/spectrum.js';
import type { Decay } from '../model/decay.js';
import { InputRejected } from '../model/errors.js';
import { canonicalKey } from './metadata-vocabulary.js';
import { metadataEntries, oneLine } from './metadata-lines.js';
import { itemAt } from '../model/item-at.js';

/** Quotes a column name when it holds a comma, a quote or leading/trailing space (RFC 4180 style). */
function csvName(name: string): string {
  const flat = oneLine(name);
  return /[",]|^\s|\s$/.test(flat) ? `"${flat.replace(/"/g, '""')}"` : flat;
}

/** Joins rows of columns into CSV text: header lines, the name line, then one row per point. */
function table(
  headerLines: readonly string[],
  names: readonly string[],
  columns: readonly ArrayLike<number>[],
): string {
  const parts: string[] = [...headerLines, names.map(csvName).join(',')];
  const rows = columns[0]?.length ?? 0;
  for (let i = 0; i < rows; i++) {
    let row = '';
    for (let c = 0; c < columns.length; c++) row += (c === 0 ? '' : ',') + String(itemAt(columns, c)[i]);
    parts.push(row);
  }
  return `${parts.join('\n')}\n`;
}

/** Writes a spectrum as CSV: `# key: value` header (kind, value column, value unit, metadata), "wavelength (nm)", value and other columns; exact round-trip through readData. */
export function writeSpectrumCsv(spectrum: Spectrum): string {
  const header = [
    `# ${canonicalKey('kind')}: ${spectrum.kind}`,
    `# ${canonicalKey('valueColumn')}: ${oneLine(spectrum.valueColumn)}`,
    `# ${canonicalKey('valueUnit')}: ${oneLine(spectrum.valueUnit)}`,
    ...metadataEntries(spectrum.metadata).map(([key, value]) => `# ${key}: ${value}`),
  ];
  const others = Object.entries(spectrum.otherColumns);
  return table(
    header,
    ['wavelength (nm)', spectrum.valueColumn, ...others.map(([name]) => name)],
    [spectrum.wavelengthNm, spectrum.values, ...others.map(([, column]) => column)],
  );
}

/** Writes a decay as CSV: header (kind, channel width in ns, metadata), "time (ns)", counts, optional irf and `extraColumns` (e.g. fit, residuals; each as long as the decay and finite); throws InputRejected otherwise. */
export function writeDecayCsv(decay: Decay, extraColumns: Readonly<Record<string, ArrayLike<number>>> = {}): string {
  const names = ['time (ns)', 'counts', ...(decay.irfCounts === undefined ? [] : ['irf'])];
  const columns: ArrayLike<number>[] = [
    decay.timeNs,
    decay.counts,
    ...(decay.irfCounts === undefined ? [] : [decay.irfCounts]),
  ];
  for (const [name, column] of Object.entries(extraColumns)) {
    if (
      names.some((taken) => taken.toLowerCase() === name.toLowerCase().trim()) ||
      /\birf\b|counts?\b|instrument response|prompt/i.test(name)
    ) {
      throw new InputRejected('INPUT_INVALID', `extra column name "${name}" would be read back as counts or IRF`, {
        hint: 'Name extra columns e.g. "fit" or "residual".',
      });
    }
    if (column.length !== decay.timeNs.length) {
      throw new InputRejected(
        'LENGTH_MISMATCH',
        `extra column "${name}" has ${column.length} values for ${decay.timeNs.length} channels`,
      );
    }
    for (let i = 0; i < column.length; i++) {
      if (!Number.isFinite(column[i]))
        throw new InputRejected('NON_FINITE', `extra column "${name}" holds ${column[i]} at channel ${i + 1}`);
    }
    names.push(name);
    columns.push(column);
  }
  const header = [
    `# ${canonicalKey('kind')}: decay`,
    `# ${canonicalKey('channelWidthNs')}: ${decay.channelWidthNs}`,
    ...metadataEntries(decay.metadata).map(([key, value]) => `# ${key}: ${value}`),
  ];
  return table(header, names, columns);
}
