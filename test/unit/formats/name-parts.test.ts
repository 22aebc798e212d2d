// Names read by their parts (issue 18): column names and header keys are split into words and a
// trailing unit whatever the separator or case. The table holds the spellings the issue lists;
// the property generates spellings of every vocabulary entry (separator × case × unit form × key/value
// separator) and checks each gives the same typed value as the plain "key (unit): value" line.
// Unit factors are SI prefix definitions (BIPM SI Brochure, 9th ed.); K → °C subtracts 273.15.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { mapHeader, VOCABULARY, type MetadataField } from '../../../src/formats/metadata-vocabulary.js';
import { parseHeaderLine } from '../../../src/formats/header-lines.js';
import { readAxisName } from '../../../src/formats/units.js';
import { readConcentrationName } from '../../../src/formats/index.js';

function mapLine(line: string, delimiter: string | null = null): ReturnType<typeof mapHeader> {
  const entry = parseHeaderLine(line, 1, delimiter);
  if (entry === null) throw new Error(`no entry from ${line}`);
  return mapHeader([entry], 'names.txt');
}

describe('column names by their parts', () => {
  it.each([
    ['time_ns', 'time', 1],
    ['timeNs', 'time', 1],
    ['TIME_PS', 'time', 1e-3],
    ['Time (ns)', 'time', 1],
    ['time in ns', 'time', 1],
    ['time-ps', 'time', 1e-3],
    ['t [µs]', 'time', 1e3],
    ['wl_nm', 'wavelength', 1],
    ['lambdaNm', 'wavelength', 1],
    ['WAVELENGTH_NM', 'wavelength', 1],
    ['wavenumber_cm-1', 'wavenumber', 1],
    ['Wavenumber (cm⁻¹)', 'wavenumber', 1],
    ['Raman shift (cm⁻¹)', 'raman-shift', 1],
    ['raman_shift_cm-1', 'raman-shift', 1],
    ['energy_eV', 'energy', 1],
  ])('%s → %s', (name, quantity, factor) => {
    const reading = readAxisName(name);
    expect(reading.unit?.quantity).toBe(quantity);
    expect(reading.unit?.toModelFactor).toBe(factor);
    expect(reading.looksLikeAxis).toBe(true);
  });

  it('does not take a word that merely ends a value-column name for a unit', () => {
    expect(readAxisName('sample C').unit).toBeUndefined();
    expect(readAxisName('sample A').looksLikeAxis).toBe(false);
    expect(readAxisName('photon counts').unit).toBeUndefined();
  });

  it.each([
    ['[KI] (mM)', 'KI', 1e-3],
    ['acrylamide (µM)', 'acrylamide', 1e-6],
    ['quencher_M', 'quencher', 1],
    ['[Q] / uM', 'Q', 1e-6],
    ['c (mol/L)', 'c', 1],
    ['iodide [nM]', 'iodide', 1e-9],
  ])('concentration %s → %s × %s M', (name, species, factor) => {
    expect(readConcentrationName(name)).toEqual({ species, unit: expect.any(String) as string, toMolar: factor });
  });

  it('keeps millimetres and molar apart (case matters for M)', () => {
    expect(readConcentrationName('path (mm)')).toBeUndefined();
    expect(readConcentrationName('[KI]')).toBeUndefined();
  });
});

describe('header keys by their parts', () => {
  it.each([
    ['channel_width_ps: 12.2', 'channelWidthNs', 0.0122],
    ['ChannelWidth=0.0122 ns', 'channelWidthNs', 0.0122],
    ['Resolution: 0.0122 ns', 'channelWidthNs', 0.0122],
    ['Resolution [ps],12.2', 'channelWidthNs', 0.0122],
    ['ExcWavelength=350', 'excitationNm', 350],
    ['Excitation_Wavelength_nm,365', 'excitationNm', 365],
    ['TEMP_K: 298.15', 'temperatureC', 25],
    ['repRateMHz = 40', 'repetitionRateHz', 40e6],
  ])('%s', (line, field, value) => {
    const number = mapLine(line).numbers[field as MetadataField];
    expect(number).toBeCloseTo(value, 12);
  });

  it('reads "SampleName=" (empty) as no sample id, kept verbatim', () => {
    const mapped = mapLine('SampleName=');
    expect(mapped.texts.sampleId).toBeUndefined();
    expect(mapped.extra).toEqual({ SampleName: '' });
  });

  it('keeps "Resolution" without a time unit (a spectral resolution) as an extra entry', () => {
    const mapped = mapLine('Resolution: 1 nm');
    expect(mapped.numbers.channelWidthNs).toBeUndefined();
    expect(mapped.extra).toEqual({ Resolution: '1 nm' });
  });

  it('treats [Header] / [Data] section lines and rows of empty cells as structure', () => {
    expect(parseHeaderLine('[Header]', 1, null)).toBeNull();
    expect(parseHeaderLine('  [Data]  ', 2, ',')).toBeNull();
    expect(parseHeaderLine(',,,,', 3, ',')).toBeNull();
  });
});

