// Header vocabulary: spellings map to typed fields with unit conversion (SI prefixes; °C = K − 273.15),
// unknown keys stay verbatim in extra; header-line forms parse to key/value.
import { describe, expect, it } from 'vitest';
import { mapHeader, normaliseKey, type HeaderEntry } from '../../../src/formats/metadata-vocabulary.js';
import { parseHeaderLine } from '../../../src/formats/header-lines.js';
import { rejection } from './helpers.js';

function entry(key: string, value: string, line = 1): HeaderEntry {
  return { key, value, line };
}

describe('normaliseKey', () => {
  it.each([
    ['Excitation (nm)', 'excitation', 'nm'],
    ['Ex. Wavelength [nm]', 'ex wavelength', 'nm'],
    ['$EXCITATION WAVELENGTH (NM)', 'excitation wavelength', 'NM'],
    ['λex', 'lambda ex', null],
    ['Channel_Width', 'channel width', null],
  ])('%s → %s', (raw, key, unit) => {
    expect(normaliseKey(raw)).toEqual({ key, unitLabel: unit });
  });
});

describe('mapHeader', () => {
  // Unit factors are SI prefix definitions (BIPM SI Brochure, 9th ed.); K → °C subtracts 273.15.
  it.each([
    [entry('excitation', '350 nm'), 'excitationNm', 350],
    [entry('ex wavelength', '0.35 µm'), 'excitationNm', 350],
    [entry('Integration time (ms)', '100'), 'integrationTimeS', 0.1],
    [entry('dwell', '250 us'), 'integrationTimeS', 0.00025],
    [entry('path length', '10 mm'), 'pathLengthCm', 1],
    [entry('Temp', '300 K'), 'temperatureC', 300 - 273.15],
    [entry('temperature', '21,5 °C'), 'temperatureC', 21.5],
    [entry('Rep. rate', '40 MHz'), 'repetitionRateHz', 4e7],
    [entry('count rate', '2.5 kcps'), 'countRatePerS', 2500],
    [entry('channel width', '16 ps'), 'channelWidthNs', 0.016],
    [entry('ps per channel', '8'), 'channelWidthNs', 0.008],
    [entry('collection time', '2 min'), 'collectionTimeS', 120],
  ])('%o fills %s', (raw, field, value) => {
    const mapped = mapHeader([raw], 'f');
    expect(mapped.numbers[field as keyof typeof mapped.numbers]).toBeCloseTo(value, 12);
  });

  it('keeps text fields, roles and unknown keys verbatim', () => {
    const mapped = mapHeader(
      [
        entry('Sample name', ' QS-1 '),
        entry('Role', 'Reference standard'),
        entry('Lab Notes', 'kept as is'),
        entry('Solvent', 'ethanol'),
      ],
      'f',
    );
    expect(mapped.texts).toMatchObject({ sampleId: 'QS-1', solvent: 'ethanol' });
    expect(mapped.role).toBe('reference');
    expect(mapped.extra).toEqual({ 'Lab Notes': 'kept as is' });
  });

  it('keeps a key named __proto__ as an own entry', () => {
    const mapped = mapHeader([entry('__proto__', 'x')], 'f');
    expect(Object.keys(mapped.extra)).toEqual(['__proto__']);
  });

  it('rejects a numeric field that is not a number, naming the line', () => {
    expect(rejection(() => mapHeader([entry('excitation', 'blue', 7)], 'h.csv'))).toMatchObject({
      code: 'METADATA_INVALID',
      line: 7,
      file: 'h.csv',
    });
  });
});

describe('parseHeaderLine', () => {
  it.each([
    ['Solvent: water', ',', { key: 'Solvent', value: 'water' }],
    ['Solvent=water', ',', { key: 'Solvent', value: 'water' }],
    ['# excitation wavelength 350 nm', null, { key: 'excitation wavelength', value: '350 nm' }],
    ['% Sample QS-4', null, { key: 'Sample', value: 'QS-4' }],
    ['Ex slit,5,,', ',', { key: 'Ex slit', value: '5' }],
    ['Operator\tA. Nobody', '\t', { key: 'Operator', value: 'A. Nobody' }],
    ['Acquired: 2026-01-02T03:04:05Z', ',', { key: 'Acquired', value: '2026-01-02T03:04:05Z' }],
    ['just a title', null, { key: 'header line 3', value: 'just a title' }],
  ])('%j', (line, delimiter, expected) => {
    expect(parseHeaderLine(line, 3, delimiter)).toEqual({ ...expected, line: 3 });
  });
});
