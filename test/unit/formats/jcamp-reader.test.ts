// JCAMP-DX reading: fixtures (invented data encoded by an independent Python encoder) decoded and
// cross-checked against the reference library jcampconverter@10.0.2 (test-only dependency).
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { convert } from 'jcampconverter';
import { readData } from '../../../src/formats/index.js';
import { FIXTURES, fixture, bytes } from './helpers.js';

function reference(text: string): { x: number[]; y: number[] } {
  const data = convert(text).flatten[0]?.spectra[0]?.data;
  if (data?.['x'] === undefined || data['y'] === undefined) throw new Error('jcampconverter found no spectrum');
  return { x: data['x'], y: data['y'] };
}

function spectrumOf(content: Uint8Array, name = 'f.jdx') {
  const data = readData(content, { fileName: name });
  if (data.type !== 'spectrum') throw new Error('not a spectrum');
  return data;
}

describe('JCAMP-DX reader vs jcampconverter@10.0.2', () => {
  it.each(['emission-difdup.jdx', 'absorbance-affn.jdx', 'absorbance-sqz-micrometres.jdx'])(
    '%s decodes to the same points',
    (name) => {
      const text = readFileSync(`${FIXTURES}${name}`, 'utf8');
      const expected = reference(text);
      const { spectrum, layout } = spectrumOf(fixture(name), name);
      const factor = layout.conversions.some((c) => c.code === 'micrometre-to-nanometre') ? 1000 : 1;
      expect(spectrum.values.length).toBe(expected.y.length);
      expected.y.forEach((y, i) => expect(spectrum.values[i]).toBeCloseTo(y, 12));
      expected.x.forEach((x, i) => expect(spectrum.wavelengthNm[i]).toBeCloseTo(x * factor, 9));
    },
  );

  it('(XY..XY) pairs decode like the reference library (which reads them under ##PEAK TABLE, not ##XYPOINTS)', () => {
    const text = readFileSync(`${FIXTURES}transmittance-xypoints.jdx`, 'utf8')
      .replace('##XYPOINTS=', '##PEAK TABLE=')
      .replace('##YUNITS=TRANSMITTANCE', '##YUNITS=ABSORBANCE');
    const expected = reference(text);
    const { spectrum } = spectrumOf(bytes(text));
    // Our axis is converted to ascending nm (λ = 10⁷/ν̃), so compare in that form.
    const pairs = expected.x.map((x, i) => [1e7 / x, expected.y[i] as number] as const).sort((a, b) => a[0] - b[0]);
    pairs.forEach(([nm, y], i) => {
      expect(spectrum.wavelengthNm[i]).toBeCloseTo(nm, 9);
      expect(spectrum.values[i]).toBeCloseTo(y, 12);
    });
  });
});

describe('JCAMP-DX reader: units, kinds and metadata', () => {
  it('reads the DIFDUP emission with its Y-checks and maps ##$ labels through the vocabulary', () => {
    const { spectrum, layout } = spectrumOf(fixture('emission-difdup.jdx'));
    const expected = JSON.parse(readFileSync(`${FIXTURES}emission-difdup.expected.json`, 'utf8')) as { y: number[] };
    expect(Array.from(spectrum.values)).toEqual(expected.y); // the encoder's input (Python, test/fixtures)
    expect(spectrum.kind).toBe('emission');
    expect(spectrum.valueUnit).toBe('counts');
    expect(spectrum.metadata.excitationNm).toBe(380);
    expect(spectrum.metadata.extra['TITLE']).toBe('invented emission, DIFDUP compressed');
    expect(layout.jcamp?.version).toBe('4.24');
    expect([...(layout.jcamp?.compression ?? [])].sort()).toEqual(['DIF', 'DUP', 'SQZ']);
  });

  it('applies YFACTOR and reads ##PATH LENGTH as metadata', () => {
    const { spectrum } = spectrumOf(fixture('absorbance-affn.jdx'));
    expect(spectrum.kind).toBe('absorbance');
    expect(spectrum.values[0]).toBeCloseTo(0.03, 12); // 300 × YFACTOR 0.0001 (fixture line "200 300 …")
    expect(spectrum.metadata.pathLengthCm).toBe(1);
  });

  it('converts TRANSMITTANCE (fraction) on a 1/CM axis to absorbance on ascending nm', () => {
    const { spectrum, layout } = spectrumOf(fixture('transmittance-xypoints.jdx'));
    expect(spectrum.kind).toBe('absorbance');
    expect(layout.conversions.map((c) => c.code)).toEqual(['transmittance-to-absorbance', 'wavenumber-to-wavelength']);
    // Fixture first pair "4000, 0.89125": λ = 10⁷/4000 = 2500 nm, A = −log10(0.89125) (numpy 2.4: 0.050000457140078)
    expect(spectrum.wavelengthNm[0]).toBe(2500);
    expect(spectrum.values[0]).toBeCloseTo(0.050000457140078, 12);
  });

  it('ignores $$ comments and accepts labels with spaces, dashes and lower case', () => {
    const text =
      '##TITLE=c $$ comment\n##jcamp-dx=4.24 $$ v\n##X_UNITS=NANOMETERS\n##first x=500\n##LASTX=502\n##XY DATA=(X++(Y..Y)) $$ table\n500 1 2 3 $$ data\n##END=\n';
    const { spectrum } = spectrumOf(bytes(text));
    expect(Array.from(spectrum.wavelengthNm)).toEqual([500, 501, 502]);
    expect(Array.from(spectrum.values)).toEqual([1, 2, 3]);
  });
});
