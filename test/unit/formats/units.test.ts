// Axis-unit recognition from column names and unit labels (SI symbols and the trade's spellings).
import { describe, expect, it } from 'vitest';
import { lookupAxisUnit, readAxisName, splitNameAndUnit } from '../../../src/formats/units.js';

describe('axis units', () => {
  // Factors to the model unit follow the SI prefixes (BIPM SI Brochure, 9th ed.).
  it.each([
    ['nm', 'wavelength', 1],
    ['NANOMETERS', 'wavelength', 1],
    ['µm', 'wavelength', 1000],
    ['MICROMETERS', 'wavelength', 1000],
    ['cm-1', 'wavenumber', 1],
    ['cm⁻¹', 'wavenumber', 1],
    ['1/CM', 'wavenumber', 1],
    ['eV', 'energy', 1],
    ['ps', 'time', 1e-3],
    ['ns', 'time', 1],
    ['μs', 'time', 1e3],
    ['us', 'time', 1e3],
    ['ms', 'time', 1e6],
    ['s', 'time', 1e9],
    ['SECONDS', 'time', 1e9],
    ['channel', 'channel', 1],
  ])('%s is a %s unit with factor %d', (label, quantity, factor) => {
    expect(lookupAxisUnit(label)).toMatchObject({ quantity, toModelFactor: factor });
  });

  it.each([
    ['Wavelength (nm)', 'Wavelength', 'nm'],
    ['time [ps]', 'time', 'ps'],
    ['t/ns', 't', 'ns'],
    ['Wavenumber / cm-1', 'Wavenumber', 'cm-1'],
    ['Time ns', 'Time', 'ns'],
    ['Intensity (a.u.)', 'Intensity', 'a.u.'],
    ['counts', 'counts', null],
  ])('splits %j', (name, base, unit) => {
    expect(splitNameAndUnit(name)).toEqual({ base, unitLabel: unit });
  });

  it('gives name defaults and flags them as assumed', () => {
    expect(readAxisName('Wavelength')).toMatchObject({ assumed: true, unit: { symbol: 'nm' } });
    expect(readAxisName('time')).toMatchObject({ looksLikeAxis: true, unit: undefined });
    expect(readAxisName('wavelength (furlongs)')).toMatchObject({ unitLabel: 'furlongs', unit: undefined });
  });
});
