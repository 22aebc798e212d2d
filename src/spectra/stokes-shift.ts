// Stokes shift in wavenumbers between the absorbance maximum and the emission maximum.
import type { Spectrum } from '../model/spectrum.js';
import { findPeak } from './metrics.js';

/** Δν̃ = 1e7/λ_abs,max − 1e7/λ_em,max in cm⁻¹ (maxima by local parabola); IUPAC Gold Book "Stokes shift". */
export function stokesShift(
  absorbance: Spectrum,
  emission: Spectrum,
): { absorbanceMaxNm: number; emissionMaxNm: number; stokesShiftPerCm: number } {
  const absorbanceMaxNm = findPeak(absorbance.wavelengthNm, absorbance.values).wavelengthNm;
  const emissionMaxNm = findPeak(emission.wavelengthNm, emission.values).wavelengthNm;
  return { absorbanceMaxNm, emissionMaxNm, stokesShiftPerCm: 1e7 / absorbanceMaxNm - 1e7 / emissionMaxNm };
}
