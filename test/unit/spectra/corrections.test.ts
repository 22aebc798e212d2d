// Dark, blank, reference-channel and detector corrections, and the record each leaves behind.
import { describe, expect, it } from 'vitest';
import { InputRejected } from '../../../src/model/errors.js';
import { applyDetectorCorrection } from '../../../src/spectra/detector-correction.js';
import { hashSpectrumData } from '../../../src/spectra/correction-record.js';
import { subtractBlank } from '../../../src/spectra/blank.js';
import { subtractDark } from '../../../src/spectra/dark.js';
import { findReferenceChannel, normalizeByReferenceChannel } from '../../../src/spectra/reference-channel.js';
import { ramanPeakNm } from '../../../src/spectra/raman.js';
import { integrateIntensity } from '../../../src/spectra/metrics.js';
import { axisNm, gaussianBand, makeSpectrum } from './synthetic.js';

function codeOf(fn: () => unknown): string | undefined {
  try {
    fn();
  } catch (error) {
    return error instanceof InputRejected ? error.code : 'other';
  }
  return undefined;
}

describe('subtractDark', () => {
  it('subtracts a constant level or a dark spectrum scaled by integration time', () => {
    const sample = makeSpectrum('emission', [400, 401, 402], [110, 120, 130], { metadata: { integrationTimeS: 0.2 } });
    expect(Array.from(subtractDark(sample, 10).spectrum.values)).toEqual([100, 110, 120]);
    const dark = makeSpectrum('blank', [399, 403], [5, 5], { metadata: { integrationTimeS: 0.1 } });
    const result = subtractDark(sample, dark);
    expect(Array.from(result.spectrum.values)).toEqual([100, 110, 120]); // 2 × 5 by the time ratio 0.2/0.1
    expect(result.record.parameters['darkScale']).toBe(2);
    expect(result.record.inputs['dark']).toBe(hashSpectrumData(dark));
  });
});

describe('subtractBlank', () => {
  const excitationNm = 350;
  const axis = axisNm(370, 500, 0.5);
  const blankAxis = axisNm(360, 520, 1);
  // Solvent Raman band at the water position for 350 nm excitation (Bartlett et al. 1998) plus a flat background.
  const ramanNm = ramanPeakNm(excitationNm);
  const solvent = (x: readonly number[]): number[] => gaussianBand(x, 500, ramanNm, 3).map((v) => v + 20);
  const dye = gaussianBand(axis, 20000, 450, 20);

  it('interpolates the blank onto the sample axis and removes the solvent Raman band', () => {
    const sample = makeSpectrum(
      'emission',
      axis,
      dye.map((v, i) => v + (solvent(axis)[i] as number)),
      { metadata: { excitationNm } },
    );
    const blank = makeSpectrum('blank', blankAxis, solvent(blankAxis), { metadata: { excitationNm } });
    const { spectrum, record } = subtractBlank(sample, blank);
    const residual = Array.from(spectrum.values).map((v, i) => v - (dye[i] as number));
    // Linear interpolation of a σ = 3 nm band sampled every 1 nm leaves < 1.5 % of its 66-count peak.
    expect(Math.max(...residual.map(Math.abs))).toBeLessThan(1.0);
    expect(integrateIntensity(spectrum)).toBeCloseTo(integrateIntensity(makeSpectrum('emission', axis, dye)), -1);
    expect(record).toMatchObject({
      name: 'subtractBlank',
      parameters: { excitationToleranceNm: 1, blankExcitationNm: 350 },
    });
  });

  it('refuses a blank taken at another excitation, or warns when told to', () => {
    const sample = makeSpectrum('emission', axis, dye, { metadata: { excitationNm: 350 } });
    const blank = makeSpectrum('blank', blankAxis, solvent(blankAxis), { metadata: { excitationNm: 360 } });
    expect(codeOf(() => subtractBlank(sample, blank))).toBe('EXCITATION_MISMATCH');
    expect(subtractBlank(sample, blank, { onExcitationMismatch: 'warn' }).record.warnings[0]).toMatch(/360 nm/);
  });

  it('refuses to extrapolate a blank that does not cover the sample', () => {
    const sample = makeSpectrum('emission', axis, dye, { metadata: { excitationNm } });
    const shortBlank = makeSpectrum('blank', axisNm(380, 520, 1), solvent(axisNm(380, 520, 1)), {
      metadata: { excitationNm },
    });
    expect(codeOf(() => subtractBlank(sample, shortBlank))).toBe('AXIS_NOT_COVERED');
  });
});

describe('normalizeByReferenceChannel', () => {
  it('divides by the reference-detector column found by name', () => {
    const spectrum = makeSpectrum('emission', [400, 401, 402], [100, 200, 300], {
      otherColumns: { 'R1 (lamp)': [2, 4, 5] },
    });
    expect(findReferenceChannel(spectrum)).toBe('R1 (lamp)');
    const { spectrum: normalized, record } = normalizeByReferenceChannel(spectrum);
    expect(Array.from(normalized.values)).toEqual([50, 50, 60]);
    expect(normalized.valueUnit).toBe('a.u./ref');
    expect(record.parameters['referenceColumn']).toBe('R1 (lamp)');
    expect(codeOf(() => normalizeByReferenceChannel(makeSpectrum('emission', [1, 2], [1, 2])))).toBe('MISSING_COLUMN');
  });
});

