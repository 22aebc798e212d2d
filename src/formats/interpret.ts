// Turns a format-neutral RawTable into a Spectrum or a Decay: finds the axis column and its unit,
// decides spectrum vs decay, picks the value (or counts and IRF) columns and maps the metadata.
// One file may hold several measurements (decay columns, spectra sharing an axis, x,y,x,y pairs):
// each becomes its own ParsedData, with the column name in its id. A matching formats profile
// fixes what the file cannot say.
import type { SpectrumKind } from '../model/spectrum.js';
import type { ResolvedReadOptions } from './read-options.js';
import type { RawColumn, RawTable } from './raw-table.js';
import type { LayoutConversion, ParsedData } from './types.js';
import { mapHeader, type MappedHeader, type MetadataField } from './metadata-vocabulary.js';
import { columnRole, kindOfRole, parseKindWords } from './column-roles.js';
import { lookupAxisUnit, readAxisName, RAMAN_SHIFT_UNIT, type AxisUnit } from './units.js';
import { kindFromFileName, kindConflict } from './file-name-kind.js';
import type { ResolvedFormatProfile } from './profile.js';
import { reject } from './reject.js';
import { setOwn } from './own-record.js';
import { buildSpectrum } from './build-spectrum.js';
import { buildDecay } from './build-decay.js';
import { itemAt } from '../model/item-at.js';

const SPECTRUM_FIELDS: readonly MetadataField[] = [
  'excitationNm',
  'emissionNm',
  'excitationSlitNm',
  'emissionSlitNm',
  'integrationTimeS',
  'pathLengthCm',
  'temperatureC',
  'solvent',
  'sampleId',
  'acquiredAt',
];
const DECAY_FIELDS: readonly MetadataField[] = [
  'excitationNm',
  'emissionNm',
  'repetitionRateHz',
  'countRatePerS',
  'collectionTimeS',
  'temperatureC',
  'solvent',
  'sampleId',
  'acquiredAt',
];
const ALL_TYPED: readonly MetadataField[] = [
  ...new Set([...SPECTRUM_FIELDS, ...DECAY_FIELDS, 'channelWidthNs' as const]),
];
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

/** True when every value of a column is the same (and there are at least two). */
function isConstant(column: RawColumn): boolean {
  const values = column.values;
  if (values.length < 2) return false;
  for (let i = 1; i < values.length; i++) if (values[i] !== values[0]) return false;
  return true;
}

/** Index of the axis column: the first non-constant column whose name reads as an axis with a unit, else the first that looks like an axis, else the first non-constant column. */
function findAxisColumn(columns: readonly RawColumn[]): number {
  const usable = (index: number): boolean => !isConstant(itemAt(columns, index));
  const withUnit = columns.findIndex((column, index) => {
    const reading = readAxisName(column.name);
    return usable(index) && reading.looksLikeAxis && reading.unit !== undefined;
  });
  if (withUnit >= 0) return withUnit;
  const named = columns.findIndex((column, index) => usable(index) && readAxisName(column.name).looksLikeAxis);
  if (named >= 0) return named;
  const axisLike = columns.findIndex((column) => readAxisName(column.name).looksLikeAxis);
  return axisLike >= 0 ? axisLike : 0;
}

