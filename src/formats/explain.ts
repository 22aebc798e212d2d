// explainData(): how a file's lines, columns and header keys were read, for `driftlight inspect
// --explain`; and, when the file is refused or read on assumptions, a formats profile that reads
// it (tried before it is offered, or marked with what to fill in). Pure: bytes in, a report out.
import { InputRejected } from '../model/errors.js';
import { normaliseBytes, decodeText, splitLines, bomLength } from './bytes.js';
import { detectDelimitedLayout, type DelimitedLayout } from './delimited-layout.js';
import { isStructureLine, parseHeaderLine } from './header-lines.js';
import { lookupKey, normaliseKey } from './metadata-vocabulary.js';
import { readAxisName } from './units.js';
import { kindFromFileName } from './file-name-kind.js';
import { readMeasurements } from './read-data.js';
import { sniffFormat } from './read-data.js';
import type { FormatProfile } from './profile.js';
import type { ReadOptions } from './read-options.js';
import type { ParsedData } from './types.js';

/** What became of one line, column or header key. */
export interface ExplainedItem {
  readonly where: string;
  readonly text: string;
  readonly readAs: string;
}

/** The report of explainData(). */
export interface Explanation {
  readonly file: string;
  readonly lines: readonly ExplainedItem[];
  readonly columns: readonly ExplainedItem[];
  readonly keys: readonly ExplainedItem[];
  /** The measurements read, or the refusal. */
  readonly outcome:
    | { readonly read: readonly string[] }
    | {
        readonly refused: {
          readonly code: string;
          readonly message: string;
          readonly line?: number;
          readonly hint: string;
        };
      };
  /** Why a profile is offered: the file was refused, or read on an assumption. */
  readonly ambiguity: string | null;
  /** A YAML snippet of a formats profile for this file, and whether reading with it was tried and worked. */
  readonly profile: { readonly yaml: string; readonly checked: boolean; readonly note: string } | null;
}

const DELIMITER_WORDS = { ',': 'comma', '\t': 'tab', ';': 'semicolon', whitespace: 'whitespace' } as const;

function explainLines(
  lines: readonly string[],
  layout: DelimitedLayout,
  trailerLine: number | undefined,
): ExplainedItem[] {
  const items: ExplainedItem[] = [];
  const delimiter = layout.delimiter === 'whitespace' ? null : layout.delimiter;
  for (let i = 0; i < layout.headerLineCount; i++) {
    const text = lines[i] ?? '';
    const where = `line ${i + 1}`;
    if (text.trim() === '') items.push({ where, text, readAs: 'blank' });
    else if (layout.nameLine === i + 1) items.push({ where, text, readAs: 'column names' });
    else if (layout.nameLine !== undefined && i + 1 > layout.nameLine)
      items.push({ where, text, readAs: 'units row (merged into the column names)' });
    else if (isStructureLine(text))
      items.push({ where, text, readAs: 'structure (section line or empty cells), not metadata' });
    else {
      const entry = parseHeaderLine(text, i + 1, delimiter);
      items.push({
        where,
        text,
        readAs: entry === null ? 'ignored' : `metadata: key "${entry.key}", value "${entry.value}"`,
      });
    }
  }
  const lastData = trailerLine === undefined ? lines.length : trailerLine - 1;
  let end = lastData;
  while (end > layout.firstDataLine && (lines[end - 1] ?? '').trim() === '') end--;
  items.push({
    where: `lines ${layout.firstDataLine}–${end}`,
    text: `${(lines[layout.firstDataLine - 1] ?? '').slice(0, 60)} …`,
    readAs: `data rows: ${layout.columnCount} column(s), delimiter ${DELIMITER_WORDS[layout.delimiter]}, decimal mark "${layout.decimalMark}"`,
  });
  if (trailerLine !== undefined) {
    for (let i = trailerLine - 1; i < lines.length; i++) {
      const text = lines[i] ?? '';
      if (text.trim() !== '')
        items.push({ where: `line ${i + 1}`, text, readAs: 'after the data: a summary line, read as metadata' });
    }
  }
  return items;
}

