// The header-key vocabulary: maps the many ways exports name a setting ("Excitation (nm)",
// "ex wavelength", "# excitation 350") to the model's typed metadata fields, with unit conversion.
// Unknown keys are kept verbatim in metadata.extra. The vocabulary is listed in docs/formats.md.
import { MEASUREMENT_ROLES, type MeasurementRole } from '../model/spectrum.js';
import { parseNumberText } from './number-bytes.js';
import { lookupAxisUnit, normaliseUnitText, splitCamelCase, splitNameAndUnit } from './units.js';
import { reject } from './reject.js';
import { setOwn } from './own-record.js';

/** One `key: value` entry from a header, with its 1-based line. */
export interface HeaderEntry {
  readonly key: string;
  readonly value: string;
  readonly line: number;
}

/** The typed fields a header entry can fill (spectrum and decay metadata, plus reader directives). */
export type MetadataField =
  | 'excitationNm'
  | 'emissionNm'
  | 'excitationSlitNm'
  | 'emissionSlitNm'
  | 'integrationTimeS'
  | 'pathLengthCm'
  | 'temperatureC'
  | 'solvent'
  | 'sampleId'
  | 'role'
  | 'acquiredAt'
  | 'repetitionRateHz'
  | 'countRatePerS'
  | 'collectionTimeS'
  | 'channelWidthNs'
  | 'kind'
  | 'valueColumn'
  | 'valueUnit'
  | 'axisUnit';

type Quantity =
  'wavelength-nm' | 'time-s' | 'time-ns' | 'length-cm' | 'temperature-c' | 'frequency-hz' | 'rate-per-s' | 'text';

interface VocabularyRow {
  readonly field: MetadataField;
  readonly quantity: Quantity;
  /** Normalised key spellings (lower case, punctuation as spaces, units removed). */
  readonly keys: readonly string[];
  /** Canonical key the writers use (with its unit). */
  readonly canonical: string;
}