/** Resolves the axis unit (profile → container/header declaration → column name → channel width → nm by range); throws UNKNOWN_UNIT. */
function resolveAxisUnit(
  table: RawTable,
  axis: RawColumn,
  mapped: MappedHeader,
  decayExpected: string | null,
  profile: ResolvedFormatProfile | undefined,
  file: string,
): { unit: AxisUnit; found: string | null; assumed: LayoutConversion | null } {
  const declared = profile?.axisUnit ?? table.declaredAxisUnit ?? mapped.texts.axisUnit;
  if (declared !== undefined) {
    const unit = /shift/i.test(declared) ? RAMAN_SHIFT_UNIT : lookupAxisUnit(declared);
    if (unit === undefined) {
      return reject(
        'UNKNOWN_UNIT',
        `the axis unit "${declared}" is not one driftlight reads`,
        file,
        profile?.axisUnit === undefined ? (table.unitLine ?? mapped.lines.axisUnit) : undefined,
      );
    }
    return { unit, found: declared, assumed: null };
  }
  const reading = readAxisName(axis.name);
  if (reading.unitLabel !== null && reading.unit === undefined) {
    return reject(
      'UNKNOWN_UNIT',
      `the axis column "${axis.name}" has the unknown unit "${reading.unitLabel}"`,
      file,
      table.unitLine,
    );
  }
  if (reading.unit !== undefined) {
    return {
      unit: reading.unit,
      found: reading.unitLabel,
      assumed: reading.assumed
        ? { code: 'axis-unit-assumed', detail: `"${axis.name}" taken as ${reading.unit.symbol}` }
        : null,
    };
  }
  if (mapped.numbers.channelWidthNs !== undefined) {
    return {
      unit: { quantity: 'channel', symbol: 'channel', toModelFactor: 1 },
      found: null,
      assumed: { code: 'axis-unit-assumed', detail: 'axis taken as channel numbers (a channel width is given)' },
    };
  }
  const values = axis.values;
  let inRange = values.length > 0;
  for (let i = 0; i < values.length && inRange; i++) {
    const value = itemAt(values, i);
    inRange = value >= ASSUMED_NM_RANGE[0] && value <= ASSUMED_NM_RANGE[1];
  }
  if (decayExpected === null && inRange) {
    return {
      unit: { quantity: 'wavelength', symbol: 'nm', toModelFactor: 1 },
      found: null,
      assumed: { code: 'axis-unit-assumed', detail: 'no axis unit written; values lie in 100–3000, taken as nm' },
    };
  }
  if (decayExpected !== null) {
    return reject(
      'UNKNOWN_UNIT',
      `${decayExpected} says decay, but the axis column "${axis.name}" names no time unit and no channel width is given`,
      file,
      table.unitLine,
      'Name the time unit in the column header ("time (ns)"), add a header line such as "channel width (ps): 25" for channel numbers, or declare the layout in a formats profile (driftlight inspect FILE --explain prints one).',
    );
  }
  return reject('UNKNOWN_UNIT', `the axis column "${axis.name}" names no unit`, file, table.unitLine);
}

/** Index of a column given by name (case-insensitive) or 1-based number; throws MISSING_COLUMN naming `what`. */
function columnIndex(
  columns: readonly RawColumn[],
  wanted: string | number,
  what: string,
  file: string,
  line: number | undefined,
): number {
  const index =
    typeof wanted === 'number'
      ? wanted - 1
      : columns.findIndex((column) => column.name.toLowerCase() === wanted.toLowerCase().trim());
  if (index < 0 || index >= columns.length) {
    const names = columns.map((column) => `"${column.name}"`).join(', ');
    return reject(
      'MISSING_COLUMN',
      `the ${what} ${typeof wanted === 'number' ? `number ${wanted}` : `"${wanted}"`} is not a column of this file (columns: ${names})`,
      file,
      line,
    );
  }
  return index;
}

/** Finds the column the caller or the header named; throws MISSING_COLUMN when it is absent or is the axis. */
function namedColumn(
  columns: readonly RawColumn[],
  axisIndex: number,
  wanted: string | number,
  file: string,
  line: number | undefined,
): number {
  const index = columnIndex(columns, wanted, 'value column', file, line);
  if (index === axisIndex)
    return reject(
      'MISSING_COLUMN',
      `the value column ${typeof wanted === 'number' ? `number ${wanted}` : `"${wanted}"`} is the axis column`,
      file,
      line,
    );
  return index;
}

/** Column names that hold something other than a measurement: fits, residuals, references, backgrounds, uncertainties. */
const NOT_A_MEASUREMENT =
  /\b(fit|fitted|model|residuals?|res|weighted|difference|diff|ref|reference|lamp|monitor|background|bkg|baseline|blank|correction|std|sd|sigma|error|uncertainty|stderr)\b|^r\d*c?\b|^(x|y|z)\d*$/i;

/** Value columns that are measurements of the same kind as the primary one (several decays, several spectra sharing one axis). */
function siblingColumns(
  columns: readonly RawColumn[],
  candidates: readonly number[],
  primary: number,
  decay: boolean,
): number[] {
  const primaryRole = columnRole(itemAt(columns, primary).name);
  return candidates.filter((index) => {
    if (index === primary) return false;
    const name = itemAt(columns, index).name;
    if (NOT_A_MEASUREMENT.test(name.replace(/[_.]+/g, ' '))) return false;
    const role = columnRole(name);
    if (decay) return role === 'counts' || role === 'intensity';
    return (
      role === primaryRole ||
      (kindOfRole(role) === undefined && kindOfRole(primaryRole) === undefined && role !== 'irf')
    );
  });
}

