// Turns a format-neutral RawTable into a Spectrum or a Decay: finds the axis column and its unit,
// decides spectrum vs decay, picks the value (or counts and IRF) columns and maps the metadata.
import type { SpectrumKind } from '../model/spectrum.js';
import type { ResolvedReadOptions } from './read-options.js';
import type { RawColumn, RawTable } from './raw-table.js';
import type { LayoutConversion, ParsedData } from './types.js';
import { mapHeader, type MappedHeader, type MetadataField } from './metadata-vocabulary.js';
import { parseKindWords } from './column-roles.js';
import { lookupAxisUnit, readAxisName, type AxisUnit } from './units.js';
import { reject } from './reject.js';
import { setOwn } from './own-record.js';
import { buildSpectrum } from './build-spectrum.js';
import { buildDecay } from './build-decay.js';

const SPECTRUM_FIELDS: readonly MetadataField[] = ['excitationNm', 'emissionNm', 'excitationSlitNm', 'emissionSlitNm', 'integrationTimeS', 'pathLengthCm', 'temperatureC', 'solvent', 'sampleId', 'acquiredAt'];
const DECAY_FIELDS: readonly MetadataField[] = ['excitationNm', 'emissionNm', 'repetitionRateHz', 'countRatePerS', 'collectionTimeS', 'temperatureC', 'solvent', 'sampleId', 'acquiredAt'];
const ALL_TYPED: readonly MetadataField[] = [...new Set([...SPECTRUM_FIELDS, ...DECAY_FIELDS, 'channelWidthNs' as const])];
/** Wavelength range (nm) in which an axis without any unit is taken as nm (UV to near IR; common practice). */
const ASSUMED_NM_RANGE = [100, 3000] as const;

/** The typed metadata of one type plus extra: fields the type does not carry go back to extra verbatim. */
export function metadataFor(mapped: MappedHeader, fields: readonly MetadataField[]): Record<string, unknown> {
  const metadata: Record<string, unknown> = {};
  const extra: Record<string, string> = {};
  for (const [key, value] of Object.entries(mapped.extra)) setOwn(extra, key, value);
  for (const field of ALL_TYPED) {
    const value = mapped.numbers[field] ?? mapped.texts[field];
    if (value === undefined) continue;
    if (fields.includes(field)) metadata[field] = value;
    else if (field !== 'channelWidthNs') {
      const source = mapped.sources[field];
      if (source !== undefined) setOwn(extra, source.key, source.value);
    }
  }
  if (mapped.role !== undefined) metadata['role'] = mapped.role;
  metadata['extra'] = extra;
  return metadata;
}

/** Index of the axis column: the first column whose name reads as an axis with a unit, else the first that looks like an axis, else 0. */
function findAxisColumn(columns: readonly RawColumn[]): number {
  const withUnit = columns.findIndex((column) => {
    const reading = readAxisName(column.name);
    return reading.looksLikeAxis && reading.unit !== undefined;
  });
  if (withUnit >= 0) return withUnit;
  const named = columns.findIndex((column) => readAxisName(column.name).looksLikeAxis);
  return named >= 0 ? named : 0;
}

/** Resolves the axis unit (column name → container/header declaration → channel width → nm by range); throws UNKNOWN_UNIT. */
function resolveAxisUnit(
  table: RawTable, axis: RawColumn, mapped: MappedHeader, decayExpected: boolean, file: string,
): { unit: AxisUnit; found: string | null; assumed: LayoutConversion | null } {
  const declared = table.declaredAxisUnit ?? mapped.texts.axisUnit;
  if (declared !== undefined) {
    const unit = lookupAxisUnit(declared);
    if (unit === undefined) {
      return reject('UNKNOWN_UNIT', `the axis unit "${declared}" is not one driftlight reads`, file, table.unitLine ?? mapped.lines.axisUnit);
    }
    return { unit, found: declared, assumed: null };
  }
  const reading = readAxisName(axis.name);
  if (reading.unitLabel !== null && reading.unit === undefined) {
    return reject('UNKNOWN_UNIT', `the axis column "${axis.name}" has the unknown unit "${reading.unitLabel}"`, file, table.unitLine);
  }
  if (reading.unit !== undefined) {
    return {
      unit: reading.unit,
      found: reading.unitLabel,
      assumed: reading.assumed ? { code: 'axis-unit-assumed', detail: `"${axis.name}" taken as ${reading.unit.symbol}` } : null,
    };
  }
  if (mapped.numbers.channelWidthNs !== undefined) {
    return { unit: { quantity: 'channel', symbol: 'channel', toModelFactor: 1 }, found: null, assumed: { code: 'axis-unit-assumed', detail: 'axis taken as channel numbers (a channel width is given)' } };
  }
  const values = axis.values;
  let inRange = values.length > 0;
  for (let i = 0; i < values.length && inRange; i++) {
    const value = values[i] as number;
    inRange = value >= ASSUMED_NM_RANGE[0] && value <= ASSUMED_NM_RANGE[1];
  }
  if (!decayExpected && inRange) {
    return { unit: { quantity: 'wavelength', symbol: 'nm', toModelFactor: 1 }, found: null, assumed: { code: 'axis-unit-assumed', detail: 'no axis unit written; values lie in 100–3000, taken as nm' } };
  }
  return reject('UNKNOWN_UNIT', `the axis column "${axis.name}" names no unit`, file, table.unitLine);
}