/** The vocabulary table, one row per field; writers use `canonical`, readers accept every spelling in `keys`. */
export const VOCABULARY: readonly VocabularyRow[] = [
  {
    field: 'excitationNm',
    quantity: 'wavelength-nm',
    canonical: 'excitation wavelength (nm)',
    keys: [
      'excitation',
      'excitation wavelength',
      'ex wavelength',
      'exc wavelength',
      'ex',
      'exc',
      'excitation lambda',
      'lambda ex',
      'ex lambda',
      'lambdaex',
      'excitation wl',
      'ex wl',
    ],
  },
  {
    field: 'emissionNm',
    quantity: 'wavelength-nm',
    canonical: 'emission wavelength (nm)',
    keys: [
      'emission',
      'emission wavelength',
      'em wavelength',
      'em',
      'emission lambda',
      'lambda em',
      'em lambda',
      'lambdaem',
      'detection wavelength',
      'emission wl',
      'em wl',
    ],
  },
  {
    field: 'excitationSlitNm',
    quantity: 'wavelength-nm',
    canonical: 'excitation slit (nm)',
    keys: [
      'excitation slit',
      'ex slit',
      'excitation bandpass',
      'ex bandpass',
      'excitation bandwidth',
      'ex bandwidth',
      'excitation slit width',
    ],
  },
  {
    field: 'emissionSlitNm',
    quantity: 'wavelength-nm',
    canonical: 'emission slit (nm)',
    keys: [
      'emission slit',
      'em slit',
      'emission bandpass',
      'em bandpass',
      'emission bandwidth',
      'em bandwidth',
      'emission slit width',
    ],
  },
  {
    field: 'integrationTimeS',
    quantity: 'time-s',
    canonical: 'integration time (s)',
    keys: ['integration time', 'integration', 'dwell time', 'dwell', 'time per point'],
  },
  {
    field: 'pathLengthCm',
    quantity: 'length-cm',
    canonical: 'path length (cm)',
    keys: ['path length', 'pathlength', 'optical path', 'cuvette path', 'cell path length', 'cuvette'],
  },
  {
    field: 'temperatureC',
    quantity: 'temperature-c',
    canonical: 'temperature (C)',
    keys: ['temperature', 'temp', 'sample temperature'],
  },
  { field: 'solvent', quantity: 'text', canonical: 'solvent', keys: ['solvent', 'medium', 'matrix'] },
  {
    field: 'sampleId',
    quantity: 'text',
    canonical: 'sample id',
    keys: ['sample id', 'sample', 'sample name', 'sampleid', 'id', 'specimen'],
  },
  { field: 'role', quantity: 'text', canonical: 'role', keys: ['role', 'purpose', 'measurement role'] },
  {
    field: 'acquiredAt',
    quantity: 'text',
    canonical: 'acquired at',
    keys: [
      'acquired at',
      'acquired',
      'acquisition time',
      'acquisition date',
      'date',
      'date time',
      'datetime',
      'timestamp',
      'measured at',
      'measured',
    ],
  },
  {
    field: 'repetitionRateHz',
    quantity: 'frequency-hz',
    canonical: 'repetition rate (Hz)',
    keys: ['repetition rate', 'rep rate', 'reprate', 'laser repetition rate', 'pulse rate', 'sync rate'],
  },
  {
    field: 'countRatePerS',
    quantity: 'rate-per-s',
    canonical: 'count rate (1/s)',
    keys: ['count rate', 'countrate', 'detector count rate'],
  },
  {
    field: 'collectionTimeS',
    quantity: 'time-s',
    canonical: 'collection time (s)',
    keys: ['collection time', 'acquisition duration', 'measurement duration'],
  },
  {
    field: 'channelWidthNs',
    quantity: 'time-ns',
    canonical: 'channel width (ns)',
    keys: [
      'channel width',
      'time per channel',
      'bin width',
      'time resolution',
      'channel resolution',
      'resolution per channel',
      'ns per channel',
      'ps per channel',
      'resolution',
    ],
  },
  {
    field: 'kind',
    quantity: 'text',
    canonical: 'kind',
    keys: ['kind', 'type', 'measurement', 'measurement type', 'spectrum type', 'data type', 'scan type'],
  },
  {
    field: 'valueColumn',
    quantity: 'text',
    canonical: 'value column',
    keys: ['value column', 'values column', 'y column'],
  },
  {
    field: 'valueUnit',
    quantity: 'text',
    canonical: 'value unit',
    keys: ['value unit', 'y unit', 'y units', 'yunits'],
  },
  { field: 'axisUnit', quantity: 'text', canonical: 'axis unit', keys: ['axis unit', 'x unit', 'x units', 'xunits'] },
];

/** Keys that name a field only when their value carries that field's unit ("Resolution: 12 ps" is a channel width, "Resolution: 1 nm" is not). */
const UNIT_GATED_KEYS: ReadonlySet<string> = new Set(['resolution']);

const ROW_BY_KEY = new Map<string, VocabularyRow>(
  VOCABULARY.flatMap((row) => row.keys.map((key) => [key, row] as const)),
);
const ROW_BY_FIELD = new Map<MetadataField, VocabularyRow>(VOCABULARY.map((row) => [row.field, row] as const));

/** Unit factors per quantity: multiply a value in that unit to reach the field's unit. */
const UNIT_FACTORS: Readonly<Record<Exclude<Quantity, 'text' | 'temperature-c'>, Readonly<Record<string, number>>>> = {
  'wavelength-nm': { nm: 1, um: 1000, å: 0.1, angstrom: 0.1 },
  'time-s': { s: 1, sec: 1, ms: 1e-3, us: 1e-6, ns: 1e-9, ps: 1e-12, min: 60, h: 3600 },
  'time-ns': { ns: 1, ps: 1e-3, fs: 1e-6, us: 1e3, ms: 1e6, s: 1e9 },
  'length-cm': { cm: 1, mm: 0.1, m: 100, um: 1e-4 },
  'frequency-hz': { hz: 1, khz: 1e3, mhz: 1e6, ghz: 1e9, '1/s': 1, 's-1': 1 },
  'rate-per-s': { '1/s': 1, '/s': 1, 's-1': 1, cps: 1, hz: 1, 'counts/s': 1, kcps: 1e3, khz: 1e3, mcps: 1e6, mhz: 1e6 },
};

