// Wavelength → energy (eV) or wavenumber (cm⁻¹) axis, with the Jacobian for spectral densities
// (Mooney & Kambhampati, J. Phys. Chem. Lett. 4, 3316 (2013)). Absorbance-like data convert the axis only.
import { z } from 'zod';
import type { Spectrum, SpectrumKind, SpectrumMetadata } from '../model/spectrum.js';
import { makeCorrectionRecord, type CorrectionRecord } from './correction-record.js';
import { resolveWithSchema } from './options.js';
import { itemAt } from '../model/item-at.js';

/** hc in eV·nm (CODATA 2018: 1239.841984 eV·nm). */
export const HC_EV_NM = 1239.84198;
/** Wavenumber in cm⁻¹ of 1 nm⁻¹: ν̃ = 1e7 / λ(nm). */
export const NM_TO_PER_CM = 1e7;

/** A spectrum on an ascending energy (eV) or wavenumber (cm⁻¹) axis. */
export interface ConvertedSpectrum {
  readonly kind: SpectrumKind;
  readonly axis: 'energy' | 'wavenumber';
  readonly axisUnit: 'eV' | 'cm-1';
  /** Strictly ascending energies (eV) or wavenumbers (cm⁻¹). */
  readonly axisValues: Float64Array;
  readonly values: Float64Array;
  readonly valueUnit: string;
  readonly jacobianApplied: boolean;
  readonly metadata: SpectrumMetadata;
}

const scaleOptionsSchema = z
  .object({
    /** 'auto' applies the Jacobian to emission and blank spectra only; absorbance, transmittance, excitation and correction curves convert x only (default 'auto'). */
    jacobian: z.enum(['auto', 'apply', 'skip']).default('auto'),
  })
  .strict();

/** User-facing options of toEnergyScale / toWavenumberScale. */
export type ScaleOptions = z.input<typeof scaleOptionsSchema>;

/** Validates ScaleOptions, fills defaults, freezes. */
export function resolveScaleOptions(options?: ScaleOptions): Readonly<z.output<typeof scaleOptionsSchema>> {
  return resolveWithSchema(scaleOptionsSchema, options, 'corrections.scale');
}

function convert(
  spectrum: Spectrum,
  axis: 'energy' | 'wavenumber',
  options: ScaleOptions | undefined,
): { spectrum: ConvertedSpectrum; record: CorrectionRecord } {
  const resolved = resolveScaleOptions(options);
  const density = spectrum.kind === 'emission' || spectrum.kind === 'blank';
  const applyJacobian = resolved.jacobian === 'apply' || (resolved.jacobian === 'auto' && density);
  const constant = axis === 'energy' ? HC_EV_NM : NM_TO_PER_CM;
  const n = spectrum.wavelengthNm.length;
  const axisValues = new Float64Array(n);
  const values = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    // Reverse the order so the new axis ascends.
    const wavelengthNm = itemAt(spectrum.wavelengthNm, n - 1 - i);
    const value = itemAt(spectrum.values, n - 1 - i);
    axisValues[i] = constant / wavelengthNm;
    // |dλ/dE| = λ²/hc (and λ²/1e7 for cm⁻¹): I(E) = I(λ)·λ²/hc.
    values[i] = applyJacobian ? (value * wavelengthNm * wavelengthNm) / constant : value;
  }
  const axisUnit = axis === 'energy' ? 'eV' : 'cm-1';
  const converted: ConvertedSpectrum = Object.freeze({
    kind: spectrum.kind,
    axis,
    axisUnit,
    axisValues,
    values,
    valueUnit: applyJacobian ? `${spectrum.valueUnit}/${axisUnit}` : spectrum.valueUnit,
    jacobianApplied: applyJacobian,
    metadata: spectrum.metadata,
  });
  return {
    spectrum: converted,
    record: makeCorrectionRecord(
      axis === 'energy' ? 'toEnergyScale' : 'toWavenumberScale',
      {},
      { jacobian: resolved.jacobian, jacobianApplied: applyJacobian, conversionConstant: constant },
      [],
    ),
  };
}

/** Converts to an ascending energy axis E = hc/λ (eV, hc = 1239.84198 eV·nm) with I(E) = I(λ)·λ²/hc for densities (Mooney & Kambhampati 2013). */
export function toEnergyScale(
  spectrum: Spectrum,
  options?: ScaleOptions,
): { spectrum: ConvertedSpectrum; record: CorrectionRecord } {
  return convert(spectrum, 'energy', options);
}

/** Converts to an ascending wavenumber axis ν̃ = 1e7/λ (cm⁻¹) with I(ν̃) = I(λ)·λ²/1e7 for densities (Mooney & Kambhampati 2013). */
export function toWavenumberScale(
  spectrum: Spectrum,
  options?: ScaleOptions,
): { spectrum: ConvertedSpectrum; record: CorrectionRecord } {
  return convert(spectrum, 'wavenumber', options);
}