/** Finds the column the caller or the header named; throws MISSING_COLUMN when it is absent or is the axis. */
function namedColumn(columns: readonly RawColumn[], axisIndex: number, wanted: string | number, file: string, line: number | undefined): number {
  const index = typeof wanted === 'number' ? wanted - 1 : columns.findIndex((column) => column.name.toLowerCase() === wanted.toLowerCase().trim());
  if (index < 0 || index >= columns.length || index === axisIndex) {
    const names = columns.map((column) => `"${column.name}"`).join(', ');
    return reject('MISSING_COLUMN', `the value column ${typeof wanted === 'number' ? `number ${wanted}` : `"${wanted}"`} is not a value column of this file (columns: ${names})`, file, line);
  }
  return index;
}

/** Interprets a RawTable as a spectrum or a decay according to its content and the read options. */
export function interpretTable(table: RawTable, options: ResolvedReadOptions): ParsedData {
  const file = options.fileName;
  const mapped = mapHeader(table.headerEntries, file);
  if (table.columns.length < 2) {
    return reject('MISSING_COLUMN', 'the data has only one column; an axis and a value column are needed', file, table.unitLine);
  }
  const kindText = mapped.texts.kind ?? table.declaredKind;
  const metaKind = kindText === undefined ? undefined : parseKindWords(kindText);
  if (kindText !== undefined && metaKind === undefined && mapped.sources.kind !== undefined) {
    setOwn(mapped.extra, mapped.sources.kind.key, mapped.sources.kind.value);
  }
  const axisIndex = table.axisColumnIndex ?? findAxisColumn(table.columns);
  const axis = table.columns[axisIndex] as RawColumn;
  const decayExpected = metaKind === 'decay' || (metaKind === undefined && options.kindHint === 'decay');
  const { unit, found, assumed } = resolveAxisUnit(table, axis, mapped, decayExpected, file);
  const timeAxis = unit.quantity === 'time' || unit.quantity === 'channel';
  if (metaKind === 'decay' && !timeAxis) {
    return reject('UNKNOWN_UNIT', `the file says it is a decay but its axis is in ${unit.symbol}`, file, table.unitLine, 'A decay needs a time axis (ps, ns, µs, ms, s) or channel numbers with a channel width.');
  }
  const valueIndices = table.columns.map((_, index) => index).filter((index) => index !== axisIndex);
  const requested = options.valueColumn ?? mapped.texts.valueColumn;
  const requestedIndex = requested === undefined ? undefined
    : namedColumn(table.columns, axisIndex, requested, file, options.valueColumn === undefined ? mapped.lines.valueColumn : undefined);
  const conversions: LayoutConversion[] = assumed === null ? [] : [assumed];
  const layoutBase = { ...table.layout, columnNames: table.columns.map((column) => column.name), axisColumn: axis.name, axisUnitFound: found };
  if (timeAxis) {
    const built = buildDecay({ table, axis, unit, valueIndices, requestedIndex, mapped, metadata: metadataFor(mapped, DECAY_FIELDS), file, conversions });
    return { type: 'decay', decay: built.decay, layout: Object.freeze({ ...layoutBase, valueColumn: built.countsColumn, irfColumn: built.irfColumn, ignoredColumns: built.ignoredColumns, conversions }) };
  }
  const hint: SpectrumKind | undefined = options.kindHint === 'decay' ? undefined : options.kindHint;
  const spectrumKind = metaKind === 'decay' ? undefined : metaKind;
  const spectrum = buildSpectrum({
    table, axis, unit, valueIndices, requestedIndex, metaKind: spectrumKind, kindHint: hint,
    valueUnit: mapped.texts.valueUnit ?? table.declaredValueUnit, metadata: metadataFor(mapped, SPECTRUM_FIELDS), file, conversions,
  });
  return { type: 'spectrum', spectrum, layout: Object.freeze({ ...layoutBase, valueColumn: spectrum.valueColumn, irfColumn: null, ignoredColumns: [], conversions }) };
}