/** Unit labels a header key may end with: the axis units and the units of the vocabulary's quantities. */
function isKeyUnit(label: string): boolean {
  const unit = normaliseUnitText(label).replace(/\s+/g, '');
  if (lookupAxisUnit(unit) !== undefined && lookupAxisUnit(unit)?.quantity !== 'channel') return true;
  return KEY_UNITS.has(unit);
}

const KEY_UNITS = new Set([
  'hz',
  'khz',
  'mhz',
  'ghz',
  'cm',
  'mm',
  'm',
  'c',
  '°c',
  'degc',
  'k',
  'fs',
  'min',
  'h',
  '1/s',
  's-1',
  'cps',
  'kcps',
  'mcps',
  'å',
]);

/**
 * Normalises a header key by its parts: split into words whatever the separator or case, and a
 * trailing unit taken off ("Ex. Wavelength [nm]", "ExcWavelength", "channel_width_ps",
 * "Resolution [ps]" → "ex wavelength", "exc wavelength", "channel width" + ps, "resolution" + ps).
 */
export function normaliseKey(key: string): { key: string; unitLabel: string | null } {
  const stripped = key.replace(/^\$+/, '').trim();
  const whole = normaliseWords(stripped);
  if (ROW_BY_KEY.has(whole)) return { key: whole, unitLabel: null };
  const { base, unitLabel } = splitNameAndUnit(stripped, isKeyUnit);
  const words = normaliseWords(base);
  if (unitLabel !== null || ROW_BY_KEY.has(words)) return { key: words, unitLabel };
  return { key: words, unitLabel: null };
}

