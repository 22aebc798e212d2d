// Writes model metadata as header entries (canonical vocabulary keys, values in the field's unit),
// shared by the CSV and JCAMP-DX writers so both read back through the same vocabulary.
import { canonicalKey, type MetadataField } from './metadata-vocabulary.js';

const WRITTEN_FIELDS: readonly MetadataField[] = [
  'sampleId',
  'role',
  'solvent',
  'acquiredAt',
  'excitationNm',
  'emissionNm',
  'excitationSlitNm',
  'emissionSlitNm',
  'integrationTimeS',
  'pathLengthCm',
  'temperatureC',
  'repetitionRateHz',
  'countRatePerS',
  'collectionTimeS',
];

/** Header entries for a metadata object: typed fields first (canonical keys), then extra entries verbatim. Line breaks in values become spaces. */
export function metadataEntries(
  metadata: object & { readonly extra: Readonly<Record<string, string>> },
): Array<[string, string]> {
  const entries: Array<[string, string]> = [];
  const record = metadata as Readonly<Record<string, unknown>>;
  for (const field of WRITTEN_FIELDS) {
    const value = record[field];
    if (typeof value === 'number' || typeof value === 'string')
      entries.push([canonicalKey(field), oneLine(String(value))]);
  }
  for (const [key, value] of Object.entries(metadata.extra)) entries.push([oneLine(key), oneLine(value)]);
  return entries;
}

/** Replaces line breaks by spaces (header entries are one line each). */
export function oneLine(text: string): string {
  return text.replace(/\r\n|\r|\n/g, ' ');
}
