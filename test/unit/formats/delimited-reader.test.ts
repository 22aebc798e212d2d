// The delimited-text reader on fixtures in many layouts. Expected numbers are read off the fixture
// text itself (test/fixtures/formats/*); converted values were computed independently with numpy 2.4.
import { describe, expect, it } from 'vitest';
import { readData } from '../../../src/formats/index.js';
import { fixture, bytes } from './helpers.js';

function spectrumOf(
  name: string,
  options: { valueColumn?: string | number; kindHint?: 'emission' | 'absorbance' } = {},
) {
  const data = readData(fixture(name), { fileName: name, ...options });
  if (data.type !== 'spectrum') throw new Error(`${name} read as ${data.type}`);
  return data;
}

function decayOf(name: string) {
  const data = readData(fixture(name), { fileName: name });
  if (data.type !== 'decay') throw new Error(`${name} read as ${data.type}`);
  return data;
}

describe('delimited reader: spectra', () => {
  it('reads a CSV emission export with a mixed header block (key: value, key=value, # key value, key,value)', () => {
    const { spectrum, layout } = spectrumOf('emission-header.csv');
    expect(spectrum.kind).toBe('emission');
    expect(spectrum.wavelengthNm.length).toBe(41);
    // First data row in the fixture: "400,103.8,46.9"
    expect(spectrum.wavelengthNm[0]).toBe(400);
    expect(spectrum.values[0]).toBe(103.8);
    expect(spectrum.valueColumn).toBe('Emission (cps)');
    expect(spectrum.valueUnit).toBe('cps');
    expect(Object.keys(spectrum.otherColumns)).toEqual(['Reference (cps)']);
    expect(spectrum.otherColumns['Reference (cps)']?.[0]).toBe(46.9);
    expect(spectrum.metadata).toMatchObject({
      sampleId: 'QS-0412',
      solvent: '0.1 M HClO4',
      excitationNm: 350,
      excitationSlitNm: 5,
      emissionSlitNm: 2.5,
      integrationTimeS: 0.1,
      role: 'control',
      acquiredAt: '2026-03-14T09:26:53Z',
    });
    // 298.15 K − 273.15 = 25 °C (SI definition of the Celsius scale)
    expect(spectrum.metadata.temperatureC).toBeCloseTo(25, 10);
    expect(spectrum.metadata.extra).toEqual({
      'header line 1': 'Instrument export (invented example)',
      Operator: 'J. Placeholder',
    });
    expect(layout).toMatchObject({
      format: 'delimited',
      delimiter: ',',
      decimalMark: '.',
      headerLineCount: 13,
      axisUnitFound: 'nm',
      conversions: [],
    });
  });

  it('reads a TSV with decimal comma, UTF-8 BOM and CRLF line ends', () => {
    const { spectrum, layout } = spectrumOf('excitation-decimal-comma.tsv');
    expect(layout).toMatchObject({
      delimiter: '\t',
      decimalMark: ',',
      hasBom: true,
      lineEnding: 'crlf',
      headerLineCount: 3,
    });
    expect(spectrum.kind).toBe('excitation');
    expect(spectrum.metadata.emissionNm).toBe(520);
    // Fixture rows "502,5\t...": 502.5 nm
    expect(spectrum.wavelengthNm[1]).toBe(502.5);
    expect(spectrum.wavelengthNm.length).toBe(21);
  });

  it('reverses a descending axis (semicolon, decimal comma, bracketed unit)', () => {
    const { spectrum, layout } = spectrumOf('absorbance-semicolon-descending.csv');
    expect(layout.conversions.map((c) => c.code)).toEqual(['axis-reversed']);
    expect(spectrum.wavelengthNm[0]).toBe(400);
    expect(spectrum.wavelengthNm[15]).toBe(700);
    // Fixture row "400;0,4495" becomes the first point after reversal
    expect(spectrum.values[0]).toBe(0.4495);
    expect(spectrum.kind).toBe('absorbance');
    expect(spectrum.metadata.pathLengthCm).toBe(1);
  });

  it('converts %T to absorbance, A = 2 − log10(%T)', () => {
    const { spectrum, layout } = spectrumOf('percent-t.txt');
    expect(spectrum.kind).toBe('absorbance');
    expect(spectrum.valueUnit).toBe('absorbance');
    expect(layout.conversions.map((c) => c.code)).toEqual(['percent-transmittance-to-absorbance']);
    // numpy 2.4: 2 - np.log10(88.902) = 0.05108846873514561; 2 - np.log10(78.613) = 0.1045056300239251
    expect(spectrum.values[0]).toBeCloseTo(0.05108846873514561, 13);
    expect(spectrum.values[1]).toBeCloseTo(0.1045056300239251, 13);
  });

  it('converts a wavenumber axis to nm with the Jacobian for emission (Mooney & Kambhampati 2013)', () => {
    const { spectrum, layout } = spectrumOf('emission-wavenumber.csv');
    expect(layout.conversions.map((c) => c.code)).toEqual([
      'wavenumber-to-wavelength',
      'jacobian-intensity',
      'axis-reversed',
    ]);
    // numpy 2.4: λ = 1e7/23000 = 434.7826086956522, I = 0.7576·1e7/λ² = 40.077040000000004
    expect(spectrum.wavelengthNm[0]).toBeCloseTo(434.7826086956522, 10);
    expect(spectrum.values[0]).toBeCloseTo(40.077040000000004, 10);
    // numpy 2.4: λ = 1e7/18000 = 555.5555555555555, I = 0.7576·1e7/λ² = 24.546240000000004
    expect(spectrum.wavelengthNm[25]).toBeCloseTo(555.5555555555555, 10);
    expect(spectrum.values[25]).toBeCloseTo(24.546240000000004, 10);
    expect(spectrum.metadata.excitationNm).toBe(420);
  });

  it('converts an energy axis (eV) with hc = 1239.84198 eV·nm and the Jacobian', () => {
    const { spectrum, layout } = spectrumOf('emission-energy.dat');
    expect(layout.delimiter).toBe('whitespace');
    // numpy 2.4: λ = 1239.84198/3.0 = 413.28065999999995; I = 4e-5·1239.84198/λ² = 2.9035958275908687e-07
    expect(spectrum.wavelengthNm[0]).toBeCloseTo(413.28065999999995, 10);
    expect(spectrum.values[0]).toBeCloseTo(2.9035958275908687e-7, 18);
  });

  it('merges a units row under the column names, and reads a correction-factor kind', () => {
    const { spectrum, layout } = spectrumOf('units-row.csv');
    expect(layout.columnNames).toEqual(['Wavelength (nm)', 'Correction factor (factor)', 'Lamp (a.u.)']);
    expect(spectrum.kind).toBe('detector-correction');
    expect(spectrum.valueUnit).toBe('factor');
  });

  it('chooses the value column by name or by 1-based column number', () => {
    expect(spectrumOf('emission-header.csv', { valueColumn: 'reference (cps)' }).spectrum.values[0]).toBe(46.9);
    expect(spectrumOf('emission-header.csv', { valueColumn: 3 }).spectrum.valueColumn).toBe('Reference (cps)');
  });

  it('absorbance values convert only the x axis (no Jacobian) on a wavenumber axis', () => {
    const text = 'wavenumber (cm-1),absorbance\n20000,0.5\n25000,0.25\n';
    const data = readData(bytes(text), { fileName: 'a.csv' });
    if (data.type !== 'spectrum') throw new Error('not a spectrum');
    // 1e7/25000 = 400 nm and 1e7/20000 = 500 nm (exact)
    expect(Array.from(data.spectrum.wavelengthNm)).toEqual([400, 500]);
    expect(Array.from(data.spectrum.values)).toEqual([0.25, 0.5]);
  });

  it('takes a headerless two-column file in 100–3000 as nm and says so', () => {
    const data = readData(bytes('350 1\n351 2\n352 3\n'), { fileName: 'plain.txt' });
    expect(data.layout.conversions[0]?.code).toBe('axis-unit-assumed');
    expect(data.type).toBe('spectrum');
  });

  it('reads quoted numbers and quoted column names (RFC 4180 style CSV)', () => {
    const text = '"Wavelength (nm)","Emission, corrected"\n"400","1.5"\n"401", "2.5"\n402,3.5\n"403","4.5"\n';
    const data = readData(bytes(text), { fileName: 'q.csv' });
    if (data.type !== 'spectrum') throw new Error('not a spectrum');
    expect(Array.from(data.spectrum.values)).toEqual([1.5, 2.5, 3.5, 4.5]);
    expect(data.spectrum.valueColumn).toBe('Emission, corrected');
  });

  it('reads a decay from JCAMP-DX with a time axis', () => {
    const text =
      '##TITLE=d\n##JCAMP-DX=5.01\n##XUNITS=NANOSECONDS\n##YUNITS=COUNTS\n##FIRSTX=0\n##LASTX=0.3\n##NPOINTS=4\n##XYDATA=(X++(Y..Y))\n0 9 7 4 2\n##END=\n';
    const data = readData(bytes(text), { fileName: 'd.jdx' });
    expect(data.type === 'decay' && Array.from(data.decay.counts)).toEqual([9, 7, 4, 2]);
  });

  it('uses the kind hint when the content names no kind', () => {
    const data = readData(bytes('wavelength (nm),value\n300,0.1\n301,0.2\n'), {
      fileName: 'h.csv',
      kindHint: 'absorbance',
    });
    expect(data.type === 'spectrum' && data.spectrum.kind).toBe('absorbance');
  });
});