describe('applyDetectorCorrection', () => {
  const curve = makeSpectrum('detector-correction', [350, 450, 550], [1, 2, 4], { valueUnit: 'factor' });

  it('multiplies by the linearly interpolated curve', () => {
    const spectrum = makeSpectrum('emission', [400, 450, 500], [10, 10, 10]);
    expect(Array.from(applyDetectorCorrection(spectrum, curve).spectrum.values)).toEqual([15, 20, 30]);
    expect(Array.from(applyDetectorCorrection(spectrum, curve, { curveMeaning: 'divide' }).spectrum.values)).toEqual([
      10 / 1.5,
      5,
      10 / 3,
    ]);
  });

  it('refuses to extrapolate outside the curve with a typed error', () => {
    const wide = makeSpectrum('emission', [340, 450, 500], [10, 10, 10]);
    expect(codeOf(() => applyDetectorCorrection(wide, curve))).toBe('AXIS_NOT_COVERED');
  });
});

describe('option resolution', () => {
  it('rejects unknown or invalid options with ConfigInvalid naming the config path', () => {
    const sample = makeSpectrum('emission', [400, 401], [1, 2], { metadata: { excitationNm: 350 } });
    expect(() => subtractBlank(sample, sample, { excitationToleranceNm: -1 })).toThrow(
      /Too small|>=0|nonnegative|expected/i,
    );
    try {
      subtractBlank(sample, sample, { excitationToleranceNm: -1 });
    } catch (error) {
      expect((error as { configPath?: string }).configPath).toBe('corrections.blank.excitationToleranceNm');
    }
  });
});

describe('hashSpectrumData', () => {
  it('depends on the data, not on metadata', () => {
    const a = makeSpectrum('emission', [1, 2], [3, 4], { metadata: { sampleId: 'a' } });
    const b = makeSpectrum('emission', [1, 2], [3, 4], { metadata: { sampleId: 'b' } });
    const c = makeSpectrum('emission', [1, 2], [3, 5]);
    expect(hashSpectrumData(a)).toBe(hashSpectrumData(b));
    expect(hashSpectrumData(a)).not.toBe(hashSpectrumData(c));
  });
});

describe('detector curve direction (issue 15 item 5)', () => {
  // Round trip (exact by construction): a known emission E(λ) seen through a known relative response R(λ) is M = E·R;
  // correcting M with R (divide) or with the factors 1/R (multiply) must give E back.
  const axis = Array.from({ length: 201 }, (_u, i) => 400 + i);
  const emission = axis.map((nm) => 1000 * Math.exp(-((nm - 500) ** 2) / (2 * 25 ** 2)));
  const response = axis.map((nm) => 0.2 + 0.8 * Math.exp(-((nm - 450) ** 2) / (2 * 120 ** 2)));
  const measured = makeSpectrum(
    'emission',
    axis,
    emission.map((e, i) => e * (response[i] as number)),
  );

  it('divides by a curve whose column says relative response, and multiplies by one that says correction factor', () => {
    const responseCurve = makeSpectrum('detector-correction', axis, response, { valueColumn: 'relative response' });
    const factorCurve = makeSpectrum(
      'detector-correction',
      axis,
      response.map((r) => 1 / r),
      { valueColumn: 'correction factor' },
    );
    for (const curve of [responseCurve, factorCurve]) {
      const done = applyDetectorCorrection(measured, curve);
      done.spectrum.values.forEach((v, i) => expect(v).toBeCloseTo(emission[i] as number, 9));
    }
    expect(applyDetectorCorrection(measured, responseCurve).record.parameters['curveMeaning']).toBe('divide');
    expect(applyDetectorCorrection(measured, responseCurve).record.parameters['curveMeaningFrom']).toBe(
      'value column "relative response"',
    );
  });

  it('reads "sensitivity" in the unit or a header entry as a response', () => {
    const byUnit = makeSpectrum('detector-correction', axis, response, {
      valueUnit: 'sensitivity (a.u.)',
      valueColumn: 'value',
    });
    const byHeader = makeSpectrum('detector-correction', axis, response, {
      valueColumn: 'value',
      metadata: { extra: { 'curve type': 'detector sensitivity' } },
    });
    for (const curve of [byUnit, byHeader])
      applyDetectorCorrection(measured, curve).spectrum.values.forEach((v, i) =>
        expect(v).toBeCloseTo(emission[i] as number, 9),
      );
  });

  it('refuses a curve that does not say what it holds, with a hint naming the option, and obeys the explicit option', () => {
    const silent = makeSpectrum('detector-correction', axis, response, { valueColumn: 'value', valueUnit: 'a.u.' });
    expect(codeOf(() => applyDetectorCorrection(measured, silent))).toBe('INPUT_INVALID');
    expect(() => applyDetectorCorrection(measured, silent)).toThrow(/does not say whether it holds correction factors/);
    try {
      applyDetectorCorrection(measured, silent);
    } catch (error) {
      expect((error as { hint: string }).hint).toContain('instrument.detectorCurveMeaning');
    }
    applyDetectorCorrection(measured, silent, { curveMeaning: 'divide' }).spectrum.values.forEach((v, i) =>
      expect(v).toBeCloseTo(emission[i] as number, 9),
    );
  });
});