/** A column name without the " (2)" the reader adds to a repeated name. */
function withoutRepeatMark(name: string): string {
  return name.replace(/ \(\d+\)$/, '');
}

/** True when the columns alternate axis, value, axis, value … with every axis column named as one (x,y,x,y pairs). */
function isColumnPairs(table: RawTable): boolean {
  const columns = table.columns;
  if (columns.length < 4 || columns.length % 2 !== 0 || table.axisColumnIndex !== undefined || !table.namedColumns)
    return false;
  const axisReading = (index: number) => readAxisName(withoutRepeatMark(itemAt(columns, index).name));
  for (let index = 0; index < columns.length; index += 2) {
    const axis = axisReading(index);
    if (!axis.looksLikeAxis || axisReading(index + 1).looksLikeAxis) return false;
    if (axis.unit?.quantity !== axisReading(0).unit?.quantity) return false;
  }
  return true;
}

/** Builds the profile's adjustments of the mapped header (channel width, excitation, role, kind). */
function applyProfile(mapped: MappedHeader, profile: ResolvedFormatProfile | undefined): void {
  if (profile === undefined) return;
  const numbers = mapped.numbers;
  if (profile.channelWidthNs !== undefined) numbers.channelWidthNs = profile.channelWidthNs;
  if (profile.excitationNm !== undefined) numbers.excitationNm = profile.excitationNm;
  if (profile.kind !== undefined) mapped.texts.kind = profile.kind;
  if (profile.role !== undefined) (mapped as { role: MappedHeader['role'] }).role = profile.role;
}