describe('delimited reader: decays', () => {
  it('reads a whitespace decay with an IRF column in ps and a "# key value" header', () => {
    const { decay, layout } = decayOf('decay-irf-ps.txt');
    expect(decay.timeNs.length).toBe(64);
    // Fixture row "    50      10      7": 50 ps = 0.05 ns
    expect(decay.timeNs[1]).toBe(0.05);
    expect(decay.channelWidthNs).toBe(0.05);
    expect(decay.irfCounts?.length).toBe(64);
    expect(layout.conversions.map((c) => c.code)).toEqual(['time-unit-to-ns']);
    expect(layout).toMatchObject({ valueColumn: 'counts', irfColumn: 'irf' });
    expect(decay.metadata).toMatchObject({
      excitationNm: 405,
      emissionNm: 520,
      repetitionRateHz: 20e6,
      sampleId: 'DYE-A',
    });
  });

  it('reads channel numbers with a channel width in ps and a count rate in kcps', () => {
    const { decay } = decayOf('decay-channels.csv');
    expect(decay.channelWidthNs).toBe(0.025);
    expect(decay.timeNs[4]).toBe(0.1); // channel 4 × 0.025 ns
    expect(decay.counts[0]).toBe(3005);
    expect(decay.metadata.countRatePerS).toBe(12500);
  });

  it('reads a phosphorescence decay in ms from a Latin-1 file', () => {
    const { decay, layout } = decayOf('phosphorescence-ms-latin1.csv');
    expect(layout.encoding).toBe('latin1');
    expect(decay.channelWidthNs).toBe(5e5); // 0.5 ms = 5·10⁵ ns
    expect(decay.metadata.extra['Comment']).toBe('frozen glass at °C scale');
  });

  it('reverses a descending µs axis', () => {
    const { decay, layout } = decayOf('decay-us-descending.txt');
    expect(layout.conversions.map((c) => c.code)).toEqual(['time-unit-to-ns', 'axis-reversed']);
    expect(decay.timeNs[0]).toBe(0);
    expect(decay.timeNs[15]).toBe(3000);
  });

  it('keeps columns it does not use out of the decay and lists them', () => {
    const text = 'time (ns),counts,fit,residual\n0,5,4.5,0.2\n0.1,9,9.2,-0.1\n0.2,7,7.1,0\n0.3,3,3.3,-0.2\n';
    const data = readData(bytes(text), { fileName: 'fit.csv' });
    expect(data.layout.ignoredColumns).toEqual(['fit', 'residual']);
  });
});
