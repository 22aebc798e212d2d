// JSON Schema (draft-07) of driftlight's own data file, "driftlight.data/1". This object is the
// source; schemas/data.schema.json is a copy that a test keeps identical.
import { MEASUREMENT_ROLES, SPECTRUM_KINDS } from '../model/spectrum.js';

/** Format tag written in every driftlight data file. */
export const DATA_FORMAT_TAG = 'driftlight.data/1';

const numberArray = { type: 'array', items: { type: 'number' } } as const;
const extra = { type: 'object', additionalProperties: { type: 'string' } } as const;
const commonMetadata = {
  excitationNm: { type: 'number', description: 'Excitation wavelength in nm.' },
  emissionNm: { type: 'number', description: 'Emission (detection) wavelength in nm.' },
  temperatureC: { type: 'number', description: 'Sample temperature in °C.' },
  solvent: { type: 'string' },
  sampleId: { type: 'string' },
  role: { enum: [...MEASUREMENT_ROLES] },
  acquiredAt: { type: 'string', description: 'Acquisition time as written by the instrument (ISO 8601 preferred).' },
  extra,
} as const;

/** The schema object (draft-07). */
export const DATA_SCHEMA = {
  $schema: 'http://json-schema.org/draft-07/schema#',
  $id: 'urn:driftlight:schema:data:1',
  title: 'driftlight data file (driftlight.data/1)',
  description: 'One spectrum or one decay histogram in the units of the driftlight data model.',
  type: 'object',
  required: ['format', 'type'],
  oneOf: [
    {
      required: ['format', 'type', 'spectrum'],
      properties: {
        format: { const: DATA_FORMAT_TAG },
        type: { const: 'spectrum' },
        spectrum: {
          type: 'object',
          required: ['kind', 'wavelengthNm', 'values', 'valueUnit', 'valueColumn', 'otherColumns', 'metadata'],
          additionalProperties: false,
          properties: {
            kind: { enum: [...SPECTRUM_KINDS] },
            wavelengthNm: { ...numberArray, minItems: 2, description: 'Strictly ascending wavelengths in nm.' },
            values: { ...numberArray, minItems: 2 },
            valueUnit: { type: 'string' },
            valueColumn: { type: 'string' },
            otherColumns: { type: 'object', additionalProperties: numberArray },
            metadata: {
              type: 'object',
              required: ['extra'],
              additionalProperties: false,
              properties: {
                ...commonMetadata,
                excitationSlitNm: { type: 'number', description: 'Excitation band-pass in nm.' },
                emissionSlitNm: { type: 'number', description: 'Emission band-pass in nm.' },
                integrationTimeS: { type: 'number', description: 'Integration time per point in s.' },
                pathLengthCm: { type: 'number', description: 'Cuvette path length in cm.' },
              },
            },
          },
        },
        sourceLayout: {
          type: 'object',
          description: 'What the reader detected in the file this data came from (informative).',
        },
      },
      additionalProperties: false,
    },
    {
      required: ['format', 'type', 'decay'],
      properties: {
        format: { const: DATA_FORMAT_TAG },
        type: { const: 'decay' },
        decay: {
          type: 'object',
          required: ['timeNs', 'counts', 'channelWidthNs', 'metadata'],
          additionalProperties: false,
          properties: {
            timeNs: {
              ...numberArray,
              minItems: 4,
              description: 'Channel start times in ns, ascending and equally spaced.',
            },
            counts: { ...numberArray, minItems: 4 },
            channelWidthNs: { type: 'number', exclusiveMinimum: 0 },
            irfCounts: numberArray,
            metadata: {
              type: 'object',
              required: ['extra'],
              additionalProperties: false,
              properties: {
                ...commonMetadata,
                repetitionRateHz: { type: 'number', description: 'Excitation repetition rate in Hz.' },
                countRatePerS: { type: 'number', description: 'Detected photon rate in counts per second.' },
                collectionTimeS: { type: 'number', description: 'Collection time in s.' },
              },
            },
          },
        },
        sourceLayout: {
          type: 'object',
          description: 'What the reader detected in the file this data came from (informative).',
        },
      },
      additionalProperties: false,
    },
  ],
} as const;
