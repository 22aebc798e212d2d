// Wavelength → energy / wavenumber conversion with the Jacobian (Mooney & Kambhampati, J. Phys. Chem. Lett. 4, 3316 (2013)).
import { describe, expect, it } from 'vitest';
import { toEnergyScale, toWavenumberScale } from '../../../src/spectra/energy-scale.js';
import { trapezoid } from '../../../src/spectra/integrate.js';
import { axisNm, gaussianBand, makeSpectrum } from './synthetic.js';

describe('toEnergyScale / toWavenumberScale', () => {
  const axis = axisNm(400, 700, 0.25);
  const emission = makeSpectrum('emission', axis, gaussianBand(axis, 1000, 520, 25));

  it('conserves the band area: ∫I(E)dE = ∫I(λ)dλ with I(E) = I(λ)·λ²/hc', () => {
    const { spectrum } = toEnergyScale(emission);
    expect(spectrum.axisValues[0]).toBeCloseTo(1239.84198 / 700, 12); // hc = 1239.84198 eV·nm (CODATA)
    expect(
      trapezoid(spectrum.axisValues, spectrum.values) / trapezoid(emission.wavelengthNm, emission.values),
    ).toBeCloseTo(1, 4);
    expect(spectrum.jacobianApplied).toBe(true);
  });

  it('uses ν̃ = 1e7/λ and λ²/1e7 for wavenumbers, and converts absorbance on the axis only', () => {
    const { spectrum, record } = toWavenumberScale(emission);
    expect(spectrum.axisValues[spectrum.axisValues.length - 1]).toBeCloseTo(25000, 9);
    expect(trapezoid(spectrum.axisValues, spectrum.values) / 1000).toBeCloseTo(1, 4);
    expect(record.name).toBe('toWavenumberScale');
    const absorbance = makeSpectrum('absorbance', [400, 500], [0.1, 0.2]);
    expect(Array.from(toWavenumberScale(absorbance).spectrum.values)).toEqual([0.2, 0.1]);
  });
});
