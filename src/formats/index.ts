// Public entry of the formats module: readData() for every supported input, the writers, and the
// types other modules code against. See docs/formats.md.
export { readData, readMeasurements, sniffFormat } from './read-data.js';
export { decodeDataText, decodeInputText, decodeText, utf16Order } from './bytes.js';
export { formatProfileSchema, matchProfile, type FormatProfile, type ResolvedFormatProfile } from './profile.js';
export { resolveReadOptions, DEFAULT_MAX_BYTES, type ReadOptions, type ResolvedReadOptions } from './read-options.js';
export type {
  ParsedData,
  MeasurementContent,
  LayoutInfo,
  LayoutConversion,
  DataFormat,
  DelimiterName,
} from './types.js';
export { writeSpectrumCsv, writeDecayCsv } from './csv-writer.js';
export { writeSpectrumJcamp } from './jcamp-writer.js';
export { writeDataJson } from './json-writer.js';
export { DATA_SCHEMA, DATA_FORMAT_TAG } from './json-schema.js';
export { VOCABULARY } from './metadata-vocabulary.js';
export { readConcentrationName } from './concentration.js';
export { explainData, type Explanation, type ExplainedItem } from './explain.js';
