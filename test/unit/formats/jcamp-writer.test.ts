// JCAMP-DX writer: reads back through readData (value column and metadata exact; other columns are
// not written; TITLE/ORIGIN/OWNER come back in metadata.extra), and the reference library
// jcampconverter@10.0.2 decodes the same points from what we write.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { convert } from 'jcampconverter';
import { readData, writeSpectrumJcamp } from '../../../src/formats/index.js';
import type { Spectrum } from '../../../src/model/index.js';
import { spectrumArbitrary } from './arbitraries.js';
import { bytes } from './helpers.js';

function expectRoundTrip(spectrum: Spectrum): void {
  const text = writeSpectrumJcamp(spectrum);
  const back = readData(bytes(text), { fileName: 'round.jdx' });
  expect(back.type).toBe('spectrum');
  if (back.type !== 'spectrum') return;
  const { TITLE, ORIGIN, OWNER, ...extra } = back.spectrum.metadata.extra;
  expect([TITLE, ORIGIN, OWNER]).toEqual(['driftlight spectrum', 'driftlight', 'unspecified']);
  expect({ ...back.spectrum, otherColumns: {}, metadata: { ...back.spectrum.metadata, extra } }).toEqual({
    ...spectrum,
    otherColumns: {},
  });
  for (const line of text.split('\n')) expect(line.length).toBeLessThanOrEqual(80);
}

describe('writeSpectrumJcamp', () => {
  it('round-trips random uniform-axis spectra through ##XYDATA (fast-check, 100 runs)', () => {
    fc.assert(
      fc.property(spectrumArbitrary({ uniform: true, otherColumns: false, plainValues: true }), (spectrum) => {
        expect(writeSpectrumJcamp(spectrum)).toContain('##XYDATA=(X++(Y..Y))');
        expectRoundTrip(spectrum);
      }),
      { numRuns: 100 },
    );
  });

  it('round-trips random irregular-axis spectra through ##XYPOINTS (fast-check, 100 runs)', () => {
    fc.assert(
      fc.property(spectrumArbitrary({ otherColumns: false }), (spectrum) => expectRoundTrip(spectrum)),
      { numRuns: 100 },
    );
  });

  it('writes what jcampconverter@10.0.2 decodes to the same points (uniform axis, values without exponents)', () => {
    fc.assert(
      fc.property(spectrumArbitrary({ uniform: true, otherColumns: false, plainValues: true }), (spectrum) => {
        expect(writeSpectrumJcamp(spectrum)).toContain('##XYDATA=(X++(Y..Y))');
        const data = convert(writeSpectrumJcamp(spectrum)).flatten[0]?.spectra[0]?.data;
        const x = data?.['x'] ?? [];
        const y = data?.['y'] ?? [];
        expect(y.length).toBe(spectrum.values.length);
        y.forEach((value, i) =>
          expect(
            Object.is(value + 0, (spectrum.values[i] as number) + 0) ||
              Math.abs(value - (spectrum.values[i] as number)) <= 1e-12 * Math.abs(value),
          ).toBe(true),
        );
        x.forEach((value, i) => expect(value).toBeCloseTo(spectrum.wavelengthNm[i] as number, 6));
      }),
      { numRuns: 50 },
    );
  });
});
