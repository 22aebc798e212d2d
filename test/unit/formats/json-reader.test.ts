// driftlight JSON: the schema file on disk is the schema the reader uses; writer output validates
// against it (ajv, independent of the reader) and round-trips exactly; bad JSON is rejected typed.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { Ajv } from 'ajv';
import { DATA_SCHEMA, readData, writeDataJson, type ParsedData } from '../../../src/formats/index.js';
import { decayArbitrary, spectrumArbitrary } from './arbitraries.js';
import { bytes, fixture, rejection } from './helpers.js';

const SCHEMA_FILE = fileURLToPath(new URL('../../../schemas/data.schema.json', import.meta.url));
const schemaOnDisk = JSON.parse(readFileSync(SCHEMA_FILE, 'utf8')) as object;
const validateOnDisk = new Ajv({ strict: true }).compile(schemaOnDisk);

function layoutOf(format: ParsedData['layout']['format']): ParsedData['layout'] {
  return {
    format,
    delimiter: null,
    decimalMark: '.',
    headerLineCount: 0,
    columnNames: [],
    axisColumn: '',
    valueColumn: '',
    irfColumn: null,
    axisUnitFound: null,
    ignoredColumns: [],
    hasBom: false,
    lineEnding: 'lf',
    encoding: 'utf-8',
    conversions: [],
  };
}

describe('driftlight JSON', () => {
  it('schemas/data.schema.json is the schema the reader validates with', () => {
    expect(schemaOnDisk).toEqual(JSON.parse(JSON.stringify(DATA_SCHEMA)));
  });

  it('round-trips random spectra and decays exactly, and the output validates against the schema file (fast-check, 100 runs each)', () => {
    fc.assert(
      fc.property(spectrumArbitrary(), (spectrum) => {
        const text = writeDataJson({ type: 'spectrum', spectrum, layout: layoutOf('delimited') });
        expect(validateOnDisk(JSON.parse(text))).toBe(true);
        const back = readData(bytes(text), { fileName: 'r.json' });
        expect(back.type === 'spectrum' && back.spectrum).toEqual(spectrum);
        expect(back.layout.format).toBe('driftlight-json');
      }),
      { numRuns: 100 },
    );
    fc.assert(
      fc.property(decayArbitrary(), (decay) => {
        const text = writeDataJson({ type: 'decay', decay, layout: layoutOf('delimited') });
        expect(validateOnDisk(JSON.parse(text))).toBe(true);
        const back = readData(bytes(text), { fileName: 'r.json' });
        expect(back.type === 'decay' && back.decay).toEqual(decay);
      }),
      { numRuns: 100 },
    );
  });

  it('writes a fixture read from CSV as JSON that reads back to the same spectrum', () => {
    const first = readData(fixture('emission-header.csv'), { fileName: 'e.csv' });
    const again = readData(bytes(writeDataJson(first)), { fileName: 'e.json' });
    expect(again.type === 'spectrum' && first.type === 'spectrum' && again.spectrum).toEqual(
      first.type === 'spectrum' ? first.spectrum : undefined,
    );
  });

  it.each([
    ['a wrong format tag', '{"format":"other/1","type":"decay","decay":{}}', 'JSON_INVALID'],
    [
      'an unknown kind',
      '{"format":"driftlight.data/1","type":"spectrum","spectrum":{"kind":"raman","wavelengthNm":[1,2],"values":[1,2],"valueUnit":"a","valueColumn":"v","otherColumns":{},"metadata":{"extra":{}}}}',
      'JSON_INVALID',
    ],
    [
      'a descending axis (model invariant)',
      '{"format":"driftlight.data/1","type":"spectrum","spectrum":{"kind":"emission","wavelengthNm":[2,1],"values":[1,2],"valueUnit":"a","valueColumn":"v","otherColumns":{},"metadata":{"extra":{}}}}',
      'AXIS_NOT_ASCENDING',
    ],
    [
      'negative counts (model invariant)',
      '{"format":"driftlight.data/1","type":"decay","decay":{"timeNs":[0,1,2,3],"counts":[1,-1,0,0],"channelWidthNs":1,"metadata":{"extra":{}}}}',
      'NEGATIVE_COUNTS',
    ],
  ])('rejects %s', (_label, text, code) => {
    const error = rejection(() => readData(bytes(text), { fileName: 'x.json' }));
    expect(error.code).toBe(code);
    expect(error.file).toBe('x.json');
  });
});