/** Reads every measurement of a RawTable (one or several), according to its content, the file name and the read options. */
export function interpretTableAll(table: RawTable, options: ResolvedReadOptions): ParsedData[] {
  const file = options.fileName;
  const profile = options.profile;
  if (profile === undefined && isColumnPairs(table)) {
    const pairs: ParsedData[] = [];
    for (let index = 0; index < table.columns.length; index += 2) {
      const axisColumn = itemAt(table.columns, index);
      const pair: RawTable = {
        ...table,
        columns: [
          { name: withoutRepeatMark(axisColumn.name), values: axisColumn.values },
          itemAt(table.columns, index + 1),
        ],
        axisColumnIndex: 0,
      };
      for (const data of interpretTableAll(pair, options)) pairs.push(data);
    }
    const names = pairs.map((data) => data.layout.valueColumn);
    const note: LayoutConversion = {
      code: 'column-pairs-split',
      detail: `${pairs.length} x,y column pairs read as ${pairs.length} measurements`,
    };
    return pairs.map((data) => withIdentity(data, file, names, table, note));
  }
  const mapped = mapHeader(table.headerEntries, file);
  applyProfile(mapped, profile);
  const conversions: LayoutConversion[] =
    profile === undefined
      ? []
      : [{ code: 'profile-applied', detail: `formats profile "${profile.name ?? profile.match}"` }];
  let working = table;
  if (table.columns.length === 1) {
    const width = mapped.numbers.channelWidthNs;
    if (width === undefined) {
      return reject(
        'MISSING_COLUMN',
        'the data has only one column and no channel width is given',
        file,
        table.unitLine,
        'A single column of counts is read as a decay histogram when the header gives the channel width ("channel width (ps): 25"); otherwise add an axis column, or declare channelWidthNs in a formats profile.',
      );
    }
    const only = itemAt(table.columns, 0);
    const channels = new Float64Array(only.values.length);
    for (let i = 0; i < channels.length; i++) channels[i] = i;
    working = {
      ...table,
      columns: [
        { name: 'channel', values: channels },
        only.name.startsWith('column ') ? { name: 'counts', values: only.values } : only,
      ],
      axisColumnIndex: 0,
    };
    conversions.push({
      code: 'single-column-histogram',
      detail: `one column of counts; channels numbered from 0 at ${width} ns`,
    });
  }
  const kindText = mapped.texts.kind ?? table.declaredKind;
  const metaKind = kindText === undefined ? undefined : parseKindWords(kindText);
  if (kindText !== undefined && metaKind === undefined && mapped.sources.kind !== undefined) {
    setOwn(mapped.extra, mapped.sources.kind.key, mapped.sources.kind.value);
  }
  // A profile's kind is the lab's own declaration: it wins over what the file name suggests.
  const nameKind = profile?.kind === undefined ? kindFromFileName(file) : undefined;
  const columns = working.columns;
  const axisIndex =
    profile?.axisColumn !== undefined
      ? columnIndex(columns, profile.axisColumn, 'axis column of the profile', file, undefined)
      : (working.axisColumnIndex ?? findAxisColumn(columns));
  const axis = itemAt(columns, axisIndex);
  if (isConstant(axis)) {
    return reject(
      'AXIS_DUPLICATE',
      `the axis column "${axis.name}" is constant (every row holds ${itemAt(axis.values, 0)}): it cannot be the axis of a spectrum or a decay`,
      file,
      working.lineOfRow(1),
      'A constant column (such as a fixed excitation wavelength) is a setting, not an axis: give the scanned axis its own column, or choose the axis in a formats profile.',
    );
  }
  let decayExpected: string | null = null;
  if (metaKind === 'decay') decayExpected = 'the header';
  else if (metaKind === undefined && nameKind === 'decay') decayExpected = 'the file name';
  else if (metaKind === undefined && options.kindHint === 'decay') decayExpected = 'the caller';
  const { unit, found, assumed } = resolveAxisUnit(working, axis, mapped, decayExpected, profile, file);
  const timeAxis = unit.quantity === 'time' || unit.quantity === 'channel';
  if (metaKind === 'decay' && !timeAxis) {
    return reject(
      'UNKNOWN_UNIT',
      `the file says it is a decay but its axis is in ${unit.symbol}`,
      file,
      working.unitLine,
      'A decay needs a time axis (ps, ns, µs, ms, s) or channel numbers with a channel width.',
    );
  }
  if (assumed !== null) conversions.push(assumed);
  // Constant wavelength columns beside the axis are settings (excitation or emission wavelength), not values.
  const constantSettings = new Set<number>();
  columns.forEach((column, index) => {
    if (index === axisIndex || !isConstant(column)) return;
    const reading = readAxisName(column.name);
    if (reading.unit?.quantity !== 'wavelength') return;
    const role = columnRole(column.name);
    const field = role === 'excitation' ? 'excitationNm' : role === 'emission' ? 'emissionNm' : undefined;
    if (field === undefined) return;
    constantSettings.add(index);
    const value = itemAt(column.values, 0) * reading.unit.toModelFactor;
    const numbers = mapped.numbers;
    if (numbers[field] === undefined) numbers[field] = value;
    conversions.push({
      code: 'constant-column-as-metadata',
      detail: `column "${column.name}" is constant (${value} nm): read as the ${field === 'excitationNm' ? 'excitation' : 'emission'} wavelength, not as an axis or values`,
    });
  });
  if (table.trailer !== undefined) {
    conversions.push({
      code: 'summary-after-data',
      detail: `the data ends at line ${table.trailer.line}; ${table.trailer.lineCount} line(s) after it read as metadata`,
    });
  }
  const valueIndices = columns
    .map((_, index) => index)
    .filter((index) => index !== axisIndex && !constantSettings.has(index));
  const requested = options.valueColumn ?? mapped.texts.valueColumn;
  const requestedIndex =
    requested === undefined
      ? undefined
      : namedColumn(
          columns,
          axisIndex,
          requested,
          file,
          options.valueColumn === undefined ? mapped.lines.valueColumn : undefined,
        );
  const profileValues = profile?.valueColumns?.map((wanted) =>
    namedColumn(columns, axisIndex, wanted, file, undefined),
  );
  const profileIrf =
    profile?.irfColumn === undefined
      ? undefined
      : columnIndex(columns, profile.irfColumn, 'IRF column of the profile', file, undefined);
  const layoutBase = {
    ...working.layout,
    columnNames: table.columns.map((column) => column.name),
    axisColumn: axis.name,
    axisUnitFound: found,
    ...(profile === undefined ? {} : { profile: profile.name ?? profile.match }),
  };
  if (timeAxis) {
    const conflict = kindConflict(nameKind, 'decay', file);
    if (conflict !== undefined) return reject('KIND_CONFLICT', conflict, file, working.unitLine);
    const build = (countsIndex: number | undefined, exclude: readonly number[]) => {
      const own: LayoutConversion[] = [...conversions];
      const indices = valueIndices.filter((index) => !exclude.includes(index));
      const built = buildDecay({
        table: working,
        axis,
        unit,
        valueIndices: indices,
        requestedIndex: countsIndex,
        irfIndex: profileIrf,
        mapped,
        metadata: metadataFor(mapped, DECAY_FIELDS),
        file,
        conversions: own,
      });
      return { built, own };
    };
    const first = build(requestedIndex ?? profileValues?.[0], profileValues?.slice(1) ?? []);
    const primary = columns.findIndex((column) => column.name === first.built.countsColumn);
    const siblings =
      profileValues !== undefined
        ? profileValues.slice(1)
        : requestedIndex !== undefined
          ? []
          : siblingColumns(
              columns,
              valueIndices.filter((index) => index !== profileIrf && columnRole(itemAt(columns, index).name) !== 'irf'),
              primary,
              true,
            );
    const all = [primary, ...siblings];
    const results = all.map((index) =>
      index === primary && siblings.length === 0
        ? first
        : build(
            index,
            all.filter((other) => other !== index),
          ),
    );
    const names = all.map((index) => itemAt(columns, index).name);
    return results.map(({ built, own }) =>
      withIdentity(
        {
          type: 'decay',
          id: file,
          decay: built.decay,
          layout: Object.freeze({
            ...layoutBase,
            valueColumn: built.countsColumn,
            irfColumn: built.irfColumn,
            ignoredColumns: built.ignoredColumns,
            conversions: own,
          }),
        },
        file,
        names,
        table,
      ),
    );
  }
  const hint: SpectrumKind | undefined = options.kindHint === 'decay' ? undefined : options.kindHint;
  const spectrumKind = metaKind === 'decay' ? undefined : metaKind;
  const buildOne = (valueIndex: number | undefined, exclude: readonly number[]) => {
    const own: LayoutConversion[] = [...conversions];
    const spectrum = buildSpectrum({
      table: working,
      axis,
      unit,
      valueIndices: valueIndices.filter((index) => !exclude.includes(index)),
      requestedIndex: valueIndex,
      metaKind: spectrumKind,
      kindHint: hint,
      valueUnit: mapped.texts.valueUnit ?? table.declaredValueUnit,
      metadata: metadataFor(mapped, SPECTRUM_FIELDS),
      excitationNm: mapped.numbers.excitationNm,
      file,
      conversions: own,
    });
    return { spectrum, own };
  };
  const first = buildOne(requestedIndex ?? profileValues?.[0], profileValues?.slice(1) ?? []);
  const explicitKind = spectrumKind ?? kindOfRole(columnRole(first.spectrum.valueColumn));
  const conflict = kindConflict(nameKind, first.spectrum.kind, file, explicitKind, first.spectrum.valueColumn);
  if (conflict !== undefined) return reject('KIND_CONFLICT', conflict, file, working.unitLine);
  const primary = columns.findIndex((column) => column.name === first.spectrum.valueColumn);
  const siblings =
    profileValues !== undefined
      ? profileValues.slice(1)
      : requestedIndex !== undefined
        ? []
        : siblingColumns(columns, valueIndices, primary, false);
  const all = [primary, ...siblings];
  const results =
    siblings.length === 0
      ? [first]
      : all.map((index) =>
          buildOne(
            index,
            all.filter((other) => other !== index),
          ),
        );
  const names = all.map((index) => itemAt(columns, index).name);
  return results.map(({ spectrum, own }) =>
    withIdentity(
      {
        type: 'spectrum',
        id: file,
        spectrum,
        layout: Object.freeze({
          ...layoutBase,
          valueColumn: spectrum.valueColumn,
          irfColumn: null,
          ignoredColumns: [],
          conversions: own,
        }),
      },
      file,
      names,
      table,
    ),
  );
}

/** Gives a measurement its id ("FILE#column" when the file holds several) and the list of the file's measurement columns. */
function withIdentity(
  data: ParsedData,
  file: string,
  names: readonly string[],
  table: RawTable,
  note?: LayoutConversion,
): ParsedData {
  const id = names.length > 1 ? `${file}#${data.layout.valueColumn}` : file;
  const layout = Object.freeze({
    ...data.layout,
    columnNames: table.columns.map((column) => column.name),
    measurementColumns: names,
    conversions: note === undefined ? data.layout.conversions : [...data.layout.conversions, note],
  });
  return data.type === 'decay' ? { ...data, id, layout } : { ...data, id, layout };
}

/** Interprets a RawTable as one spectrum or decay (the first measurement when the file holds several; see interpretTableAll). */
export function interpretTable(table: RawTable, options: ResolvedReadOptions): ParsedData {
  return itemAt(interpretTableAll(table, options), 0);
}
