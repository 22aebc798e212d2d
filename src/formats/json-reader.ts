// Reader for driftlight's own JSON data file ("driftlight.data/1"): JSON.parse, schema check with
// ajv (compiled once, on first use), then the model's constructors enforce the invariants.
import { Ajv, type ValidateFunction } from 'ajv';
import { createDecay } from '../model/decay.js';
import { createSpectrum, type SpectrumKind, type SpectrumMetadata } from '../model/spectrum.js';
import type { DecayMetadata } from '../model/decay.js';
import type { LayoutInfo, ParsedData } from './types.js';
import { DATA_SCHEMA } from './json-schema.js';
import { bomLength, decodeText, detectLineEnding } from './bytes.js';
import { findJsonSyntaxError } from './json-syntax.js';
import { reject, withFile } from './reject.js';

let compiled: ValidateFunction | undefined;

/** The schema validator, compiled on first use and cached (compiling is slow; validating is not). */
function validator(): ValidateFunction {
  compiled ??= new Ajv({ allErrors: false, strict: true }).compile(DATA_SCHEMA);
  return compiled;
}

/** 1-based line of a character offset. */
function lineAt(text: string, offset: number): number {
  let line = 1;
  for (let i = 0; i < offset && i < text.length; i++) if (text.charCodeAt(i) === 10) line++;
  return line;
}

interface SpectrumJson {
  kind: SpectrumKind;
  wavelengthNm: number[];
  values: number[];
  valueUnit: string;
  valueColumn: string;
  otherColumns: Record<string, number[]>;
  metadata: SpectrumMetadata;
}
interface DecayJson {
  timeNs: number[];
  counts: number[];
  channelWidthNs: number;
  irfCounts?: number[];
  metadata: DecayMetadata;
}
type DataJson = { type: 'spectrum'; spectrum: SpectrumJson } | { type: 'decay'; decay: DecayJson };

/** Reads a driftlight JSON data file; throws TRUNCATED, JSON_INVALID or a model error, naming the file. */
export function readDataJson(content: Uint8Array, file: string): ParsedData {
  const start = bomLength(content);
  const { text, encoding } = decodeText(content.subarray(start));
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    const found = findJsonSyntaxError(text);
    if (found === null || found.truncated) {
      return reject('TRUNCATED', 'the JSON ends before it is complete', file, lineAt(text, text.trimEnd().length));
    }
    return reject(
      'JSON_INVALID',
      `the JSON does not parse: ${message.slice(0, 120)}`,
      file,
      lineAt(text, found.offset),
    );
  }
  const validate = validator();
  if (!validate(parsed)) {
    const first = validate.errors?.[0];
    const where =
      first === undefined
        ? ''
        : `${first.instancePath === '' ? '(top level)' : first.instancePath} ${first.message ?? ''}`;
    return reject('JSON_INVALID', `the JSON breaks the driftlight.data/1 schema: ${where}`.trim(), file);
  }
  const data = parsed as DataJson;
  const base = {
    format: 'driftlight-json' as const,
    delimiter: null,
    decimalMark: '.' as const,
    headerLineCount: 0,
    ignoredColumns: [],
    hasBom: start > 0,
    lineEnding: detectLineEnding(content, start),
    encoding,
    conversions: [],
  };
  if (data.type === 'spectrum') {
    const spectrum = withFile(file, () => createSpectrum(data.spectrum));
    const layout: LayoutInfo = {
      ...base,
      columnNames: ['wavelengthNm', spectrum.valueColumn, ...Object.keys(spectrum.otherColumns)],
      axisColumn: 'wavelengthNm',
      valueColumn: spectrum.valueColumn,
      irfColumn: null,
      axisUnitFound: 'nm',
    };
    return { type: 'spectrum', id: file, spectrum, layout: Object.freeze(layout) };
  }
  const decay = withFile(file, () => createDecay(data.decay));
  const layout: LayoutInfo = {
    ...base,
    columnNames: ['timeNs', 'counts', ...(decay.irfCounts === undefined ? [] : ['irfCounts'])],
    axisColumn: 'timeNs',
    valueColumn: 'counts',
    irfColumn: decay.irfCounts === undefined ? null : 'irfCounts',
    axisUnitFound: 'ns',
  };
  return { type: 'decay', id: file, decay, layout: Object.freeze(layout) };
}