/** One unit per quantity with its factor to the field's unit (SI prefixes; K offset). */
const UNIT_FOR: Readonly<Record<string, { unit: string; convert: (value: number) => number }>> = {
  'wavelength-nm': { unit: 'nm', convert: (v) => v },
  'time-s': { unit: 'ms', convert: (v) => v * 1e-3 },
  'time-ns': { unit: 'ps', convert: (v) => v * 1e-3 },
  'length-cm': { unit: 'mm', convert: (v) => v * 0.1 },
  'temperature-c': { unit: 'K', convert: (v) => v - 273.15 },
  'frequency-hz': { unit: 'MHz', convert: (v) => v * 1e6 },
  'rate-per-s': { unit: 'kcps', convert: (v) => v * 1e3 },
};

type WordStyle = 'spaced' | 'snake' | 'upper-snake' | 'camel' | 'pascal' | 'kebab' | 'dotted';
type UnitForm = 'paren' | 'bracket' | 'snake' | 'in' | 'slash' | 'glued' | 'value';

function spell(words: readonly string[], style: WordStyle): string {
  const cap = (word: string) => word.charAt(0).toUpperCase() + word.slice(1);
  switch (style) {
    case 'spaced':
      return words.map(cap).join(' ');
    case 'snake':
      return words.join('_');
    case 'upper-snake':
      return words.join('_').toUpperCase();
    case 'camel':
      return words.map((word, i) => (i === 0 ? word : cap(word))).join('');
    case 'pascal':
      return words.map(cap).join('');
    case 'kebab':
      return words.join('-');
    case 'dotted':
      return words.join('.');
  }
}

function withUnit(key: string, style: WordStyle, unit: string, form: UnitForm): string {
  switch (form) {
    case 'paren':
      return `${key} (${unit})`;
    case 'bracket':
      return `${key} [${unit}]`;
    case 'snake':
      return `${key}_${style === 'upper-snake' ? unit.toUpperCase() : unit}`;
    case 'in':
      return `${key} in ${unit}`;
    case 'slash':
      return `${key}/${unit}`;
    case 'glued':
      return style === 'camel' || style === 'pascal'
        ? `${key}${unit.charAt(0).toUpperCase()}${unit.slice(1)}`
        : `${key}_${unit}`;
    case 'value':
      return key;
  }
}

const spellings = VOCABULARY.flatMap((row) =>
  row.keys.filter((key) => !/per channel$/.test(key)).map((key) => ({ row, words: key.split(' ') })),
);

describe('every vocabulary entry, however spelled (property)', () => {
  it('gives the same typed value for every spelling (fast-check)', () => {
    const arbitrary = fc.record({
      index: fc.nat({ max: spellings.length - 1 }),
      style: fc.constantFrom<WordStyle>('spaced', 'snake', 'upper-snake', 'camel', 'pascal', 'kebab', 'dotted'),
      form: fc.constantFrom<UnitForm>('paren', 'bracket', 'snake', 'in', 'slash', 'glued', 'value'),
      separator: fc.constantFrom(': ', '=', ' = ', '\t', ','),
      magnitude: fc.integer({ min: 1, max: 99_999 }),
    });
    fc.assert(
      fc.property(arbitrary, ({ index, style, form, separator, magnitude }) => {
        const { row, words } = spellings[index] as (typeof spellings)[number];
        const key = spell(words, style);
        const number = magnitude / 10;
        if (row.quantity === 'text') {
          const value = row.field === 'role' ? 'control' : row.field === 'kind' ? 'emission' : `T-${magnitude}`;
          const mapped = mapLine(`${key}${separator}${value}`);
          if (row.field === 'role') expect(mapped.role).toBe('control');
          else expect(mapped.texts[row.field]).toBe(value);
          return;
        }
        const { unit, convert } = UNIT_FOR[row.quantity] as { unit: string; convert: (v: number) => number };
        const line =
          form === 'value'
            ? `${key}${separator}${number} ${unit}`
            : `${withUnit(key, style, unit, form)}${separator}${number}`;
        const plain = mapLine(`${row.keys[0] ?? ''} (${unit}): ${number}`).numbers[row.field];
        const mapped = mapLine(line).numbers[row.field];
        expect(mapped, line).toBeCloseTo(convert(number), 9);
        expect(mapped, line).toBe(plain);
      }),
      { numRuns: 2000 },
    );
  });
});