function explainKeys(layout: DelimitedLayout): ExplainedItem[] {
  return layout.headerEntries.map((entry) => {
    const { key, unitLabel } = normaliseKey(entry.key);
    const row = lookupKey(entry.key);
    const where = `line ${entry.line}`;
    const text = `${entry.key} = ${entry.value}`;
    if (entry.value.trim() === '')
      return { where, text, readAs: `empty value: kept in metadata.extra as "${entry.key}"` };
    if (row === undefined)
      return {
        where,
        text,
        readAs: `words "${key}"${unitLabel === null ? '' : `, unit ${unitLabel}`}: not in the vocabulary, kept in metadata.extra`,
      };
    return { where, text, readAs: `words "${key}"${unitLabel === null ? '' : `, unit ${unitLabel}`} → ${row.field}` };
  });
}

function explainColumns(names: readonly string[], data: readonly ParsedData[] | null): ExplainedItem[] {
  const first = data?.[0];
  return names.map((name, index) => {
    const where = `column ${index + 1}`;
    if (first !== undefined) {
      const layout = first.layout;
      const measurement = data?.find((item) => item.layout.valueColumn === name);
      if (layout.axisColumn === name)
        return {
          where,
          text: name,
          readAs: `axis${layout.axisUnitFound === null ? ' (unit assumed)' : `, unit ${layout.axisUnitFound}`}`,
        };
      if (measurement !== undefined)
        return {
          where,
          text: name,
          readAs: `${measurement.type === 'decay' ? 'counts' : `${measurement.spectrum.kind} values`} of measurement ${measurement.id}`,
        };
      if (layout.irfColumn === name) return { where, text: name, readAs: 'IRF' };
      if (layout.ignoredColumns.includes(name))
        return { where, text: name, readAs: 'not a measurement (fit, residual, …): not used' };
      const constant = layout.conversions.find(
        (c) => c.code === 'constant-column-as-metadata' && c.detail.includes(`"${name}"`),
      );
      if (constant !== undefined) return { where, text: name, readAs: constant.detail };
      return { where, text: name, readAs: 'kept beside the spectrum (otherColumns)' };
    }
    const reading = readAxisName(name);
    return {
      where,
      text: name,
      readAs:
        reading.unit !== undefined
          ? `reads as an axis in ${reading.unit.symbol}`
          : reading.looksLikeAxis
            ? 'named like an axis, no unit'
            : 'a value column by its name',
    };
  });
}

/** A profile guessed from the detected layout; `fill` lists what the file cannot tell. */
function guessProfile(
  file: string,
  layout: DelimitedLayout | null,
  lines: readonly string[],
): { profile: FormatProfile; fill: string[] } {
  const base = file.replace(/\\/g, '/').split('/').pop() ?? file;
  const match = base.replace(/\d+/g, '*').replace(/\*+/g, '*');
  const profile: Record<string, unknown> = {
    name: `${match.replace(/[^A-Za-z]+/g, '-').replace(/^-|-$/g, '') || 'instrument'}`,
    match,
  };
  const fill: string[] = [];
  if (layout === null)
    return { profile: profile as FormatProfile, fill: ['delimiter', 'headerLines', 'axisColumn', 'axisUnit'] };
  profile['delimiter'] = DELIMITER_WORDS[layout.delimiter];
  profile['decimalMark'] = layout.decimalMark;
  profile['headerLines'] = layout.headerLineCount;
  profile['columnNamesLine'] = layout.nameLine ?? 0;
  profile['axisColumn'] = 1;
  const nameKind = kindFromFileName(file);
  const firstRow = (lines[layout.firstDataLine - 1] ?? '')
    .trim()
    .split(layout.delimiter === 'whitespace' ? /\s+/ : layout.delimiter);
  const axisName = layout.columnNames?.[0];
  const reading = axisName === undefined ? undefined : readAxisName(axisName);
  const axisStart = Number((firstRow[0] ?? '').replace(',', '.'));
  if (reading?.unit !== undefined && !reading.assumed)
    profile['axisUnit'] = reading.unit.symbol === 'µs' ? 'us' : reading.unit.symbol;
  else if (
    nameKind === 'decay' ||
    layout.headerEntries.some((entry) => lookupKey(entry.key)?.field === 'channelWidthNs')
  ) {
    if (Number.isInteger(axisStart) && layout.columnCount >= 2) {
      profile['axisUnit'] = 'channel';
      profile['channelWidthNs'] = 'FILL IN';
      fill.push('channelWidthNs (ns per channel, from the instrument settings)');
    } else {
      profile['axisUnit'] = 'FILL IN';
      fill.push('axisUnit (ps, ns, µs …)');
    }
  } else {
    profile['axisUnit'] = 'nm';
    fill.push('axisUnit (check: nm assumed from the values)');
  }
  profile['valueColumns'] = Array.from({ length: Math.max(1, layout.columnCount - 1) }, (_, k) => k + 2);
  if (nameKind !== undefined) profile['kind'] = nameKind;
  else if (profile['axisUnit'] === 'channel' || /s$/.test(String(profile['axisUnit']))) profile['kind'] = 'decay';
  return { profile: profile as FormatProfile, fill };
}