/** Lower case, camel case split, λ spelled out, punctuation as single spaces. */
function normaliseWords(text: string): string {
  return splitCamelCase(text)
    .toLowerCase()
    .replace(/λ/g, 'lambda ')
    .replace(/[._\-/:#]+/g, ' ')
    .replace(/\s+/g, ' ')
    .trim();
}

/** The vocabulary row for a raw header key, if the key is known. */
export function lookupKey(rawKey: string): VocabularyRow | undefined {
  return ROW_BY_KEY.get(normaliseKey(rawKey).key);
}

/** Canonical header key of a field, as the writers spell it. */
export function canonicalKey(field: MetadataField): string {
  return ROW_BY_FIELD.get(field)?.canonical ?? field;
}

/** Converts a number with a unit label to the quantity's unit; undefined when the unit is unknown. */
function convertQuantity(
  value: number,
  unitLabel: string | null,
  quantity: Exclude<Quantity, 'text'>,
): number | undefined {
  const unit = unitLabel === null ? '' : normaliseUnitText(unitLabel).replace(/\s+/g, '');
  if (quantity === 'temperature-c') {
    if (['', 'c', '°c', 'degc', 'deg c', 'celsius', 'oc', 'º c', 'ºc'].includes(unit)) return value;
    if (['k', 'kelvin'].includes(unit)) return value - 273.15;
    return undefined;
  }
  if (unit === '') return value;
  const factor = UNIT_FACTORS[quantity][unit];
  return factor === undefined ? undefined : value * factor;
}

/** Reads a numeric header value such as "350", "350 nm", "25 ps" or "0,5 s" into the field's unit (key unit as fallback); throws METADATA_INVALID with the line. */
export function readQuantity(
  entry: HeaderEntry,
  quantity: Exclude<Quantity, 'text'>,
  keyUnit: string | null,
  file: string,
): number {
  const match = /^\s*([+-]?(?:\d+[.,]?\d*|[.,]\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$/.exec(entry.value);
  const parsed = match === null ? 'text' : parseNumberText((match[1] ?? '').replace(',', '.'), '.');
  if (match === null || typeof parsed !== 'number') {
    return reject(
      'METADATA_INVALID',
      `header entry "${entry.key}" should be a number but is "${entry.value}"`,
      file,
      entry.line,
    );
  }
  const suffix = (match[2] ?? '') === '' ? keyUnit : (match[2] ?? '');
  const converted = convertQuantity(parsed, suffix, quantity);
  if (converted === undefined) {
    return reject(
      'METADATA_INVALID',
      `header entry "${entry.key}" has the unknown unit "${suffix ?? ''}"`,
      file,
      entry.line,
    );
  }
  return converted;
}

/** Reads a measurement role ("sample", "Control", "reference standard" …); throws METADATA_INVALID for other values. */
export function readRole(entry: HeaderEntry, file: string): MeasurementRole {
  const text = entry.value
    .trim()
    .toLowerCase()
    .replace(/[\s_]+/g, '-');
  const aliases: Readonly<Record<string, MeasurementRole>> = {
    standard: 'reference',
    'reference-standard': 'reference',
    'detector-correction': 'detector-curve',
    'instrument-response': 'irf',
    solvent: 'blank',
  };
  const role = aliases[text] ?? MEASUREMENT_ROLES.find((candidate) => candidate === text);
  if (role === undefined) {
    return reject(
      'METADATA_INVALID',
      `header entry "${entry.key}" names an unknown role "${entry.value}"`,
      file,
      entry.line,
      `Use one of: ${MEASUREMENT_ROLES.join(', ')}.`,
    );
  }
  return role;
}

/** True when a unit-gated entry's value (or key) carries a unit of `quantity` that converts. */
function carriesUnitOf(entry: HeaderEntry, quantity: Quantity, keyUnit: string | null): boolean {
  if (quantity === 'text') return false;
  const match = /^\s*[+-]?(?:\d+[.,]?\d*|[.,]\d+)(?:[eE][+-]?\d+)?\s*(.*?)\s*$/.exec(entry.value);
  if (match === null) return false;
  const unit = (match[1] ?? '') === '' ? keyUnit : (match[1] ?? '');
  return unit !== null && unit !== '' && convertQuantity(1, unit, quantity) !== undefined;
}

/** Mapped header: typed values per field (numbers already in the field's unit, strings trimmed), the line each came from, and unknown entries verbatim. */
export interface MappedHeader {
  readonly numbers: Partial<Record<MetadataField, number>>;
  readonly texts: Partial<Record<MetadataField, string>>;
  readonly role: MeasurementRole | undefined;
  readonly lines: Partial<Record<MetadataField, number>>;
  readonly extra: Record<string, string>;
  /** The raw entries that filled typed fields (so a field unused by the chosen type can go back to extra). */
  readonly sources: Partial<Record<MetadataField, HeaderEntry>>;
}

/** Maps header entries through the vocabulary; unknown keys go to `extra` verbatim; a later duplicate key overrides an earlier one. */
export function mapHeader(entries: readonly HeaderEntry[], file: string): MappedHeader {
  const numbers: Partial<Record<MetadataField, number>> = {};
  const texts: Partial<Record<MetadataField, string>> = {};
  const lines: Partial<Record<MetadataField, number>> = {};
  const sources: Partial<Record<MetadataField, HeaderEntry>> = {};
  const extra: Record<string, string> = {};
  let role: MeasurementRole | undefined;
  for (const entry of entries) {
    const { key, unitLabel } = normaliseKey(entry.key);
    const row = ROW_BY_KEY.get(key);
    if (
      row === undefined ||
      entry.value.trim() === '' ||
      (UNIT_GATED_KEYS.has(key) && !carriesUnitOf(entry, row.quantity, unitLabel))
    ) {
      setOwn(extra, entry.key, entry.value);
      continue;
    }
    lines[row.field] = entry.line;
    sources[row.field] = entry;
    if (row.field === 'role') role = readRole(entry, file);
    else if (row.quantity === 'text') texts[row.field] = entry.value.trim();
    else {
      const keyUnit = unitLabel ?? (key === 'ps per channel' ? 'ps' : key === 'ns per channel' ? 'ns' : null);
      numbers[row.field] = readQuantity(entry, row.quantity, keyUnit, file);
    }
  }
  return { numbers, texts, role, lines, extra, sources };
}
