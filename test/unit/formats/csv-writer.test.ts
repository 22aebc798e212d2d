// CSV writers: what they write reads back through readData to the same numbers and metadata
// (exact: numbers use ECMAScript's shortest round-trip text, ECMA-262 Number::toString).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { readData, writeDecayCsv, writeSpectrumCsv } from '../../../src/formats/index.js';
import { createDecay } from '../../../src/model/index.js';
import { decayArbitrary, spectrumArbitrary } from './arbitraries.js';
import { bytes, rejection } from './helpers.js';

describe('writeSpectrumCsv', () => {
  it('round-trips random spectra exactly (fast-check, 150 runs)', () => {
    fc.assert(
      fc.property(spectrumArbitrary(), (spectrum) => {
        const back = readData(bytes(writeSpectrumCsv(spectrum)), { fileName: 'round.csv' });
        expect(back.type).toBe('spectrum');
        if (back.type !== 'spectrum') return;
        expect(back.spectrum).toEqual(spectrum);
      }),
      { numRuns: 150 },
    );
  });

  it('writes a header block, the column names and one row per point', () => {
    const text = writeSpectrumCsv(readSample());
    expect(text.split('\n').slice(0, 4)).toEqual([
      '# kind: emission',
      '# value column: signal',
      '# value unit: a.u.',
      '# excitation wavelength (nm): 350',
    ]);
    expect(text).toContain('wavelength (nm),signal\n400,1\n401,2.5\n');
  });
});

function readSample() {
  const data = readData(bytes('Excitation: 350\nwavelength (nm),signal\n400,1\n401,2.5\n'), { fileName: 's.csv' });
  if (data.type !== 'spectrum') throw new Error('not a spectrum');
  return data.spectrum;
}

describe('writeDecayCsv', () => {
  it('round-trips random decays exactly, with extra columns listed as ignored (fast-check, 150 runs)', () => {
    fc.assert(
      fc.property(decayArbitrary(), (decay) => {
        const fit = Array.from(decay.counts, (count) => count * 0.5 - 1);
        const back = readData(bytes(writeDecayCsv(decay, { fit })), { fileName: 'round.csv' });
        expect(back.type).toBe('decay');
        if (back.type !== 'decay') return;
        expect(back.decay).toEqual(decay);
        expect(back.layout.ignoredColumns).toEqual(['fit']);
      }),
      { numRuns: 150 },
    );
  });

  it('refuses extra columns that would read back as counts or IRF, or that do not fit', () => {
    const decay = createDecay({ timeNs: [0, 1, 2, 3], counts: [1, 2, 3, 4] });
    expect(rejection(() => writeDecayCsv(decay, { 'IRF copy': [1, 2, 3, 4] })).code).toBe('INPUT_INVALID');
    expect(rejection(() => writeDecayCsv(decay, { fit: [1, 2] })).code).toBe('LENGTH_MISMATCH');
    expect(rejection(() => writeDecayCsv(decay, { fit: [1, Number.NaN, 2, 3] })).code).toBe('NON_FINITE');
  });
});