function toYaml(profile: FormatProfile): string {
  const lines = ['formats:', '  profiles:'];
  Object.entries(profile).forEach(([key, value], index) => {
    const text = Array.isArray(value)
      ? `[${value.map((item) => JSON.stringify(item)).join(', ')}]`
      : typeof value === 'string'
        ? JSON.stringify(value)
        : String(value);
    lines.push(`${index === 0 ? '    - ' : '      '}${key}: ${text}`);
  });
  return `${lines.join('\n')}\n`;
}

/** Explains how `content` is read (lines, columns, keys, outcome) and offers a profile when it is refused or read on an assumption. */
export function explainData(content: Uint8Array, options: ReadOptions): Explanation {
  const file = options.fileName;
  let data: ParsedData[] | null = null;
  let refusal: InputRejected | null = null;
  try {
    data = readMeasurements(content, options);
  } catch (error) {
    if (!(error instanceof InputRejected)) throw error;
    refusal = error;
  }
  const { bytes } = normaliseBytes(content);
  let layout: DelimitedLayout | null = null;
  let lines: string[] = [];
  if (sniffFormat(bytes) === 'delimited') {
    const start = bomLength(bytes);
    lines = splitLines(decodeText(bytes.subarray(start)).text);
    try {
      layout = detectDelimitedLayout(bytes, start, file);
    } catch (error) {
      if (!(error instanceof InputRejected)) throw error;
    }
  }
  const trailerLine = data?.[0]?.layout.conversions
    .find((c) => c.code === 'summary-after-data')
    ?.detail.match(/line (\d+)/)?.[1];
  const names =
    data?.[0]?.layout.columnNames ??
    layout?.columnNames ??
    (layout === null ? [] : Array.from({ length: layout.columnCount }, (_, k) => `column ${k + 1}`));
  const assumed = data?.[0]?.layout.conversions.find((c) => c.code === 'axis-unit-assumed');
  const ambiguity =
    refusal !== null
      ? `refused: ${refusal.code}`
      : assumed !== undefined
        ? `read on an assumption: ${assumed.detail}`
        : null;
  let profile: Explanation['profile'] = null;
  if (ambiguity !== null && refusal?.code !== 'MATRIX_LAYOUT' && layout !== null) {
    const guess = guessProfile(file, layout, lines);
    const yaml = toYaml(guess.profile);
    if (guess.fill.some((item) => !item.startsWith('axisUnit (check'))) {
      profile = { yaml, checked: false, note: `fill in ${guess.fill.join('; ')} before use` };
    } else {
      try {
        const read = readMeasurements(content, { ...options, profiles: [guess.profile] });
        profile = {
          yaml,
          checked: true,
          note: `checked: with this profile the file reads as ${read.length} measurement(s) (${read.map((item) => (item.type === 'decay' ? 'decay' : `${item.spectrum.kind} spectrum`)).join(', ')})${guess.fill.length > 0 ? `; ${guess.fill.join('; ')}` : ''}`,
        };
      } catch (error) {
        if (!(error instanceof InputRejected)) throw error;
        profile = {
          yaml,
          checked: false,
          note: `this guess is still refused (${error.code}: ${error.message}); adjust it`,
        };
      }
    }
  }
  return {
    file,
    lines:
      layout === null ? [] : explainLines(lines, layout, trailerLine === undefined ? undefined : Number(trailerLine)),
    columns: explainColumns(names, data),
    keys: layout === null ? [] : explainKeys(layout),
    outcome:
      data !== null
        ? { read: data.map((item) => item.id) }
        : {
            refused: {
              code: refusal?.code ?? 'INTERNAL',
              message: refusal?.message ?? '',
              ...(refusal?.line === undefined ? {} : { line: refusal.line }),
              hint: refusal?.hint ?? '',
            },
          },
    ambiguity,
    profile,
  };
}
